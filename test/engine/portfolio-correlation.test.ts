import { describe, expect, it } from 'vitest';
import { combineCorrelated, monthlyResiduals, residualCorrelation } from '../../src/engine/portfolio-correlation.js';
import { combineInQuadrature } from '../../src/engine/rollup.js';
import { addDays, daysBetween } from '../../src/engine/dates.js';
import { seededRandom } from '../support/synthetic.js';

/** Monthly bills read on the given day of each month, residuals from `residual(i)`. */
function bills(readDay: number, months: number, residual: (i: number) => number) {
  return Array.from({ length: months }, (_, i) => {
    const start = `${2030 + Math.floor(i / 12)}-${String((i % 12) + 1).padStart(2, '0')}-${String(readDay).padStart(2, '0')}`;
    const nextMonth = i + 1;
    const end = `${2030 + Math.floor(nextMonth / 12)}-${String((nextMonth % 12) + 1).padStart(2, '0')}-${String(readDay).padStart(2, '0')}`;
    return { start, end, residual: residual(i) };
  });
}

describe('monthlyResiduals', () => {
  it('spreads a bill over the calendar months it covers, by days (hand-worked)', () => {
    // 2030-01-21 to 2030-02-10: 11 days in January, 9 in February; residual 20 → 11 and 9.
    const months = monthlyResiduals([{ start: '2030-01-21', end: '2030-02-10', residual: 20 }]);
    expect(months.get('2030-01')).toBeCloseTo(11, 12);
    expect(months.get('2030-02')).toBeCloseTo(9, 12);
  });

  it('gives exactly what a day-by-day spread gives, across month ends, year ends and 29 February (synthetic: the test spreads each day itself)', () => {
    const random = seededRandom(17);
    const periods = Array.from({ length: 200 }, () => {
      const start = addDays('2027-11-03', random.integer(0, 900));
      return { start, end: addDays(start, random.integer(1, 75)), residual: 100 * random.normal() };
    });
    const expected = new Map<string, number>();
    for (const p of periods) {
      const days = daysBetween(p.start, p.end);
      const perDay = p.residual / days;
      // Runs of days in one month, added as the module adds them (one product per run).
      let run = 0;
      for (let d = 0; d < days; d++) {
        run++;
        const month = addDays(p.start, d).slice(0, 7);
        if (d === days - 1 || addDays(p.start, d + 1).slice(0, 7) !== month) {
          expected.set(month, (expected.get(month) ?? 0) + perDay * run);
          run = 0;
        }
      }
    }
    expect([...monthlyResiduals(periods)]).toEqual([...expected]);
  });
});

describe('residualCorrelation', () => {
  it('meters whose residuals move together correlate near 1, independent ones near 0, opposed ones are taken as 0 (synthetic)', () => {
    const random = seededRandom(3);
    const shared = Array.from({ length: 36 }, () => random.normal());
    const same = residualCorrelation([
      { group: 's', periods: bills(1, 36, (i) => shared[i]!) },
      { group: 's', periods: bills(1, 36, (i) => 2 * shared[i]!) },
    ]);
    expect(same.withinGroup).toBeCloseTo(1, 9);
    expect(same.acrossGroups).toBeNull();
    const opposed = residualCorrelation([
      { group: 's', periods: bills(1, 36, (i) => shared[i]!) },
      { group: 's', periods: bills(1, 36, (i) => -shared[i]!) },
    ]);
    expect(opposed.withinGroup).toBe(0);
    const independent = residualCorrelation(
      Array.from({ length: 20 }, () => ({ group: 's', periods: bills(1, 36, () => random.normal()) })),
    );
    // 190 pairs × 36 months of independent noise: the pooled correlation's standard error is about 1/√(190·36) ≈ 0.012.
    expect(independent.withinGroup!).toBeLessThan(0.05);
    expect(independent.pairsWithin).toBe(190);
  });

  it('recovers a shared share of the noise on bills read on different days, within and across stations (synthetic: ICC 0.4 set by the test)', () => {
    const random = seededRandom(8);
    const days = 3 * 365;
    const station = {
      a: Array.from({ length: days }, () => random.normal()),
      b: Array.from({ length: days }, () => random.normal()),
    };
    const meter = (group: 'a' | 'b', readDay: number) => {
      const own = Array.from({ length: days }, () => random.normal());
      const daily = own.map((e, d) => Math.sqrt(0.6) * e + Math.sqrt(0.4) * station[group][d]!);
      return {
        group,
        periods: bills(readDay, 34, (i) => {
          const first = Math.round((Date.UTC(2030, i, readDay) - Date.UTC(2030, 0, 1)) / 86_400_000);
          const last = Math.round((Date.UTC(2030, i + 1, readDay) - Date.UTC(2030, 0, 1)) / 86_400_000);
          return daily.slice(first, last).reduce((s, v) => s + v, 0);
        }),
      };
    };
    const meters = [
      ...Array.from({ length: 8 }, (_, i) => meter('a', 1 + (i % 20))),
      ...Array.from({ length: 8 }, (_, i) => meter('b', 3 + (i % 20))),
    ];
    const result = residualCorrelation(meters);
    // Monthly sums of daily noise with a 40% station share correlate 0.4 between meters of a station, 0 across.
    expect(result.withinGroup!).toBeGreaterThan(0.3);
    expect(result.withinGroup!).toBeLessThan(0.5);
    expect(result.acrossGroups!).toBeLessThan(0.08);
  });
});

describe('combineCorrelated', () => {
  it('the example in its doc comment: fully correlated parts add (3 + 4 = 7)', () => {
    expect(
      combineCorrelated(
        [
          { value: 3, group: 'a' },
          { value: 4, group: 'a' },
        ],
        { withinGroup: 1, acrossGroups: 0 },
      ),
    ).toBeCloseTo(7, 12);
  });

  it('uncorrelated parts combine in quadrature; the across-group value applies only across groups (hand-worked)', () => {
    const parts = [
      { value: 3, group: 'a' },
      { value: 4, group: 'b' },
      { value: 12, group: 'b' },
    ];
    expect(combineCorrelated(parts, { withinGroup: 0, acrossGroups: 0 })).toBeCloseTo(
      combineInQuadrature([3, 4, 12]),
      12,
    );
    // 9 + 16 + 144 + 2·0.5·4·12 (within b) + 2·0.25·(3·4 + 3·12) (across) = 169 + 48 + 24 = 241
    expect(combineCorrelated(parts, { withinGroup: 0.5, acrossGroups: 0.25 })).toBeCloseTo(Math.sqrt(241), 12);
    expect(combineCorrelated(parts, { withinGroup: null, acrossGroups: null })).toBeCloseTo(13, 12);
  });
});
