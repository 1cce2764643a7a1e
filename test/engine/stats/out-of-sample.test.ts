import { describe, expect, it } from 'vitest';
import { outOfSampleBlocks, outOfSampleFit } from '../../../src/engine/stats/out-of-sample.js';
import { weightedLeastSquares } from '../../../src/engine/fit/wls.js';
import { seededRandom } from '../../support/synthetic.js';

describe('outOfSampleFit', () => {
  it('the example in its doc comment: a mean of 1, 2, 3 left out one at a time (hand-worked)', () => {
    const result = outOfSampleFit(
      { design: [[1], [1], [1]], usePerDay: [1, 2, 3], days: [1, 1, 1], quantity: [1, 2, 3], blocks: ['a', 'b', 'c'] },
      'leave-one-period-out',
      [[1 / 3]],
      [2],
    );
    expect(result.cvrmse).toBeCloseTo(Math.sqrt(4.5 / 3) / 2, 12);
    expect(result.nmbe).toBeCloseTo(0, 12);
    expect(result.unavailable).toBeNull();
  });

  it('equals refitting without each block from scratch (reference: weightedLeastSquares on the rest)', () => {
    const random = seededRandom(12);
    const n = 40;
    const design = Array.from({ length: n }, (_, i) => [
      1,
      Math.max(0, 55 - (20 + i * 1.5)),
      Math.max(0, 20 + i * 1.5 - 65),
    ]);
    const days = Array.from({ length: n }, () => 28 + Math.floor(6 * random.uniform()));
    const usePerDay = design.map((row) => 300 + 8 * row[1]! + 10 * row[2]! + 15 * random.normal());
    const quantity = usePerDay.map((u, i) => u * days[i]!);
    const blocks = Array.from({ length: n }, (_, i) => `m${Math.floor(i / 3)}`);
    const full = weightedLeastSquares(design, usePerDay, days)!;
    const result = outOfSampleFit(
      { design, usePerDay, days, quantity, blocks },
      'blocked-by-month',
      full.unscaledCovariance,
      full.coefficients,
    );
    let squares = 0;
    let total = 0;
    for (const block of new Set(blocks)) {
      const keep = blocks.map((b) => b !== block);
      const fit = weightedLeastSquares(
        design.filter((_, i) => keep[i]),
        usePerDay.filter((_, i) => keep[i]),
        days.filter((_, i) => keep[i]),
      )!;
      blocks.forEach((b, i) => {
        if (b !== block) return;
        const residual = quantity[i]! - days[i]! * design[i]!.reduce((s, v, j) => s + v * fit.coefficients[j]!, 0);
        squares += residual * residual;
        total += residual;
      });
    }
    const meanQuantity = quantity.reduce((a, q) => a + q, 0) / n;
    expect(result.cvrmse).toBeCloseTo(Math.sqrt(squares / n) / meanQuantity, 12);
    expect(result.nmbe).toBeCloseTo(total / (n * meanQuantity), 12);
  });

  it('says which block leaves the model unidentified instead of failing', () => {
    // The only period with a non-zero second column is left out: its coefficient cannot be estimated.
    const design = [
      [1, 0],
      [1, 0],
      [1, 5],
      [1, 0],
    ];
    const full = weightedLeastSquares(design, [1, 2, 9, 1], [1, 1, 1, 1])!;
    const result = outOfSampleFit(
      {
        design,
        usePerDay: [1, 2, 9, 1],
        days: [1, 1, 1, 1],
        quantity: [1, 2, 9, 1],
        blocks: ['2030-01-01', '2030-01-02', '2030-01-03', '2030-01-04'],
      },
      'leave-one-period-out',
      full.unscaledCovariance,
      full.coefficients,
    );
    expect(result.cvrmse).toBeNaN();
    expect(result.unavailable).toMatch(/without the period starting 2030-01-03 the model is not identified/);
  });
});

describe('outOfSampleBlocks', () => {
  it('bills are left out one by one, daily data by calendar month (our own rule: a median of 7 days or more is a bill)', () => {
    expect(
      outOfSampleBlocks([
        { start: '2030-01-03', days: 30 },
        { start: '2030-02-02', days: 29 },
      ]),
    ).toEqual({ method: 'leave-one-period-out', blocks: ['2030-01-03', '2030-02-02'] });
    expect(
      outOfSampleBlocks([
        { start: '2030-01-31', days: 1 },
        { start: '2030-02-01', days: 1 },
      ]),
    ).toEqual({ method: 'blocked-by-month', blocks: ['2030-01', '2030-02'] });
  });
});

describe('out-of-sample figures of a fitted shape', () => {
  it('daily readings with a gap in the middle of a month: the month is left out with the days it holds, and the figures say how they were made', async () => {
    const { alignPeriods } = await import('../../../src/engine/periods.js');
    const { fitShape } = await import('../../../src/engine/fit/fit-shape.js');
    const { dailyWeather, dailyReadings, SAMPLE_BUILDING, CLIMATES } = await import('../../support/synthetic.js');
    const random = seededRandom(21);
    const weather = dailyWeather(CLIMATES.temperate, '2030-01-01', 400, random);
    // synthetic: a year of daily readings with 10 days missing from the middle of March
    const readings = dailyReadings(SAMPLE_BUILDING, weather.slice(0, 365), random).filter(
      (r) => !(r.start >= '2030-03-10' && r.start < '2030-03-20'),
    );
    const fit = fitShape(alignPeriods(readings, weather).periods, '5P', 3, 'daily');
    if (!fit.ok) throw new Error(fit.reason);
    const outOfSample = fit.stats.outOfSample!;
    expect(outOfSample.method).toBe('blocked-by-month');
    expect(outOfSample.blocks).toBe(12);
    expect(outOfSample.unavailable).toBeNull();
    // Held-out months are predicted, not fitted: the out-of-sample figure is not far below the in-sample one (which divides by n − p).
    expect(outOfSample.cvrmse).toBeGreaterThan(fit.stats.cvrmse * 0.9);
    expect(Number.isFinite(outOfSample.nmbe)).toBe(true);
  });
});
