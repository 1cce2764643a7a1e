import { describe, expect, it } from 'vitest';
import { filledDaysByPeriod, findGaps, fitStationOffset, planGapFill } from '../../src/engine/index.js';

const day = (date: string, temp: number) => ({ date, temp });

describe('gaps, filled on record', () => {
  // Invented record: 1 and 4 January observed, 2–3 missing; 6–8 missing (3 days); 10 observed.
  const observed = [
    day('2025-01-01', 10),
    day('2025-01-04', 16),
    day('2025-01-05', 20),
    day('2025-01-09', 12),
    day('2025-01-10', 14),
  ];

  it('finds the runs of missing days with their neighbours', () => {
    const gaps = findGaps(observed, '2025-01-01', '2025-01-11');
    expect(gaps.map((g) => [g.start, g.end, g.days, g.before?.date, g.after?.date])).toEqual([
      ['2025-01-02', '2025-01-04', 2, '2025-01-01', '2025-01-04'],
      ['2025-01-06', '2025-01-09', 3, '2025-01-05', '2025-01-09'],
    ]);
  });

  it('interpolates a gap of at most 2 days linearly and leaves a longer one empty without a second station', () => {
    const plan = planGapFill(observed, '2025-01-01', '2025-01-11');
    // Hand-worked: 10 + (16 − 10)·1/3 = 12, 10 + (16 − 10)·2/3 = 14.
    expect(plan.filled.map((f) => [f.date, f.temp, f.method])).toEqual([
      ['2025-01-02', 12, 'interpolation'],
      ['2025-01-03', 14, 'interpolation'],
    ]);
    expect(plan.leftEmpty).toEqual(['2025-01-06', '2025-01-07', '2025-01-08']);
    expect(plan.filled[0]!.note).toBe('linear between 2025-01-01 (10) and 2025-01-04 (16)');
  });

  it('interpolates across the window edge using the whole run, and not with the limit at 0', () => {
    // Window starts on 3 January: the run is 2–3 January, between 1 and 4 January.
    const plan = planGapFill(observed, '2025-01-03', '2025-01-05');
    expect(plan.filled.map((f) => [f.date, f.temp])).toEqual([['2025-01-03', 14]]);
    expect(planGapFill(observed, '2025-01-01', '2025-01-05', { maxInterpolationDays: 0 }).filled).toEqual([]);
  });

  it('fits the second station by least squares with its RMSE (hand-worked)', () => {
    // x = 0, 10, 20, 30; y = 2, 7, 13, 17. x̄ = 15, ȳ = 9.75, Sxx = 500, Sxy = 255:
    // slope 0.51, intercept 2.1, residuals −0.1, −0.2, 0.7, −0.4, SSE 0.70, RMSE √(0.70/2) = 0.5916.
    const target = [day('2025-02-01', 2), day('2025-02-02', 7), day('2025-02-03', 13), day('2025-02-04', 17)];
    const second = [
      day('2025-02-01', 0),
      day('2025-02-02', 10),
      day('2025-02-03', 20),
      day('2025-02-04', 30),
      day('2025-02-05', 40),
    ];
    const fit = fitStationOffset(target, second)!;
    expect(fit.slope).toBeCloseTo(0.51, 12);
    expect(fit.intercept).toBeCloseTo(2.1, 12);
    expect(fit.rmse).toBeCloseTo(Math.sqrt(0.35), 12);
    expect(fit.overlapDays).toBe(4);
    const plan = planGapFill(target, '2025-02-01', '2025-02-07', {
      secondStation: { label: 'station B', days: second },
      minOverlapDays: 4,
    });
    // 5 February: 2.1 + 0.51·40 = 22.5; 6 February: the second station has no day, left empty.
    expect(plan.filled.map((f) => [f.date, f.method])).toEqual([['2025-02-05', 'second-station']]);
    expect(plan.filled[0]!.temp).toBeCloseTo(22.5, 12);
    expect(plan.filled[0]!.note).toMatch(/^station B: t = 2\.1 \+ 0\.51·t₂ \(RMSE 0\.59 over 4 days\), t₂ = 40$/);
    expect(plan.leftEmpty).toEqual(['2025-02-06']);
    const refused = planGapFill(target, '2025-02-01', '2025-02-07', {
      secondStation: { label: 'station B', days: second },
    });
    expect(refused.offset).toBeNull();
    expect(refused.offsetRefused).toMatch(/shares 4 observed days .* at least 30/);
  });

  it('counts each period’s filled days by method, in words', () => {
    const filled = new Map([
      ['2025-01-02', 'interpolation' as const],
      ['2025-01-03', 'interpolation' as const],
      ['2025-01-20', 'second-station' as const],
      ['2025-03-01', 'interpolation' as const],
    ]);
    const fills = filledDaysByPeriod(
      [
        { start: '2025-01-01', end: '2025-02-01' },
        { start: '2025-02-01', end: '2025-03-01' },
      ],
      filled,
    );
    expect(fills).toEqual([
      {
        start: '2025-01-01',
        end: '2025-02-01',
        days: 31,
        interpolation: 2,
        secondStation: 1,
        summary: '2 of 31 days filled by interpolation, 1 of 31 days filled from a second station',
      },
    ]);
  });
});
