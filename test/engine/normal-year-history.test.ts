import { describe, expect, it } from 'vitest';
import { addDays, NORMAL_YEAR_DAYS, normalYearFromHistory, ShortHistoryError } from '../../src/engine/index.js';
import { seededRandom } from '../support/synthetic.js';

// Synthetic: 30 invented years whose truth the test sets, T(d) = A + B·cos(2π(d − φ)/365) on the normal-year day index d
// (29 February takes 28 February's value, so folding it in leaves that day's mean unchanged).
const A = 12;
const B = 10;
const PHI = 200;
const truth = (index: number) => A + B * Math.cos((2 * Math.PI * (index - PHI)) / 365);
const INDEX = new Map(NORMAL_YEAR_DAYS.map((day, i) => [day, i]));

function history(noise: () => number, fromYear = 1991, toYear = 2020) {
  const days: { date: string; temp: number }[] = [];
  for (let date = `${fromYear}-01-01`; date < `${toYear + 1}-01-01`; date = addDays(date, 1)) {
    const md = date.slice(5);
    days.push({ date, temp: truth(INDEX.get(md === '02-29' ? '02-28' : md)!) + noise() });
  }
  return days;
}

/** The centred moving mean of width w over a 365-day circle multiplies a yearly cosine by sin(πw/365)/(w·sin(π/365)) (the Dirichlet kernel). */
const gain = (w: number) => Math.sin((Math.PI * w) / 365) / (w * Math.sin(Math.PI / 365));

describe('a normal year from 30 years of history', () => {
  it('equals the analytic smoothed mean exactly without noise, 29 February folded in', () => {
    const built = normalYearFromHistory(
      history(() => 0),
      { fromYear: 1991, toYear: 2020 },
    );
    expect(built.years).toBe(30);
    expect(built.daysUsed).toBe(10958); // 30 × 365 + 8 leap days (1992 … 2020)
    built.rawMeans.forEach((mean, i) => expect(mean).toBeCloseTo(truth(i), 10));
    built.temps.forEach((t, i) =>
      expect(t).toBeCloseTo(A + B * gain(15) * Math.cos((2 * Math.PI * (i - PHI)) / 365), 10),
    );
  });

  it('stays within the noise’s standard error of the analytic mean with seeded noise', () => {
    const random = seededRandom(14);
    const sigma = 3;
    const noise = () => sigma * random.normal(); // normal noise, σ = 3 (synthetic)
    const built = normalYearFromHistory(history(noise), { fromYear: 1991, toYear: 2020, windowDays: 15 });
    // Each smoothed day averages about 30 × 15 independent values: standard error 3/√450 ≈ 0.14; 5 of them bound the worst of 365.
    const bound = (5 * sigma) / Math.sqrt(30 * 15);
    const worst = Math.max(
      ...built.temps.map((t, i) => Math.abs(t - (A + B * gain(15) * Math.cos((2 * Math.PI * (i - PHI)) / 365)))),
    );
    expect(worst).toBeLessThan(bound);
  });

  it('refuses calendar days short of history and a window that is not odd', () => {
    const days = history(() => 0).filter((d) => !(d.date.slice(5) === '07-04' && d.date < '2000-01-01'));
    expect(() => normalYearFromHistory(days, { fromYear: 1991, toYear: 2020 })).toThrow(ShortHistoryError);
    expect(() => normalYearFromHistory(days, { fromYear: 1991, toYear: 2020 })).toThrow(
      /fewer than 24 of the 30 years 1991–2020 on record: 07-04/,
    );
    expect(() => normalYearFromHistory(days, { fromYear: 1991, toYear: 2020, windowDays: 14 })).toThrow(
      /odd whole number/,
    );
  });
});
