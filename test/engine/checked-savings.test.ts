/**
 * The checks a savings document states, and when they refuse a projection
 * (checked-savings.ts). Check values: the rule's own contract; the
 * sufficiency and extrapolation figures are built by hand here (synthetic).
 */
import { describe, expect, it } from 'vitest';
import {
  baselineSufficiency,
  NO_OVERRIDES,
  projectionRefusals,
  reportingExtrapolation,
  withProjectionChecks,
  type SavingsDocument,
} from '../../src/engine/index.js';

const short = baselineSufficiency([{ days: 31 }, { days: 30 }, { days: 31 }]); // synthetic: three bills, 92 days
const enough = baselineSufficiency(Array.from({ length: 12 }, () => ({ days: 30 }))); // synthetic: 12 bills, 360 days
const fit = {
  temperatureForm: 'daily' as const,
  temperatureRange: { min: 40, max: 70 },
  dayTemperatureRange: { min: 30, max: 80 },
};
const beyond = reportingExtrapolation(fit, [{ days: 2, meanTemp: 90, dayTemps: [90, 95] }]); // synthetic: both days outside
const within = reportingExtrapolation(fit, [{ days: 2, meanTemp: 50, dayTemps: [45, 55] }]);

describe('projectionRefusals', () => {
  it('refuses a short baseline (when asked to) and a share above the limit, each with its reason', () => {
    expect(
      projectionRefusals(
        { sufficiency: short, extrapolation: beyond, overrides: NO_OVERRIDES },
        { requireSufficiency: true },
      ),
    ).toEqual([
      {
        check: 'shortBaseline',
        reason: expect.stringMatching(
          /^the baseline is too short to project from: the baseline's usable periods cover 92 days/,
        ),
      },
      {
        check: 'extrapolation',
        reason: expect.stringMatching(
          /^the reporting weather lies outside what the baseline saw: 100\.0% of the reporting days \(2 of 2\)/,
        ),
      },
    ]);
    // A frozen baseline's service check leaves the length to the freeze.
    expect(
      projectionRefusals(
        { sufficiency: short, extrapolation: within, overrides: NO_OVERRIDES },
        { requireSufficiency: false },
      ),
    ).toEqual([]);
    expect(
      projectionRefusals(
        { sufficiency: enough, extrapolation: within, overrides: NO_OVERRIDES },
        { requireSufficiency: true },
      ),
    ).toEqual([]);
  });

  it('lets each override pass its own check only', () => {
    const shortOnly = { shortBaseline: { reason: 'pilot' }, extrapolation: null };
    expect(
      projectionRefusals(
        { sufficiency: short, extrapolation: beyond, overrides: shortOnly },
        { requireSufficiency: true },
      ).map((r) => r.check),
    ).toEqual(['extrapolation']);
    const both = { shortBaseline: { reason: 'pilot' }, extrapolation: { reason: 'heat wave' } };
    expect(
      projectionRefusals({ sufficiency: short, extrapolation: beyond, overrides: both }, { requireSufficiency: true }),
    ).toEqual([]);
  });
});

describe('withProjectionChecks', () => {
  it('adds baseline.sufficiency, baseline.overrides and extrapolation, keeping every other key', () => {
    const document = {
      model: '3PH',
      baseline: { selected: '3PH', temperatureForm: 'daily', reportingMonths: 1, guideline14: null },
      totals: { savings: 1 },
    } as unknown as SavingsDocument;
    const checked = withProjectionChecks(document, {
      sufficiency: enough,
      extrapolation: within,
      overrides: NO_OVERRIDES,
    });
    expect(checked.baseline).toEqual({ ...document.baseline, sufficiency: enough, overrides: NO_OVERRIDES });
    expect(checked.extrapolation).toBe(within);
    expect(checked.totals).toBe(document.totals);
  });
});
