/**
 * Engine benchmark: `npm run bench`.
 *
 * On invented, seeded data (synthetic-building.ts) it measures
 *   1. choosing among the six shapes on 36 monthly periods,
 *   2. the same on 1,096 daily periods (exact 5P included),
 *   3. refitting 10,000 different monthly meters, with heap growth,
 *   4. the exact changepoint search against the plain 0.1° grid search,
 *   5. the day-resolved fits of 36 bills against ~1,100 days of weather, in
 *      both temperature forms and against a plain 0.05° grid
 *      (day-resolved-comparison.ts),
 * prints the figures beside their targets (PASS/MISS, never a throw) and
 * writes a small record to test/bench/results/engine-latest.json.
 * ENGINE_BENCH_ONLY=day-resolved runs section 5 alone and updates only its
 * part of that file (`dayResolved` and its targets).
 */
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join, relative } from 'node:path';
import { cpus, loadavg } from 'node:os';
import { deepStrictEqual } from 'node:assert/strict';
import { performance } from 'node:perf_hooks';
import {
  alignPeriods,
  chooseBaseline,
  fitShape,
  MODEL_NAMES,
  type ModelName,
  type Period,
} from '../../src/engine/index.js';
import { BENCH_BUILDING, dailyMeter, monthlyMeter, variedBuilding } from './synthetic-building.js';
import { collectGarbage, heapUsedMb, median, quantile, timeEach } from './timing.js';
import {
  GRID_STEP,
  HINGE_SHAPES,
  SSE_RELATIVE_TOLERANCE,
  compareByMedian,
  compareByOneRun,
  compareFivePointWithinBudget,
  exactSide,
  type ShapeComparison,
} from './grid-comparison.js';
import { changepoints, count, ms, round, sse, table, targetLine, times, verdict, type TargetResult } from './report.js';
import { runDayResolvedSection } from './day-resolved-comparison.js';
import { RESULTS_DIR, RUNTIME } from './paths.js';

const SETTINGS = {
  monthlySeed: 20_210_105,
  dailySeed: 20_200_101,
  refitFirstSeed: 1_000_000,
  refitMeters: 10_000,
  monthlyRuns: 2_000,
  monthlyWarmUp: 200,
  dailyRuns: 30,
  dailyWarmUp: 3,
  gridMonthlyRuns: { '3PC': 20, '3PH': 20, '4P': 20, '5P': 5 } as Record<string, number>,
  gridMonthlyWarmUp: 1,
  dailyFivePointGridBudgetMs: 60_000,
  // The project's own performance targets (not from a standard).
  targets: { monthlyMs: 1, dailyMs: 50, gridSpeedup: 20 },
};

const startedAt = performance.now();
const loadAtStart = loadavg();
const targets: TargetResult[] = [];
const say = (text = ''): void => console.log(text);
/** Megabytes to one decimal, without a "-0.0". */
const mb = (value: number): string => (Math.abs(value) < 0.05 ? '0.0' : value.toFixed(1));

function checkTarget(result: TargetResult): void {
  targets.push(result);
  say(targetLine(result));
}

const targetRecord = (t: TargetResult) => ({
  name: t.name,
  target: t.target,
  measured: t.measured,
  result: verdict(t.pass),
  ...(t.caveat ? { caveat: t.caveat } : {}),
});
const resultsFile = join(RESULTS_DIR, 'engine-latest.json');

const onlySection = process.env.ENGINE_BENCH_ONLY;
if (onlySection !== undefined && onlySection !== 'day-resolved') {
  throw new Error(
    `ENGINE_BENCH_ONLY: unknown section "${onlySection}" (the one section that runs alone is "day-resolved")`,
  );
}
if (onlySection === 'day-resolved') {
  runDayResolvedAlone();
  process.exit(0);
}

/**
 * Section 5 alone: the other sections' figures in engine-latest.json stay as
 * the last full run left them; `dayResolved` and its targets are replaced.
 */
function runDayResolvedAlone(): void {
  const cpu = cpus();
  say(
    'Engine benchmark, section 5 only (ENGINE_BENCH_ONLY=day-resolved; invented, seeded data; medians of individually timed runs)',
  );
  say(
    `  node ${process.version}, ${cpu[0]?.model ?? 'unknown CPU'} × ${cpu.length}, load average at start ${loadAtStart.map((v) => v.toFixed(2)).join(' ')}`,
  );
  say();
  const section = runDayResolvedSection(say, checkTarget);
  const loadAtEnd = loadavg();
  say(`  load average at end ${loadAtEnd.map((v) => v.toFixed(2)).join(' ')}`);
  const previous = existsSync(resultsFile)
    ? (JSON.parse(readFileSync(resultsFile, 'utf8')) as Record<string, unknown>)
    : { benchmark: 'engine', command: 'npm run bench' };
  const names = new Set(section.targets.map((t) => t.name));
  const kept = Array.isArray(previous.targets)
    ? (previous.targets as { name?: string }[]).filter((t) => !names.has(t.name ?? ''))
    : [];
  const merged: Record<string, unknown> = { ...previous };
  delete merged.targets;
  delete merged.runtimeSeconds;
  merged.dayResolved = {
    ...section.record,
    ranAlone: {
      ranAt: new Date().toISOString(),
      loadAverageAtStart: loadAtStart.map((v) => v.toFixed(2)).join(' '),
      loadAverageAtEnd: loadAtEnd.map((v) => v.toFixed(2)).join(' '),
    },
  };
  merged.targets = [...kept, ...section.targets.map(targetRecord)];
  if (previous.runtimeSeconds !== undefined) merged.runtimeSeconds = previous.runtimeSeconds;
  mkdirSync(RESULTS_DIR, { recursive: true });
  writeFileSync(resultsFile, `${JSON.stringify(merged, null, 2)}\n`);
  say(`  updated dayResolved in ${relative(process.cwd(), resultsFile)}`);
}

// ---- data -----------------------------------------------------------------

const monthly = monthlyMeter(SETTINGS.monthlySeed, { keepRawData: true });
const daily = dailyMeter(SETTINGS.dailySeed, { keepRawData: true });
// The bench builds Periods itself (fast, for 10,000 meters); confirm they are what alignPeriods makes,
// apart from the days' temperatures, which these periods leave out: sections 1–4 fit in the mean form
// (for the one-day periods of 2 and 4 both forms are the same fit); section 5 measures the day-resolved form.
const withoutDays = (periods: readonly Period[]): Period[] =>
  periods.map((period) => {
    const copy = { ...period };
    delete copy.dayTemps;
    return copy;
  });
deepStrictEqual(withoutDays(alignPeriods(monthly.readings!, monthly.weather!).periods), monthly.periods);
deepStrictEqual(withoutDays(alignPeriods(daily.readings!, daily.weather!).periods), daily.periods);

const cpuList = cpus();
say('Engine benchmark (invented, seeded data; medians of individually timed runs)');
say(
  `  node ${process.version}, ${cpuList[0]?.model ?? 'unknown CPU'} × ${cpuList.length}, load average at start ${loadAtStart.map((v) => v.toFixed(2)).join(' ')}`,
);
say(`  runs: ${RUNTIME}`);
const b = BENCH_BUILDING;
say(
  `  invented building: flat ${b.baseUsePerDay} kWh/day; heating ${b.heatingSlope} kWh/day per °F below ${b.heatingChangepoint} °F; ` +
    `cooling ${b.coolingSlope} kWh/day per °F above ${b.coolingChangepoint} °F; day-to-day noise ${b.dailyNoise} kWh/day; continuous temperatures`,
);
say();

// ---- 1 and 2: choose among six shapes ---------------------------------------

interface ChoiceFigures {
  periods: number;
  runs: number;
  medianMs: number;
  p90Ms: number;
  /** Sum of the six fitShape medians: the rest of the choice is screening and F-tests. */
  sixFitsMs: number;
  fitMs: Record<ModelName, number>;
  selected: ModelName;
}

/** Choice and the six single fits timed in the same loop, so both see the same machine conditions. */
function measureChoice(periods: readonly Period[], runs: number, warmUp: number): ChoiceFigures {
  const choiceTimes: number[] = [];
  const fitTimes = Object.fromEntries(MODEL_NAMES.map((model) => [model, [] as number[]])) as Record<
    ModelName,
    number[]
  >;
  for (let i = 0; i < warmUp + runs; i++) {
    const kept = i >= warmUp;
    const [choiceMs] = timeEach(() => chooseBaseline(periods), 1, 0);
    if (kept) choiceTimes.push(choiceMs!);
    for (const model of MODEL_NAMES) {
      const [fitMs] = timeEach(() => fitShape(periods, model, 3), 1, 0);
      if (kept) fitTimes[model].push(fitMs!);
    }
  }
  const fitMs = Object.fromEntries(MODEL_NAMES.map((model) => [model, median(fitTimes[model])])) as Record<
    ModelName,
    number
  >;
  return {
    periods: periods.length,
    runs,
    medianMs: median(choiceTimes),
    p90Ms: quantile(choiceTimes, 0.9),
    sixFitsMs: MODEL_NAMES.reduce((sum, model) => sum + fitMs[model], 0),
    fitMs,
    selected: chooseBaseline(periods).selected,
  };
}

function printChoice(figures: ChoiceFigures): void {
  say(`  median ${ms(figures.medianMs)} per meter (p90 ${ms(figures.p90Ms)}); selected shape: ${figures.selected}`);
  const perShape = MODEL_NAMES.map((model) => `${model} ${ms(figures.fitMs[model])}`).join(', ');
  say(`  fitShape alone, median each (timed in the same loop): ${perShape}`);
  say(
    `  six fits together ${ms(figures.sixFitsMs)}; the rest of the choice (screening, t and F tests, reasons; difference of medians) ≈ ${ms(Math.max(0, figures.medianMs - figures.sixFitsMs))}`,
  );
}

say(
  `1) Choose among all six shapes, ${monthly.periods.length} monthly periods (${count(SETTINGS.monthlyRuns)} runs after ${SETTINGS.monthlyWarmUp} warm-up)`,
);
const monthlyChoice = measureChoice(monthly.periods, SETTINGS.monthlyRuns, SETTINGS.monthlyWarmUp);
printChoice(monthlyChoice);
checkTarget({
  name: 'monthly choice',
  target: `≤ ${SETTINGS.targets.monthlyMs} ms per 36-period meter, all shapes`,
  measured: ms(monthlyChoice.medianMs),
  pass: monthlyChoice.medianMs <= SETTINGS.targets.monthlyMs,
});
say();

say(
  `2) Choose among all six shapes, ${count(daily.periods.length)} daily periods (${SETTINGS.dailyRuns} runs after ${SETTINGS.dailyWarmUp} warm-up)`,
);
const dailyChoice = measureChoice(daily.periods, SETTINGS.dailyRuns, SETTINGS.dailyWarmUp);
printChoice(dailyChoice);
checkTarget({
  name: 'daily choice',
  target: `≤ ${SETTINGS.targets.dailyMs} ms for 1,096 daily periods incl. exact 5P`,
  measured: ms(dailyChoice.medianMs),
  pass: dailyChoice.medianMs <= SETTINGS.targets.dailyMs,
});
say();

// ---- 3: refit 10,000 meters -------------------------------------------------

say(
  `3) Refit ${count(SETTINGS.refitMeters)} monthly 36-period meters, different seeded data each (building varied ±2 °F, ×0.8–1.2)`,
);
const meters: Period[][] = [];
for (let i = 0; i < SETTINGS.refitMeters; i++) {
  const seed = SETTINGS.refitFirstSeed + i;
  meters.push(monthlyMeter(seed, { building: variedBuilding(seed) }).periods);
}
const selectedCounts: Partial<Record<ModelName, number>> = {};
const refitTimes = new Float64Array(SETTINGS.refitMeters);
collectGarbage();
const heapBefore = heapUsedMb();
let heapPeak = heapBefore;
const refitStart = performance.now();
for (let i = 0; i < meters.length; i++) {
  const start = performance.now();
  const selected = chooseBaseline(meters[i]!).selected; // only the shape is kept: a refit job would store and drop each result
  refitTimes[i] = performance.now() - start;
  selectedCounts[selected] = (selectedCounts[selected] ?? 0) + 1;
  if (i % 500 === 499) heapPeak = Math.max(heapPeak, heapUsedMb());
}
const refitTotalMs = performance.now() - refitStart;
const heapAfter = heapUsedMb();
collectGarbage();
const heapAfterGc = heapUsedMb();
const refitList = Array.from(refitTimes);
const refit = {
  meters: SETTINGS.refitMeters,
  totalMs: refitTotalMs,
  medianMs: median(refitList),
  p90Ms: quantile(refitList, 0.9),
  maxMs: Math.max(...refitList),
  selectedCounts,
  heapMb: {
    before: heapBefore,
    afterNoGc: heapAfter,
    sampledPeak: Math.max(heapPeak, heapAfter),
    afterGc: heapAfterGc,
  },
};
say(
  `  total ${ms(refit.totalMs)}; median ${ms(refit.medianMs)} per meter (p90 ${ms(refit.p90Ms)}, slowest ${ms(refit.maxMs)})`,
);
say(
  `  selected shapes: ${MODEL_NAMES.filter((m) => selectedCounts[m])
    .map((m) => `${m} ${count(selectedCounts[m]!)}`)
    .join(', ')}`,
);
say(
  `  heapUsed: ${mb(refit.heapMb.before)} MB before (after GC, input data already built) -> ${mb(refit.heapMb.afterNoGc)} MB right after ` +
    `(growth ${mb(refit.heapMb.afterNoGc - refit.heapMb.before)} MB, garbage not yet collected; sampled peak ${mb(refit.heapMb.sampledPeak)} MB) -> ` +
    `${mb(refit.heapMb.afterGc)} MB after GC (retained growth ${mb(refit.heapMb.afterGc - refit.heapMb.before)} MB)`,
);
checkTarget({
  name: 'refit per meter',
  target: `≤ ${SETTINGS.targets.monthlyMs} ms per 36-period meter, all shapes`,
  measured: ms(refit.medianMs),
  pass: refit.medianMs <= SETTINGS.targets.monthlyMs,
});
meters.length = 0;
say();

// ---- 4 and 5: exact against the grid ---------------------------------------

interface GridFigures {
  shapes: ShapeComparison[];
  exactChoiceMs: number;
  gridTotalMs: number;
  wholeRatio: number;
}

function printComparison(figures: GridFigures): void {
  const rows = figures.shapes.map((c) => [
    c.shape,
    ms(c.exactMedianMs),
    `${ms(c.gridMs)}${c.gridTiming === 'estimate' ? ' (estimate)' : ''}`,
    c.gridTiming === 'median' ? `median of ${c.gridRuns}` : c.gridTiming,
    count(c.gridPoints),
    times(c.ratio),
    sse(c.exactSse),
    sse(c.gridSse),
    c.exactNotWorse ? 'yes' : 'no',
    changepoints(c.exactChangepoints),
    changepoints(c.gridChangepoints),
  ]);
  say(
    table(
      [
        'shape',
        'exact',
        'grid',
        'grid timing',
        'grid pts',
        'grid/exact',
        'exact SSE',
        'grid SSE',
        'exact ≤ grid',
        'exact changepoint(s) °F',
        'grid changepoint(s) °F',
      ],
      rows,
      [false, true, true, false, true, true, true, true, false, false, false],
    ),
  );
  for (const c of figures.shapes) if (c.note) say(`  ${c.shape}: ${c.note}`);
  say(
    `  whole choice: exact chooseBaseline (all six shapes, screening, F-tests) ${ms(figures.exactChoiceMs)} vs grid search of the four changepoint shapes ` +
      `${ms(figures.gridTotalMs)} -> ${times(figures.wholeRatio)}`,
  );
}

function gridTarget(label: string, figures: GridFigures): void {
  const slowest = figures.shapes.reduce((worst, c) => (c.ratio < worst.ratio ? c : worst));
  const sseOk = figures.shapes.every((c) => c.exactNotWorse);
  const estimated = figures.shapes.filter((c) => c.gridTiming === 'estimate').map((c) => c.shape);
  checkTarget({
    name: `grid speed-up, ${label}`,
    target: `≥ ${SETTINGS.targets.gridSpeedup}× faster than the 0.1° grid at equal or lower SSE (every shape and the whole choice)`,
    measured: `lowest per-shape ${times(slowest.ratio)} (${slowest.shape}), whole ${times(figures.wholeRatio)}, exact ≤ grid for every shape: ${sseOk ? 'yes' : 'no'}`,
    pass: slowest.ratio >= SETTINGS.targets.gridSpeedup && figures.wholeRatio >= SETTINGS.targets.gridSpeedup && sseOk,
    ...(estimated.length > 0 ? { caveat: `grid time of ${estimated.join(', ')} is an estimate` } : {}),
  });
}

say(
  `4) Exact changepoint search vs. plain grid search at ${GRID_STEP}° steps (test/support/grid-search.ts: weighted least squares refitted at every grid point)`,
);
say(
  '   exact = median of the public fitShape from 1) and 2) (search + regression + statistics); grid = the changepoint search only; both keep ≥ 3 points per segment.',
);
say(`   SSE = Σ days·(use per day − fitted)²; "exact ≤ grid" allows a relative rounding of ${SSE_RELATIVE_TOLERANCE}.`);
say(
  `  ${monthly.periods.length} monthly periods (grid: median of the runs shown, after ${SETTINGS.gridMonthlyWarmUp} warm-up)`,
);
const monthlyGrid: GridFigures = (() => {
  const shapes = HINGE_SHAPES.map((shape) =>
    compareByMedian(
      monthly.periods,
      shape,
      exactSide(monthly.periods, shape, monthlyChoice.fitMs[shape], monthlyChoice.runs),
      SETTINGS.gridMonthlyRuns[shape]!,
      SETTINGS.gridMonthlyWarmUp,
    ),
  );
  const gridTotalMs = shapes.reduce((sum, c) => sum + c.gridMs, 0);
  return {
    shapes,
    exactChoiceMs: monthlyChoice.medianMs,
    gridTotalMs,
    wholeRatio: gridTotalMs / monthlyChoice.medianMs,
  };
})();
printComparison(monthlyGrid);
gridTarget('36 monthly periods', monthlyGrid);
say();

say(`  ${count(daily.periods.length)} daily periods (grid: one run per shape)`);
const dailyGrid: GridFigures = (() => {
  const shapes = HINGE_SHAPES.map((shape) => {
    const exact = exactSide(daily.periods, shape, dailyChoice.fitMs[shape], dailyChoice.runs);
    return shape === '5P'
      ? compareFivePointWithinBudget(daily.periods, exact, SETTINGS.dailyFivePointGridBudgetMs)
      : compareByOneRun(daily.periods, shape, exact);
  });
  const gridTotalMs = shapes.reduce((sum, c) => sum + c.gridMs, 0);
  return { shapes, exactChoiceMs: dailyChoice.medianMs, gridTotalMs, wholeRatio: gridTotalMs / dailyChoice.medianMs };
})();
printComparison(dailyGrid);
gridTarget('1,096 daily periods', dailyGrid);
say();

// ---- 5: the day-resolved fits ------------------------------------------------

const dayResolved = runDayResolvedSection(say, checkTarget);
say();

// ---- summary and record -----------------------------------------------------

const loadAtEnd = loadavg();
const runtimeS = (performance.now() - startedAt) / 1000;
say('Targets');
say(
  table(
    ['target', 'measured', 'result'],
    targets.map((t) => [`${t.name}: ${t.target}`, t.measured, `${verdict(t.pass)}${t.caveat ? ` (${t.caveat})` : ''}`]),
  ),
);
say(`  bench runtime ${runtimeS.toFixed(0)} s; load average at end ${loadAtEnd.map((v) => v.toFixed(2)).join(' ')}`);

const shapeRecord = (c: ShapeComparison) => ({
  shape: c.shape,
  exactMedianMs: round(c.exactMedianMs),
  gridMs: round(c.gridMs),
  gridTiming: c.gridTiming,
  gridRuns: c.gridRuns,
  gridPoints: c.gridPoints,
  ratio: round(c.ratio, 3),
  exactSse: round(c.exactSse, 10),
  gridSse: round(c.gridSse, 10),
  exactNotWorse: c.exactNotWorse,
  exactChangepoints: c.exactChangepoints.map((v) => (v === null ? null : round(v, 6))),
  gridChangepoints: c.gridChangepoints.map((v) => (v === null ? null : round(v, 6))),
  ...(c.note ? { note: c.note } : {}),
});
const choiceRecord = (f: ChoiceFigures) => ({
  periods: f.periods,
  runs: f.runs,
  medianMs: round(f.medianMs),
  p90Ms: round(f.p90Ms),
  sixFitsMs: round(f.sixFitsMs),
  fitShapeMedianMs: Object.fromEntries(MODEL_NAMES.map((m) => [m, round(f.fitMs[m])])),
  selected: f.selected,
});
const gridRecord = (f: GridFigures) => ({
  shapes: f.shapes.map(shapeRecord),
  exactChoiceMs: round(f.exactChoiceMs),
  gridFourShapesMs: round(f.gridTotalMs),
  wholeRatio: round(f.wholeRatio, 3),
});
const record = {
  benchmark: 'engine',
  command: 'npm run bench',
  ranAt: new Date().toISOString(),
  machine: {
    node: process.version,
    cpu: cpuList[0]?.model ?? 'unknown',
    cores: cpuList.length,
    loadAverageAtStart: loadAtStart.map((v) => v.toFixed(2)).join(' '),
    loadAverageAtEnd: loadAtEnd.map((v) => v.toFixed(2)).join(' '),
    runs: RUNTIME,
  },
  data: {
    note: 'invented building and climate from a seeded generator (test/bench/synthetic-building.ts)',
    building: BENCH_BUILDING,
    seeds: { monthly: SETTINGS.monthlySeed, daily: SETTINGS.dailySeed, refitFirst: SETTINGS.refitFirstSeed },
    gridStepDegrees: GRID_STEP,
    minPointsPerSegment: 3,
  },
  monthlyChoice: choiceRecord(monthlyChoice),
  dailyChoice: choiceRecord(dailyChoice),
  refit: {
    meters: refit.meters,
    totalMs: round(refit.totalMs),
    medianMs: round(refit.medianMs),
    p90Ms: round(refit.p90Ms),
    maxMs: round(refit.maxMs),
    selectedCounts: refit.selectedCounts,
    heapUsedMb: {
      before: round(refit.heapMb.before),
      afterNoGc: round(refit.heapMb.afterNoGc),
      sampledPeak: round(refit.heapMb.sampledPeak),
      afterGc: round(refit.heapMb.afterGc),
      growthNoGc: round(refit.heapMb.afterNoGc - refit.heapMb.before),
      retainedGrowth: round(refit.heapMb.afterGc - refit.heapMb.before),
    },
  },
  gridComparison: { monthly: gridRecord(monthlyGrid), daily: gridRecord(dailyGrid) },
  dayResolved: dayResolved.record,
  targets: targets.map(targetRecord),
  runtimeSeconds: round(runtimeS, 3),
};
mkdirSync(RESULTS_DIR, { recursive: true });
writeFileSync(resultsFile, `${JSON.stringify(record, null, 2)}\n`);
say(`  wrote ${relative(process.cwd(), resultsFile)}`);
