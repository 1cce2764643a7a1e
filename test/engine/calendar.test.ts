/**
 * Facility calendars: day types by weekday and dated exceptions, problems
 * named by field, indicator variables, and a simulated building whose
 * weekend use is lower by a known amount recovered within its standard
 * error. Dates' weekdays by hand from a printed calendar; the simulated
 * truth is set by the test.
 */
import { describe, expect, it } from 'vitest';
import {
  analyseBaseline,
  checkCalendar,
  dayTypeSeries,
  dayTypesOver,
  type FacilityCalendar,
} from '../../src/engine/index.js';
import { seededRandom } from '../support/synthetic.js';

const SCHOOL: FacilityCalendar = {
  dayTypes: ['term', 'weekend', 'break'],
  weekly: ['term', 'term', 'term', 'term', 'term', 'weekend', 'weekend'],
  exceptions: [
    { start: '2031-07-01', end: '2031-09-01', dayType: 'break', note: 'summer break (invented)' },
    { start: '2031-12-22', end: '2032-01-05', dayType: 'break' },
  ],
};

describe('facility calendar', () => {
  it('gives each day its type: the weekly pattern, overridden by exceptions (by hand)', () => {
    // 2031-06-28 was a Saturday (by hand); the break starts on Tuesday 2031-07-01.
    expect(dayTypesOver(SCHOOL, '2031-06-27', '2031-07-03')).toEqual([
      'term',
      'weekend',
      'weekend',
      'term',
      'break',
      'break',
    ]);
  });
  it('names what is wrong: an unknown day type, a weekly pattern of the wrong length, overlapping exceptions', () => {
    expect(checkCalendar(SCHOOL)).toEqual([]);
    const bad: FacilityCalendar = {
      dayTypes: ['term', 'term'],
      weekly: ['term', 'term', 'term', 'term', 'term', 'holiday'],
      exceptions: [],
    };
    expect(checkCalendar(bad).map((p) => p.field)).toEqual(['dayTypes[1]', 'weekly', 'weekly[5]']);
    const overlapping = {
      ...SCHOOL,
      exceptions: [...SCHOOL.exceptions, { start: '2031-08-30', end: '2031-09-02', dayType: 'term' }],
    };
    expect(checkCalendar(overlapping)).toEqual([
      { field: 'exceptions[2]', message: '2031-08-30..2031-09-02 overlaps exceptions[0] 2031-07-01..2031-09-01' },
    ]);
  });
  it('turns into indicators of every day type but the first; a bill gets its share of days (by hand)', () => {
    const series = dayTypeSeries(SCHOOL, '2031-06-27', '2031-07-03');
    expect(series.map((s) => s.name)).toEqual(['day type: weekend', 'day type: break']);
    expect(series[0]!.values.map((v) => v.value)).toEqual([0, 1, 1, 0, 0, 0]);
    expect(series[1]!.values.map((v) => v.value)).toEqual([0, 0, 0, 0, 1, 1]);
  });
  it('recovers a simulated weekend and break effect within its standard errors (synthetic: the test sets the truth)', () => {
    const random = seededRandom(77);
    const from = '2031-01-01';
    const days = 365;
    const types = dayTypesOver(SCHOOL, from, '2032-01-01');
    const weather = [];
    const readings = [];
    for (let d = 0; d < days; d++) {
      const date = new Date(Date.UTC(2031, 0, 1 + d)).toISOString().slice(0, 10);
      const next = new Date(Date.UTC(2031, 0, 2 + d)).toISOString().slice(0, 10);
      const temp = 52 - 20 * Math.cos((2 * Math.PI * d) / 365) + random.normal() * 4;
      const shift = types[d] === 'weekend' ? -900 : types[d] === 'break' ? -1400 : 0;
      weather.push({ date, temp });
      readings.push({
        start: date,
        end: next,
        quantity: 2500 + 40 * Math.max(58 - temp, 0) + shift + random.normal() * 120,
      });
    }
    const series = dayTypeSeries(SCHOOL, from, '2032-01-01');
    const analysis = analyseBaseline(readings, weather, {
      variableSeries: series,
      variables: series.map((s) => s.name),
    });
    expect(analysis.choice.variables).toEqual(['day type: weekend', 'day type: break']);
    const fit = analysis.choice.candidates.find((c) => c.model === analysis.choice.selected)!.fit!;
    const weekend = fit.coefficients.find((c) => c.name === 'day type: weekend')!;
    const holiday = fit.coefficients.find((c) => c.name === 'day type: break')!;
    expect(Math.abs(weekend.estimate + 900)).toBeLessThan(3 * weekend.standardError); // truth −900, set above
    expect(Math.abs(holiday.estimate + 1400)).toBeLessThan(3 * holiday.standardError); // truth −1400, set above
  });
});
