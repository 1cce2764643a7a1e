/**
 * The streamed report against the whole-document report on the same small
 * organisation (this file runs on SQLite and on PostgreSQL): the same
 * portfolio and facility totals, meters, guarantees, notices and baselines,
 * the CSV's rows the same rows in the stated order, and a content hash
 * that is the SHA-256 of the bytes before it. Synthetic: a seeded
 * generated portfolio with one adjustment, one meter without rates and one
 * without a frozen baseline planted, so the test sets what each path meets.
 */
import { createHash } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { renderReportCsv } from '../../src/reports/csv.js';
import type { SavingsReport } from '../../src/reports/savings-report.js';
import { checkStreamedReport, streamSavingsReport, type StreamFormat } from '../../src/services/report-stream.js';
import { forgetFrozenModels } from '../../src/services/frozen-models.js';
import { savingsReport, type ReportQuery } from '../../src/services/reports.js';
import type { Store } from '../../src/store/connect.js';
import { openGeneratedPortfolio, type GeneratedPortfolioStore } from '../support/generated-portfolio.js';

let portfolio: GeneratedPortfolioStore;
let store: Store;
let organisationId: string;

beforeAll(async () => {
  portfolio = await openGeneratedPortfolio({
    facilities: 5,
    metersPerFacility: 3,
    stations: 2,
    archetypesPerStation: 2,
    seed: 11,
  });
  ({ store, organisationId } = portfolio);
  const meters = await store.db.selectFrom('meters').select(['id']).orderBy('created_at').execute();
  // An adjustment on the second meter, no rate on the fourth, no frozen baseline on the seventh.
  await store.db
    .insertInto('adjustments')
    .values({
      id: 'adj_planted',
      organisation_id: organisationId,
      meter_id: meters[1]!.id,
      period_start: '2025-07-01',
      period_end: '2025-09-01',
      quantity: 1200,
      per_day: null,
      reason: 'invented: a wing closed for works',
      created_at: '2026-01-16T00:00:00.000Z',
      created_by: 'key_test',
      withdrawn_at: null,
      withdrawn_by: null,
      withdraw_reason: null,
      uncertainty: 150,
    })
    .execute();
  await store.db.deleteFrom('rates').where('meter_id', '=', meters[3]!.id).execute();
  const unfrozen = store.db.selectFrom('baselines').select('id').where('meter_id', '=', meters[6]!.id);
  await store.db.deleteFrom('frozen_models').where('baseline_id', 'in', unfrozen).execute();
  await store.db.deleteFrom('baselines').where('meter_id', '=', meters[6]!.id).execute();
  // Filled days at the first meter's station: one in the baseline, two in the reporting quarter.
  const station = await store.db
    .selectFrom('meters')
    .select('weather_station_id')
    .where('id', '=', meters[0]!.id)
    .executeTakeFirstOrThrow();
  await store.db
    .updateTable('weather_observations')
    .set({ fill_method: 'interpolation', fill_note: 'synthetic: planted by the test' })
    .where('station_id', '=', station.weather_station_id)
    .where('date', 'in', ['2024-02-10', '2025-08-10', '2025-08-11'])
    .execute();
}, 120_000);

afterAll(async () => portfolio.close());

async function streamed(query: ReportQuery, format: StreamFormat, chunk: number): Promise<string> {
  let text = '';
  await streamSavingsReport(
    store.db,
    organisationId,
    query,
    format,
    (piece) => {
      text += piece;
    },
    chunk,
  );
  return text;
}

/** The whole report's facilities as the stream writes them: chart points left out. */
function withoutCharts(report: SavingsReport): SavingsReport['facilities'] {
  return report.facilities.map((f) => ({ ...f, meters: f.meters.map((m) => ({ ...m, signature: null })) }));
}

describe.each([
  ['quarter 2025-Q3', { quarter: '2025-Q3' }],
  ['contract year 1', { contractYear: 1 }],
] as [string, ReportQuery][])('the streamed report, %s', (_label, query) => {
  it('JSON: every total, facility, meter, notice and baseline equals the whole report’s (two facilities per chunk)', async () => {
    const whole = await savingsReport(store.db, organisationId, query);
    const text = await streamed(query, 'json', 2);
    const doc = JSON.parse(text) as SavingsReport & { streamed: boolean };
    expect(doc.streamed).toBe(true);
    expect(doc.portfolio).toEqual(whole.portfolio);
    expect(doc.portfolio.meters).toBe(15);
    expect(doc.facilities).toEqual(withoutCharts(whole));
    for (const key of [
      'organisation',
      'window',
      'confidence',
      'confidenceSource',
      'dataAsOf',
      'rollup',
      'method',
      'baselines',
      'normalYears',
      'unitFactors',
      'unitFactorSource',
      'notices',
      'caution',
    ] as const)
      expect(doc[key], key).toEqual(whole[key]);
    // The planted paths are there: a meter without a frozen baseline, one without rates, the adjustment applied.
    expect(
      doc.notices.some((n) =>
        n.includes('no data in this window, left out of the sums: the meter has no frozen baseline'),
      ),
    ).toBe(true);
    expect(doc.notices.some((n) => n.includes('no contract rates'))).toBe(true);
    expect(doc.facilities.flatMap((f) => f.meters).some((m) => m.adjustments.some((a) => a.id === 'adj_planted'))).toBe(
      true,
    );
    // The planted filled days: named in the reporting periods and beside the baseline.
    const meters = doc.facilities.flatMap((f) => f.meters);
    expect(meters.some((m) => m.weatherFills.length > 0)).toBe(true);
    expect(meters.some((m) => m.notes.some((n) => n.startsWith('baseline weather:')))).toBe(true);
    const before = text.slice(0, text.lastIndexOf('"contentHash":'));
    expect(doc.contentHash).toBe(createHash('sha256').update(before, 'utf8').digest('hex'));
  });

  it('the chunk size changes nothing: one chunk and one facility per chunk give the same bytes', async () => {
    expect(await streamed(query, 'json', 1)).toBe(await streamed(query, 'json', 100));
  });

  it('the stored compact models change nothing: the same bytes when every model is derived from its baseline’s content', async () => {
    forgetFrozenModels();
    const fromStored = await streamed(query, 'json', 100);
    const stored = await store.db.selectFrom('frozen_models').selectAll().execute();
    expect(stored.length).toBe(14); // every frozen baseline of the fifteen meters but the one planted without
    await store.db.deleteFrom('frozen_models').execute();
    forgetFrozenModels();
    try {
      expect(await streamed(query, 'json', 100)).toBe(fromStored);
    } finally {
      await store.db.insertInto('frozen_models').values(stored).execute();
      forgetFrozenModels();
    }
  });

  it('CSV: the whole report’s rows, facilities first and the portfolio after them, ending with the digest', async () => {
    const whole = renderReportCsv(await savingsReport(store.db, organisationId, query))
      .trimEnd()
      .split('\r\n');
    const text = await streamed(query, 'csv', 2);
    const lines = text.trimEnd().split('\r\n');
    expect(lines[0]).toBe(whole[0]);
    const body = (rows: string[]) => rows.slice(1).filter((l) => !l.startsWith('report,') && !l.startsWith('digest,'));
    const kind = (l: string) => l.split(',')[0];
    const wholeBody = body(whole);
    const streamBody = body(lines);
    // Same rows; the portfolio's rows move from the top to after the last facility.
    expect([...streamBody].sort()).toEqual([...wholeBody].sort());
    expect(streamBody.filter((l) => kind(l) !== 'portfolio')).toEqual(wholeBody.filter((l) => kind(l) !== 'portfolio'));
    const firstNotice = streamBody.findIndex((l) => kind(l) === 'notice' || kind(l) === 'caution');
    expect(streamBody.slice(firstNotice - 3, firstNotice).every((l) => kind(l) === 'portfolio')).toBe(true);
    const last = lines[lines.length - 1]!;
    expect(last).toMatch(/^digest,/);
    const digest = /content hash ([0-9a-f]{64})/.exec(last)![1];
    expect(digest).toBe(
      createHash('sha256')
        .update(text.slice(0, text.lastIndexOf('digest,')), 'utf8')
        .digest('hex'),
    );
  });
});

describe('checkStreamedReport', () => {
  it('refuses a window with no reporting readings before anything is written (422), as the whole report does', async () => {
    await expect(checkStreamedReport(store.db, organisationId, { quarter: '2031-Q1' })).rejects.toMatchObject({
      kind: 'unprocessable',
    });
    await expect(savingsReport(store.db, organisationId, { quarter: '2031-Q1' })).rejects.toMatchObject({
      kind: 'unprocessable',
    });
    await expect(checkStreamedReport(store.db, organisationId, { quarter: '2025-Q3' })).resolves.toBeUndefined();
  });
});
