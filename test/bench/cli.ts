/**
 * The command line's whole-process time, measured with /usr/bin/time
 * (elapsed wall clock and peak RSS), median of 5, beside `node -e 0` in the
 * same run (the floor: node starting and stopping):
 *   - `mvledger fit` on 36 monthly bills;
 *   - `mvledger fit` on 1,096 daily readings;
 *   - `mvledger fit --batch` on CLI_BENCH_METERS meters (default 1,000) × 36 bills, one process.
 * Invented data (seeded). Targets (issue): ≤ 250 ms, ≤ 400 ms, batch ≤ 3 s.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { addDays } from '../../src/engine/index.js';
import { seededRandom } from '../../src/lib/seeded-random.js';
import { median } from './timing.js';
import { REPO_ROOT, RESULTS_DIR } from './paths.js';

const REPS = 5;
const BIN = join(REPO_ROOT, 'bin', 'mvledger.js');

/** Elapsed seconds and peak RSS (KiB) of one process, from /usr/bin/time. */
function timed(args: string[]): { seconds: number; rssKb: number } {
  const out = spawnSync('/usr/bin/time', ['-f', 'MVL_TIME %e %M', process.execPath, ...args], {
    encoding: 'utf8',
    stdio: ['ignore', 'ignore', 'pipe'],
    maxBuffer: 1 << 26,
  }).stderr;
  const match = /MVL_TIME ([\d.]+) (\d+)/.exec(out);
  if (!match) throw new Error(`no timing in: ${out.slice(-200)}`);
  return { seconds: Number(match[1]), rssKb: Number(match[2]) };
}

function medianOf(args: string[], reps = REPS): { medianMs: number; rssMb: number; runsMs: number[] } {
  const runs = Array.from({ length: reps }, () => timed(args));
  return {
    medianMs: median(runs.map((r) => r.seconds * 1000)),
    rssMb: median(runs.map((r) => r.rssKb / 1024)),
    runsMs: runs.map((r) => r.seconds * 1000),
  };
}

function main(): void {
  const meters = Number(process.env.CLI_BENCH_METERS ?? 1000);
  const folder = mkdtempSync(join(tmpdir(), 'mvledger-bench-cli-'));
  try {
    const random = seededRandom(36);
    const days = Array.from({ length: 1096 }, (_, d) => addDays('2023-01-01', d));
    const temps = days.map((_, d) => 52 - 22 * Math.cos((2 * Math.PI * (d - 20)) / 365.25) + 5 * random.normal());
    const use = (t: number, scale: number) => scale * (400 + 9 * Math.max(0, 55 - t) + 14 * Math.max(0, t - 68));
    writeFileSync(
      join(folder, 'weather.csv'),
      `date,temp\n${days.map((d, k) => `${d},${temps[k]!.toFixed(1)}`).join('\n')}\n`,
    );
    const bills = (scale: number) => {
      const rows: string[] = [];
      for (let k = 0; k < 36; k++) {
        const start = `${2023 + Math.floor(k / 12)}-${String((k % 12) + 1).padStart(2, '0')}-01`;
        const end = `${2023 + Math.floor((k + 1) / 12)}-${String(((k + 1) % 12) + 1).padStart(2, '0')}-01`;
        let q = 0;
        for (let d = days.indexOf(start); d < days.length && days[d]! < end; d++) q += use(temps[d]!, scale);
        rows.push(`${start},${end},${(q * (1 + 0.03 * random.normal())).toFixed(1)}`);
      }
      return rows;
    };
    writeFileSync(join(folder, 'bills.csv'), `start,end,quantity\n${bills(1).join('\n')}\n`);
    const daily = days.map(
      (d, k) => `${d},${addDays(d, 1)},${(use(temps[k]!, 1) * (1 + 0.05 * random.normal())).toFixed(1)}`,
    );
    writeFileSync(join(folder, 'daily.csv'), `start,end,quantity\n${daily.join('\n')}\n`);
    const batch: string[] = [];
    for (let m = 0; m < meters; m++)
      for (const row of bills(0.5 + random.uniform())) batch.push(`meter-${m + 1},${row}`);
    writeFileSync(join(folder, 'batch.csv'), `meter,start,end,quantity\n${batch.join('\n')}\n`);
    const weather = join(folder, 'weather.csv');

    const floor = medianOf(['-e', '0']);
    const bills36 = medianOf([BIN, 'fit', '--readings', join(folder, 'bills.csv'), '--weather', weather]);
    const daily1096 = medianOf([BIN, 'fit', '--readings', join(folder, 'daily.csv'), '--weather', weather]);
    const floorAgain = medianOf(['-e', '0']);
    const batchRun = medianOf(
      [BIN, 'fit', '--batch', '--readings', join(folder, 'batch.csv'), '--weather', weather],
      1,
    );
    const results = {
      measuredAt: new Date().toISOString(),
      node: process.version,
      load: execFileSync('cat', ['/proc/loadavg'], { encoding: 'utf8' }).trim(),
      nodeE0: floor,
      nodeE0After: floorAgain,
      fit36Bills: bills36,
      fit1096Daily: daily1096,
      batch: { meters, ...batchRun, perMeterMs: batchRun.medianMs / meters },
      targets: { fit36BillsMs: 250, fit1096DailyMs: 400, batchMs: 3000 },
    };
    const ms = (v: number) => `${v.toFixed(0)} ms`;
    console.log(`command line, whole process (/usr/bin/time, median of ${REPS}; load ${results.load}):`);
    console.log(`  node -e 0 (the floor):          ${ms(floor.medianMs)} (again after: ${ms(floorAgain.medianMs)})`);
    console.log(
      `  fit, 36 bills:                  ${ms(bills36.medianMs)} (target 250 ms), ${bills36.rssMb.toFixed(0)} MiB`,
    );
    console.log(
      `  fit, 1,096 daily readings:      ${ms(daily1096.medianMs)} (target 400 ms), ${daily1096.rssMb.toFixed(0)} MiB`,
    );
    console.log(
      `  fit --batch, ${meters} meters × 36 bills: ${ms(batchRun.medianMs)} (one run; target 3,000 ms), ${(batchRun.medianMs / meters).toFixed(1)} ms per meter`,
    );
    mkdirSync(RESULTS_DIR, { recursive: true });
    writeFileSync(join(RESULTS_DIR, 'cli-latest.json'), `${JSON.stringify(results, null, 2)}\n`);
  } finally {
    rmSync(folder, { recursive: true, force: true });
  }
}

main();
