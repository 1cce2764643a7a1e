import { describe, it, expect } from 'vitest';
import { chooseBaseline, computeSavings, type Period } from '../../src/engine/index.js';
import { applyExclusions } from '../../src/engine/exclusions.js';
import { seededRandom } from '../support/synthetic.js';

/**
 * Choosing variables and using them in savings. Synthetic: the test sets the
 * truth (an invented building with an occupancy effect and a variable that
 * does nothing); the t and F critical values the reasons quote come from
 * distributions.ts, itself checked against scipy (wls-fixtures.json).
 */
function date(offset: number): string {
  return new Date(Date.UTC(2030, 0, 1 + offset)).toISOString().slice(0, 10);
}

function days(seed: number, from: number, count: number, occupancy: (d: number) => number): Period[] {
  const random = seededRandom(seed);
  return Array.from({ length: count }, (_, i) => {
    const d = from + i;
    const temp = Math.round((50 - 22 * Math.cos((2 * Math.PI * d) / 365) + random.normal() * 5) * 10) / 10;
    const occupied = occupancy(d);
    const noise = random.normal() * 30;
    const use = 400 + 12 * Math.max(56 - temp, 0) + 180 * occupied + noise;
    return {
      start: date(d),
      end: date(d + 1),
      days: 1,
      quantity: use,
      usePerDay: use,
      meanTemp: temp,
      coverage: 1,
      estimated: false,
      dayTemps: [temp],
      variables: { occupied, unrelated: random.uniform() },
    };
  });
}

const weekdays = (d: number) => (d % 7 < 5 ? 1 : 0);

describe('choosing variables by t and partial F', () => {
  const baseline = days(5, 0, 365, weekdays);
  it('keeps a variable that matters and drops one that does not, with the numbers in words', () => {
    const choice = chooseBaseline(baseline, { variables: ['occupied', 'unrelated'] });
    expect(choice.variables).toEqual(['occupied']);
    const decisions = Object.fromEntries(choice.variableDecisions!.map((d) => [d.name, d]));
    expect(decisions.occupied!.verdict).toBe('kept');
    expect(decisions.occupied!.reasons.join(' ')).toMatch(/earns its place .*\|t\| = .*partial F = /);
    expect(decisions.unrelated!.verdict).toBe('dropped');
    expect(decisions.unrelated!.reasons.join(' ')).toMatch(/dropped: does not earn its place/);
    const selected = choice.candidates.find((c) => c.model === choice.selected)!;
    expect(selected.p).toBe({ '1P': 1, '2P': 2, '3PC': 3, '3PH': 3, '4P': 4, '5P': 5 }[choice.selected] + 1);
  });
  it('records the engineer forcing a variable in or out, with the reason', () => {
    const choice = chooseBaseline(baseline, {
      variables: ['occupied'],
      variableOverrides: [
        { name: 'unrelated', include: true, reason: 'the M&V plan lists it' },
        { name: 'occupied', include: false, reason: 'occupancy data are not audited' },
      ],
    });
    expect(choice.variables).toEqual(['unrelated']);
    const decisions = Object.fromEntries(choice.variableDecisions!.map((d) => [d.name, d]));
    expect(decisions.unrelated!.verdict).toBe('forced-in');
    expect(decisions.unrelated!.reasons[0]).toContain('the M&V plan lists it');
    expect(decisions.occupied!.verdict).toBe('forced-out');
    expect(() =>
      chooseBaseline(baseline, { variableOverrides: [{ name: 'occupied', include: true, reason: ' ' }] }),
    ).toThrow(/needs a reason/);
  });
});

describe('savings with variables', () => {
  const baseline = days(7, 0, 365, weekdays);
  const choice = chooseBaseline(baseline, { variables: ['occupied'] });
  const fit = choice.candidates.find((c) => c.model === choice.selected)!.fit!;
  it('a summer break is not booked as savings when the model knows occupancy (no retrofit: savings near zero)', () => {
    // A year later, with a ten-week break (unoccupied) and no retrofit.
    const reporting = days(8, 365, 365, (d) => (d % 365 >= 180 && d % 365 < 250 ? 0 : weekdays(d)));
    const savings = computeSavings(fit, reporting);
    expect(Math.abs(savings.totals.savings)).toBeLessThan(2 * savings.totals.uncertainty.exact.absolute);
    expect(savings.totals.outsideVariableRangeShares).toEqual({ occupied: 0 });
  });
  it('refuses reporting periods without their values, naming their dates', () => {
    const reporting = days(9, 365, 10, weekdays).map((p, i) => (i === 3 ? { ...p, variables: {} } : p));
    expect(() => computeSavings(fit, reporting)).toThrow(
      new RegExp(`no values for the reporting periods ${reporting[3]!.start} to ${reporting[3]!.end}`),
    );
  });
  it('flags reporting values outside the range the baseline saw, with their share', () => {
    const reporting = days(10, 365, 20, weekdays).map((p, i) => (i < 5 ? { ...p, variables: { occupied: 2 } } : p));
    const savings = computeSavings(fit, reporting);
    expect(savings.periods.filter((p) => p.outsideVariableRanges!.includes('occupied'))).toHaveLength(5);
    expect(savings.totals.outsideVariableRangeShares!.occupied).toBeGreaterThan(0.2);
  });
});

describe('exclusions (hand-worked: 10 readings, at most 2 may go)', () => {
  const readings = Array.from({ length: 10 }, (_, i) => ({
    start: date(30 * i),
    end: date(30 * i + 30),
    quantity: 100 + i,
  }));
  it('leaves the named readings out and keeps the reasons', () => {
    const { kept, applied } = applyExclusions(readings, [
      { start: readings[2]!.start, end: readings[2]!.end, reason: 'meter fault' },
    ]);
    expect(kept).toHaveLength(9);
    expect(applied).toEqual([
      { start: readings[2]!.start, end: readings[2]!.end, reason: 'meter fault', quantity: 102 },
    ]);
  });
  it('refuses more than a fifth, unknown readings, repeats and missing reasons', () => {
    const three = readings.slice(0, 3).map((r) => ({ start: r.start, end: r.end, reason: 'doubtful' }));
    expect(() => applyExclusions(readings, three)).toThrow(/more than a fifth/);
    expect(() => applyExclusions(readings, [{ start: '2031-01-01', end: '2031-02-01', reason: 'x' }])).toThrow(
      /exclusions\[0\]: no baseline reading/,
    );
    expect(() => applyExclusions(readings, [three[0]!, three[0]!])).toThrow(/exclusions\[1\].*twice/);
    expect(() => applyExclusions(readings, [{ ...three[0]!, reason: '' }])).toThrow(/needs a reason/);
  });
});
