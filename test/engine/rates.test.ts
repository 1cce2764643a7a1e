import { describe, it, expect } from 'vitest';
import { checkRateSchedule, periodRate, rateOn, type RateEntry } from '../../src/engine/rates.js';
import { addDays, daysBetween } from '../../src/engine/dates.js';

// Invented contract rates; every expected value is hand-worked (arithmetic beside it).

const escalating: RateEntry[] = [{ from: '2024-03-01', to: null, price: 0.1, escalation: 0.03 }];

describe('rateOn: price × (1 + escalation)^k, k whole calendar years since from', () => {
  it('steps up on each anniversary (hand-worked: 0.10, 0.10 × 1.03 = 0.103, 0.10 × 1.03² = 0.10609)', () => {
    expect(rateOn(escalating, '2024-03-01')).toBe(0.1);
    expect(rateOn(escalating, '2025-02-28')).toBe(0.1);
    expect(rateOn(escalating, '2025-03-01')).toBeCloseTo(0.103, 15);
    expect(rateOn(escalating, '2026-02-28')).toBeCloseTo(0.103, 15);
    expect(rateOn(escalating, '2026-03-01')).toBeCloseTo(0.10609, 15);
  });

  it('is undefined outside every entry (before the first from, on or after a closing to)', () => {
    expect(rateOn(escalating, '2024-02-29')).toBeUndefined();
    const closed: RateEntry[] = [{ from: '2025-01-01', to: '2025-07-01', price: 0.12, escalation: 0 }];
    expect(rateOn(closed, '2025-06-30')).toBe(0.12);
    expect(rateOn(closed, '2025-07-01')).toBeUndefined();
    expect(rateOn([], '2025-07-01')).toBeUndefined();
  });

  it("counts escalation from each entry's own from (hand-worked: 0.15 from 2025-07-01, × 1.02 from 2026-07-01 = 0.153)", () => {
    const twoEntries: RateEntry[] = [
      { from: '2024-07-01', to: '2025-07-01', price: 0.12, escalation: 0.05 },
      { from: '2025-07-01', to: null, price: 0.15, escalation: 0.02 },
    ];
    expect(rateOn(twoEntries, '2025-06-30')).toBe(0.12);
    expect(rateOn(twoEntries, '2025-07-01')).toBe(0.15);
    expect(rateOn(twoEntries, '2026-07-01')).toBeCloseTo(0.153, 15);
  });

  it('puts the anniversary of a Feb 29 start on Mar 1 in other years, on Feb 29 in leap years (hand-worked: 1.1³ = 1.331, 1.1⁴ = 1.4641)', () => {
    const leap: RateEntry[] = [{ from: '2024-02-29', to: null, price: 1, escalation: 0.1 }];
    expect(rateOn(leap, '2025-02-28')).toBe(1);
    expect(rateOn(leap, '2025-03-01')).toBeCloseTo(1.1, 15);
    expect(rateOn(leap, '2028-02-28')).toBeCloseTo(1.331, 12);
    expect(rateOn(leap, '2028-02-29')).toBeCloseTo(1.4641, 12);
  });

  it('refuses a bad date and a schedule that does not pass checkRateSchedule', () => {
    expect(() => rateOn(escalating, '2025-02-29')).toThrow(RangeError);
    const gap: RateEntry[] = [
      { from: '2025-01-01', to: '2025-02-01', price: 0.1, escalation: 0 },
      { from: '2025-03-01', to: null, price: 0.1, escalation: 0 },
    ];
    expect(() => rateOn(gap, '2025-01-15')).toThrow(/invalid rate schedule.*gap/);
  });
});

describe('periodRate: day-weighted mean over [start, end)', () => {
  it('weights the days either side of an anniversary (hand-worked: 14 days × 0.10 + 14 days × 0.103 = 2.842; / 28 = 0.1015)', () => {
    const result = periodRate(escalating, '2025-02-15', '2025-03-15');
    expect(result.missing).toEqual([]);
    expect(result.rate).toBeCloseTo(0.1015, 15);
  });

  it('weights the days either side of an entry change (hand-worked: 15 × 0.12 + 15 × 0.15 = 4.05; / 30 = 0.135)', () => {
    const schedule: RateEntry[] = [
      { from: '2025-01-01', to: '2025-07-01', price: 0.12, escalation: 0 },
      { from: '2025-07-01', to: null, price: 0.15, escalation: 0.02 },
    ];
    expect(periodRate(schedule, '2025-06-16', '2025-07-16').rate).toBeCloseTo(0.135, 15);
  });

  it("is the entry's rate for a period inside one rate year (hand-worked: 0.103 all 31 days)", () => {
    expect(periodRate(escalating, '2025-05-01', '2025-06-01').rate).toBeCloseTo(0.103, 15);
  });

  it('handles a leap-day anniversary (hand-worked: [2028-02-20, 2028-03-10) = 9 days × 1.331 + 10 days × 1.4641 = 26.62; / 19 = 1.401052…)', () => {
    const leap: RateEntry[] = [{ from: '2024-02-29', to: null, price: 1, escalation: 0.1 }];
    expect(periodRate(leap, '2028-02-20', '2028-03-10').rate).toBeCloseTo(26.62 / 19, 14);
  });

  it('crosses several anniversaries (hand-worked: 365 × (0.10 + 0.103 + 0.10609) = 112.81785; / 1095 = 0.103030…)', () => {
    // [2024-03-01, 2027-03-01): three rate years of 365 days each (none holds a Feb 29: 2024's is before the start)
    const result = periodRate(escalating, '2024-03-01', '2027-03-01');
    expect(daysBetween('2024-03-01', '2027-03-01')).toBe(1095);
    expect(result.rate).toBeCloseTo(112.81785 / 1095, 14);
  });

  it('lists the maximal uncovered ranges, rate null (hand-worked)', () => {
    const closed: RateEntry[] = [{ from: '2025-01-01', to: '2025-07-01', price: 0.12, escalation: 0 }];
    expect(periodRate(closed, '2024-12-20', '2025-07-10')).toEqual({
      rate: null,
      missing: [
        { start: '2024-12-20', end: '2025-01-01' },
        { start: '2025-07-01', end: '2025-07-10' },
      ],
    });
    expect(periodRate(closed, '2025-08-01', '2025-09-01')).toEqual({
      rate: null,
      missing: [{ start: '2025-08-01', end: '2025-09-01' }],
    });
    expect(periodRate([], '2025-08-01', '2025-09-01')).toEqual({
      rate: null,
      missing: [{ start: '2025-08-01', end: '2025-09-01' }],
    });
  });

  it('refuses end ≤ start, bad dates and invalid schedules', () => {
    expect(() => periodRate(escalating, '2025-03-01', '2025-03-01')).toThrow(/no days/);
    expect(() => periodRate(escalating, '2025-03-01', '2025-13-01')).toThrow(RangeError);
    expect(() =>
      periodRate([{ from: '2025-01-01', to: null, price: -1, escalation: 0 }], '2025-03-01', '2025-04-01'),
    ).toThrow(/price/);
  });

  it('equals the mean of rateOn over the days (synthetic: the test sets the schedule)', () => {
    const schedule: RateEntry[] = [
      { from: '2023-11-15', to: '2024-02-29', price: 0.2, escalation: 0.5 },
      { from: '2024-02-29', to: '2026-01-10', price: 0.11, escalation: 0.04 },
      { from: '2026-01-10', to: '2028-03-01', price: 0.13, escalation: -0.02 },
      { from: '2028-03-01', to: null, price: 0.09, escalation: 0.07 },
    ];
    for (const [start, end] of [
      ['2023-11-15', '2030-01-01'],
      ['2024-01-01', '2024-04-01'],
      ['2025-02-01', '2025-03-20'],
      ['2027-12-31', '2028-03-02'],
    ] as const) {
      const days = daysBetween(start, end);
      let sum = 0;
      for (let i = 0; i < days; i++) sum += rateOn(schedule, addDays(start, i))!;
      expect(periodRate(schedule, start, end).rate, `${start}..${end}`).toBeCloseTo(sum / days, 12);
    }
  });

  it('stays cheap for a long schedule (synthetic: 2,000 monthly entries, one query near the end)', () => {
    const schedule: RateEntry[] = [];
    let from = '1900-01-01';
    for (let i = 0; i < 2000; i++) {
      const to = i === 1999 ? null : addDays(from, 30);
      schedule.push({ from, to, price: 0.1 + i * 1e-5, escalation: 0 });
      if (to) from = to;
    }
    const last = schedule[1999]!;
    // The last entry is open-ended; a month inside it has its flat price.
    expect(periodRate(schedule, addDays(last.from, 1), addDays(last.from, 31)).rate).toBeCloseTo(0.1 + 1999e-5, 15);
  });
});

describe('checkRateSchedule', () => {
  it('accepts an empty schedule and a contiguous one ending open', () => {
    expect(checkRateSchedule([])).toEqual([]);
    expect(
      checkRateSchedule([
        { from: '2025-01-01', to: '2025-04-01', price: 0.1, escalation: 0 },
        { from: '2025-04-01', to: '2025-07-01', price: 0, escalation: 1 },
        { from: '2025-07-01', to: null, price: 0.2, escalation: -0.5 },
      ]),
    ).toEqual([]);
  });

  it('names both dates of a gap and both entries', () => {
    const problems = checkRateSchedule([
      { from: '2025-01-01', to: '2025-04-01', price: 0.1, escalation: 0 },
      { from: '2025-04-01', to: '2025-07-01', price: 0.1, escalation: 0 },
      { from: '2025-08-01', to: null, price: 0.1, escalation: 0 },
    ]);
    expect(problems).toEqual([
      {
        index: 2,
        field: 'from',
        message: 'gap: no rate from 2025-07-01 to 2025-08-01 between entries 1 and 2',
        relatedIndex: 1,
      },
    ]);
  });

  it('refuses overlaps, also against a long earlier entry', () => {
    expect(
      checkRateSchedule([
        { from: '2025-01-01', to: '2025-07-01', price: 0.1, escalation: 0 },
        { from: '2025-06-01', to: null, price: 0.1, escalation: 0 },
      ]),
    ).toEqual([{ index: 1, field: 'from', message: 'overlaps entry 0 (2025-01-01..2025-07-01)', relatedIndex: 0 }]);
    const nested = checkRateSchedule([
      { from: '2025-01-01', to: '2025-12-01', price: 0.1, escalation: 0 },
      { from: '2025-02-01', to: '2025-03-01', price: 0.1, escalation: 0 },
      { from: '2025-04-01', to: '2025-05-01', price: 0.1, escalation: 0 },
    ]);
    // Entry 2 overlaps entry 0 (no gap after entry 1: entry 0 still covers April).
    expect(nested.map((p) => [p.index, p.message])).toEqual([
      [1, 'overlaps entry 0 (2025-01-01..2025-12-01)'],
      [2, 'overlaps entry 0 (2025-01-01..2025-12-01)'],
    ]);
  });

  it('refuses entries out of ascending from order', () => {
    const problems = checkRateSchedule([
      { from: '2025-07-01', to: '2026-01-01', price: 0.1, escalation: 0 },
      { from: '2025-01-01', to: '2025-07-01', price: 0.1, escalation: 0 },
    ]);
    expect(problems).toHaveLength(1);
    expect(problems[0]).toMatchObject({ index: 1, field: 'from' });
    expect(problems[0]!.message).toMatch(/ascending order/);
  });

  it('refuses an open-ended entry that is not the last', () => {
    const problems = checkRateSchedule([
      { from: '2025-01-01', to: null, price: 0.1, escalation: 0 },
      { from: '2026-01-01', to: null, price: 0.1, escalation: 0 },
    ]);
    expect(problems.find((p) => p.index === 0)).toMatchObject({
      field: 'to',
      message: expect.stringMatching(/open-ended.*last/),
    });
  });

  it('refuses from ≥ to, bad dates, bad prices and bad escalations', () => {
    const problems = checkRateSchedule([
      { from: '2025-03-01', to: '2025-03-01', price: 0.1, escalation: 0 },
      { from: '2025-02-30', to: '2025-04-01', price: 0.1, escalation: 0 },
      { from: '2025-04-01', to: '2025-5-1', price: 0.1, escalation: 0 },
      { from: '2025-05-01', to: '2025-06-01', price: -0.01, escalation: 0 },
      { from: '2025-06-01', to: '2025-07-01', price: Number.NaN, escalation: 0 },
      { from: '2025-07-01', to: '2025-08-01', price: 0.1, escalation: -1 },
      { from: '2025-08-01', to: '2025-09-01', price: 0.1, escalation: 1.5 },
      { from: '2025-09-01', to: null, price: 0.1, escalation: Number.POSITIVE_INFINITY },
    ]);
    const fields = problems.map((p) => `${p.index}:${p.field}`);
    expect(fields).toEqual(
      expect.arrayContaining([
        '0:to',
        '1:from',
        '2:to',
        '3:price',
        '4:price',
        '5:escalation',
        '6:escalation',
        '7:escalation',
      ]),
    );
    expect(problems.find((p) => p.index === 0)!.message).toBe('to 2025-03-01 is not after from 2025-03-01');
    expect(problems.find((p) => p.index === 3)!.message).toBe('negative (-0.01)');
  });
});
