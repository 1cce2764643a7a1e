/**
 * Variables as series: values per day ('mean' holds, 'total' spreads), a
 * reading's value as the mean over its days, a gap leaving the value off,
 * and the fit and the savings refusing a period without its value, naming
 * its dates. Check values are worked by hand from the invented data below.
 */
import { describe, expect, it } from 'vitest';
import {
  alignPeriods,
  analyseBaseline,
  meanOverDays,
  MissingVariableValuesError,
  savingsFromFit,
  valuesPerDay,
  type DailyTemperature,
  type Reading,
  type VariableSeries,
} from '../../src/engine/index.js';
import { dayNumber } from '../../src/engine/dates.js';

function date(offset: number): string {
  return new Date(Date.UTC(2031, 0, 1 + offset)).toISOString().slice(0, 10);
}

describe('variable values per day', () => {
  it("holds a 'mean' value on each day and spreads a 'total' (by hand)", () => {
    const level: VariableSeries = {
      name: 'people',
      aggregation: 'mean',
      values: [{ start: date(0), end: date(3), value: 40 }],
    };
    const amount: VariableSeries = {
      name: 'units',
      aggregation: 'total',
      values: [{ start: date(0), end: date(4), value: 100 }],
    };
    expect([...valuesPerDay(level).values()]).toEqual([40, 40, 40]); // by hand: a level holds on each of 3 days
    expect([...valuesPerDay(amount).values()]).toEqual([25, 25, 25, 25]); // by hand: 100 over 4 days
  });
  it('averages over a period and gives nothing when a day is missing (by hand)', () => {
    const perDay = new Map([
      [dayNumber(date(0)), 1],
      [dayNumber(date(1)), 0],
      [dayNumber(date(2)), 1],
    ]);
    expect(meanOverDays(perDay, dayNumber(date(0)), 3)).toBeCloseTo(2 / 3, 12); // by hand: 2 occupied days of 3
    expect(meanOverDays(perDay, dayNumber(date(1)), 3)).toBeUndefined(); // date(3) has no value
  });
  it('attaches to aligned periods, leaving off a variable with a gap', () => {
    const readings: Reading[] = [
      { start: date(0), end: date(10), quantity: 100 },
      { start: date(10), end: date(20), quantity: 100 },
    ];
    const weather: DailyTemperature[] = Array.from({ length: 20 }, (_, d) => ({ date: date(d), temp: 50 }));
    const units: VariableSeries = {
      name: 'units',
      aggregation: 'total',
      values: [
        { start: date(0), end: date(5), value: 50 },
        { start: date(5), end: date(10), value: 150 },
        { start: date(10), end: date(19), value: 90 },
      ],
    };
    const { periods } = alignPeriods(readings, weather, { variableSeries: [units] });
    expect(periods[0]!.variables).toEqual({ units: 20 }); // by hand: (5·10 + 5·30)/10
    expect(periods[1]!.variables).toEqual({}); // date(19) uncovered: never assumed
  });
});

describe('fits and savings without a variable value are refused naming the dates', () => {
  const weather: DailyTemperature[] = Array.from({ length: 120 }, (_, d) => ({ date: date(d), temp: 30 + (d % 40) }));
  const readings: Reading[] = Array.from({ length: 60 }, (_, d) => ({
    start: date(d),
    end: date(d + 1),
    quantity: 100 + 3 * (d % 7),
  }));
  const values = (from: number, to: number) =>
    Array.from({ length: to - from }, (_, i) => ({
      start: date(from + i),
      end: date(from + i + 1),
      value: (from + i) % 7,
    }));

  it('refuses a baseline whose variable has a gap, naming the period', () => {
    const series: VariableSeries = {
      name: 'load',
      aggregation: 'mean',
      values: values(0, 60).filter((v) => v.start !== date(17)),
    };
    expect(() => analyseBaseline(readings, weather, { variableSeries: [series] })).not.toThrow(); // not offered: not needed
    const attempt = () => analyseBaseline(readings, weather, { variableSeries: [series], variables: ['load'] });
    expect(attempt).toThrow(MissingVariableValuesError);
    expect(attempt).toThrow(`${date(17)} to ${date(18)} (load)`);
  });
  it('refuses savings for reporting periods without the values, naming each', () => {
    const series: VariableSeries = { name: 'load', aggregation: 'mean', values: values(0, 60) };
    const analysis = analyseBaseline(readings, weather, {
      variableSeries: [series],
      variables: ['load'],
      temperatureForm: 'mean',
    });
    expect(analysis.choice.variables).toEqual(['load']);
    const fit = analysis.choice.candidates.find((c) => c.model === analysis.choice.selected)!.fit!;
    const reporting: Reading[] = Array.from({ length: 10 }, (_, i) => ({
      start: date(60 + i),
      end: date(61 + i),
      quantity: 110,
    }));
    const partial: VariableSeries = { name: 'load', aggregation: 'mean', values: values(60, 68) };
    const attempt = () =>
      savingsFromFit(fit, { limits: analysis.choice.settings.guideline14, excluded: [] }, reporting, weather, {
        variableSeries: [partial],
      });
    expect(attempt).toThrow(MissingVariableValuesError);
    expect(attempt).toThrow(`${date(68)} to ${date(69)} (load); ${date(69)} to ${date(70)} (load)`);
    const full: VariableSeries = { name: 'load', aggregation: 'mean', values: values(60, 70) };
    const savings = savingsFromFit(
      fit,
      { limits: analysis.choice.settings.guideline14, excluded: [] },
      reporting,
      weather,
      {
        variableSeries: [full],
      },
    );
    expect(savings.periods).toHaveLength(10);
  });
});
