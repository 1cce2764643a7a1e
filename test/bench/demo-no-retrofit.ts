/**
 * The demo district's frozen models on a reporting year with NO retrofit:
 * every "saving" they show is the method's own error. With the demo's own
 * invented generator (src/demo/scenario.ts: the same weather and, for the
 * demo's own figures, the same bill seeds as `npm run demo`), each meter's
 * baseline is fitted in both temperature forms and projected onto 2025 bills
 * drawn with no saving and no non-routine change. Then the same over further
 * bill-noise seeds, for the mean false saving per meter.
 *
 *   npx tsx test/bench/demo-no-retrofit.ts
 *
 * Not part of `npm run bench` or the tests: a measurement for the README's
 * caution. Invented data throughout.
 */
import {
  analyseBaseline,
  savingsFromFit,
  type DailyTemperature,
  type TemperatureForm,
} from '../../src/engine/index.js';
import {
  BASELINE_END,
  BASELINE_START,
  DEMO_FACILITIES,
  REPORTING_END,
  demoBills,
  demoWeather,
} from '../../src/demo/scenario.js';

const FORMS: readonly TemperatureForm[] = ['mean', 'daily'];
const EXTRA_SEEDS = 40;

interface Outcome {
  fraction: number;
  /** The larger of the model's two ± at 68%, as a share of the adjusted baseline. */
  band: number;
  model: string;
}

function noRetrofitYear(
  meterIndex: number,
  form: TemperatureForm,
  baselineSeed: number,
  reportingSeed: number,
  weather: readonly DailyTemperature[],
  byDate: ReadonlyMap<string, number>,
): Outcome {
  const plan = DEMO_FACILITIES.flatMap((f) => f.meters)[meterIndex]!;
  const baseline = demoBills(plan, byDate, BASELINE_START, BASELINE_END, 0, baselineSeed);
  const reporting = demoBills(plan, byDate, BASELINE_END, REPORTING_END, 0, reportingSeed); // saving 0: no retrofit, no change
  const analysis = analyseBaseline(baseline, weather, { temperatureForm: form });
  const fit = analysis.choice.candidates.find((c) => c.model === analysis.choice.selected)!.fit!;
  const savings = savingsFromFit(
    fit,
    { limits: analysis.choice.settings.guideline14, excluded: analysis.excluded },
    reporting,
    weather,
    {
      confidence: 0.68,
    },
  );
  const t = savings.totals;
  return {
    fraction: t.fractionSaved,
    band: Math.max(t.uncertainty.guideline14.absolute, t.uncertainty.exact.absolute) / t.adjustedBaseline,
    model: fit.model,
  };
}

const pct = (value: number) => `${value >= 0 ? '+' : '−'}${Math.abs(value * 100).toFixed(2)}%`;

const weather = demoWeather();
const byDate = new Map(weather.map((d) => [d.date, d.temp]));
const meters = DEMO_FACILITIES.flatMap((f) => f.meters.map((m) => `${f.name}, ${m.name}`));

console.log(
  'The demo district on a 2025 with no retrofit: "savings" of each frozen model (± at 68%, the larger of the two formulas)\n',
);
for (const form of FORMS) {
  console.log(`${form === 'daily' ? 'Day-resolved' : 'Mean'} form, the demo's own bills (npm run demo's seeds):`);
  let beyond = 0;
  meters.forEach((name, i) => {
    // npm run demo draws meter i's baseline with seed 2i + 1 and its reporting year with 2i + 2.
    const o = noRetrofitYear(i, form, 2 * i + 1, 2 * i + 2, weather, byDate);
    const outside = Math.abs(o.fraction) > o.band;
    if (outside) beyond++;
    console.log(
      `  ${name.padEnd(48)} ${o.model.padEnd(3)} ${pct(o.fraction).padStart(8)} ± ${(o.band * 100).toFixed(2)}%${outside ? '  beyond its band' : ''}`,
    );
  });
  console.log(`  ${beyond} of ${meters.length} beyond their ± at 68%\n`);
}

console.log(
  `Over ${EXTRA_SEEDS} further bill-noise seeds per meter (same weather): mean false saving, and the share of years beyond the ± at 68%`,
);
for (const form of FORMS) {
  console.log(`  ${form === 'daily' ? 'day-resolved' : 'mean'} form`);
  meters.forEach((name, i) => {
    const outcomes = Array.from({ length: EXTRA_SEEDS }, (_, k) =>
      noRetrofitYear(i, form, 1000 + 100 * i + 2 * k, 1001 + 100 * i + 2 * k, weather, byDate),
    );
    const mean = outcomes.reduce((sum, o) => sum + o.fraction, 0) / outcomes.length;
    const beyond = outcomes.filter((o) => Math.abs(o.fraction) > o.band).length;
    console.log(`    ${name.padEnd(48)} mean ${pct(mean).padStart(8)}, beyond the band in ${beyond} of ${EXTRA_SEEDS}`);
  });
}
