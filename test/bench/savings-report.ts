/**
 * The savings report's cost, beside the plain way of getting the same
 * figures: the demo district (6 meters, 3 facilities, a contract each)
 * seeded through the API, then
 *   - the report assembled in-process for contract year 1 (12 monthly
 *     periods per meter, guarantees, normalised savings) and for a quarter,
 *     and each rendered as CSV and HTML;
 *   - reference: the six meters' savings computed one by one, as six calls
 *     of GET /v1/meters/{id}/savings would (in-process, same database);
 *   - the report over HTTP (sequential requests, loopback).
 * No target is set by the issue; the figures go to the README.
 */
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import { runDemo } from '../../src/demo/main.js';
import { savingsReport, type ReportQuery } from '../../src/services/reports.js';
import { meterSavings } from '../../src/services/savings.js';
import { renderReportCsv } from '../../src/reports/csv.js';
import { renderReportHtml } from '../../src/reports/html/render-report.js';
import { openStore } from '../../src/store/connect.js';
import { median, quantile } from './timing.js';
import { RESULTS_DIR } from './paths.js';

const REPS = 40;
const WARM_UP = 5;

async function timeAsync(run: () => Promise<unknown>): Promise<number[]> {
  for (let i = 0; i < WARM_UP; i++) await run();
  const times: number[] = [];
  for (let i = 0; i < REPS; i++) {
    const start = performance.now();
    await run();
    times.push(performance.now() - start);
  }
  return times;
}

const summary = (times: number[]) => ({ medianMs: median(times), p90Ms: quantile(times, 0.9) });

async function main(): Promise<void> {
  const folder = mkdtempSync(join(tmpdir(), 'mvledger-bench-report-'));
  const databaseFile = join(folder, 'demo.sqlite');
  const { service, seed, base } = await runDemo({ seedOnly: false, databaseFile, port: 0, print: () => {} });
  const store = openStore(`sqlite:${databaseFile}`);
  try {
    const organisationId = (await store.db.selectFrom('organisations').select('id').executeTakeFirstOrThrow()).id;
    const meterIds = [...seed.facilities.flatMap((f) => f.meters.map((m) => m.id)), seed.calendarCase.meterId];
    const yearQuery: ReportQuery = { contractYear: 1 };
    const quarterQuery: ReportQuery = { quarter: '2025-Q4' };
    const yearReport = await savingsReport(store.db, organisationId, yearQuery);

    const results = {
      meters: meterIds.length,
      contractYear: summary(await timeAsync(() => savingsReport(store.db, organisationId, yearQuery))),
      quarter: summary(await timeAsync(() => savingsReport(store.db, organisationId, quarterQuery))),
      renderCsv: summary(await timeAsync(async () => renderReportCsv(yearReport))),
      renderHtml: summary(await timeAsync(async () => renderReportHtml(yearReport))),
      referenceMeterSavings: summary(
        await timeAsync(async () => {
          for (const id of meterIds)
            await meterSavings(store.db, organisationId, id, { from: '2025-01-01', to: '2026-01-01' });
        }),
      ),
      httpContractYearHtml: summary(
        await timeAsync(async () => {
          const response = await fetch(`${base}/v1/reports/savings?contractYear=1&format=html`, {
            headers: { authorization: `Bearer ${seed.analystKey}` },
          });
          await response.text();
        }),
      ),
    };
    const ratio = results.contractYear.medianMs / results.referenceMeterSavings.medianMs;
    const lines = [
      `savings report, demo district (${results.meters} meters, SQLite, in-process unless said):`,
      `  contract-year report assembled: median ${results.contractYear.medianMs.toFixed(2)} ms (p90 ${results.contractYear.p90Ms.toFixed(2)})`,
      `  quarterly report assembled:     median ${results.quarter.medianMs.toFixed(2)} ms (p90 ${results.quarter.p90Ms.toFixed(2)})`,
      `  rendered as CSV: ${results.renderCsv.medianMs.toFixed(2)} ms; as HTML with charts: ${results.renderHtml.medianMs.toFixed(2)} ms`,
      `  reference, the ${results.meters} meters' savings one by one: median ${results.referenceMeterSavings.medianMs.toFixed(2)} ms (the report costs ${ratio.toFixed(1)}× that: it adds guarantees, rates, normalised savings and the roll-up)`,
      `  over HTTP, contract-year HTML: median ${results.httpContractYearHtml.medianMs.toFixed(2)} ms (p90 ${results.httpContractYearHtml.p90Ms.toFixed(2)})`,
    ];
    process.stdout.write(`${lines.join('\n')}\n`);
    mkdirSync(RESULTS_DIR, { recursive: true });
    writeFileSync(
      join(RESULTS_DIR, 'report-latest.json'),
      `${JSON.stringify({ measuredAt: new Date().toISOString(), node: process.version, ...results, ratioToReference: ratio }, null, 2)}\n`,
    );
  } finally {
    await store.close();
    await service.stop();
    rmSync(folder, { recursive: true, force: true });
  }
}

main().catch((error: unknown) => {
  process.stderr.write(`${error instanceof Error ? (error.stack ?? error.message) : String(error)}\n`);
  process.exit(1);
});
