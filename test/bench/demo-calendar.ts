/**
 * The demo's case for a calendar, as a measurement (not a test): the
 * invented early-years centre of src/demo/scenario.ts (CALENDAR_DEMO), whose
 * electricity falls in breaks and at weekends and whose 2025 summer break is
 * two weeks longer, fitted on its two baseline years weather only and with
 * its calendar's day types; each model's 2025 avoided energy beside the
 * scenario's true saving. Run: npx tsx test/bench/demo-calendar.ts
 */
import { analyseBaseline, dayTypeSeries, savingsFromFit } from '../../src/engine/index.js';
import {
  BASELINE_END,
  BASELINE_START,
  CALENDAR_DEMO,
  REPORTING_END,
  calendarDemoBills,
  calendarDemoBuiltInSavings,
  demoWeather,
} from '../../src/demo/scenario.js';

const weather = demoWeather();
const byDate = new Map(weather.map((d) => [d.date, d.temp]));
const baseline = calendarDemoBills(byDate, BASELINE_START, BASELINE_END, 0, 101);
const reporting = calendarDemoBills(byDate, BASELINE_END, REPORTING_END, CALENDAR_DEMO.meter.reportingSaving, 102);
const series = dayTypeSeries(CALENDAR_DEMO.calendar, BASELINE_START, REPORTING_END);
const truth = calendarDemoBuiltInSavings(byDate, BASELINE_END, REPORTING_END);
console.log(`${CALENDAR_DEMO.facility.name} (invented): the retrofit's true 2025 saving ${Math.round(truth)} kWh`);
for (const [label, options] of [
  ['weather only ', {}],
  ['with calendar', { variableSeries: series, variables: series.map((s) => s.name) }],
] as const) {
  const analysis = analyseBaseline(baseline, weather, options);
  const chosen = analysis.choice.candidates.find((c) => c.model === analysis.choice.selected)!;
  const savings = savingsFromFit(
    chosen.fit!,
    { limits: analysis.choice.settings.guideline14, excluded: [] },
    reporting,
    weather,
    {
      variableSeries: series,
    },
  );
  console.log(
    `${label}: ${chosen.model}${analysis.choice.variables?.length ? ` + ${analysis.choice.variables.join(', ')}` : ''}, CV(RMSE) ${(chosen.fit!.stats.cvrmse * 100).toFixed(1)}%, Guideline 14 ${savings.baseline.guideline14?.pass ? 'met' : 'not met'}; 2025 avoided energy ${Math.round(savings.totals.savings)} kWh`,
  );
}
console.log(
  "Estimates under the scenario's invented M&V plan; decisions rest with the parties and a licensed professional, under local rules.",
);
