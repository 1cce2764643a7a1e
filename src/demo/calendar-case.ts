/**
 * The demo's case for a calendar, told through the API as an engineer would
 * live it: the early-years centre's baseline is first fitted and frozen on
 * weather alone (it passes Guideline 14), the reporting year's bills book
 * the longer 2025 summer break as savings; the engineer posts the centre's
 * calendar, refits with its day types and freezes that baseline in place of
 * the first, with the reason on record. Both figures, and the scenario's
 * own saving they are judged against, are printed by `npm run demo`.
 */
import {
  BASELINE_END,
  BASELINE_START,
  CALENDAR_DEMO,
  CONTRACT_CURRENCY,
  REPORTING_END,
  calendarDemoBills,
  calendarDemoBuiltInSavings,
} from './scenario.js';

type Call = (method: string, path: string, body?: unknown) => Promise<any>;

/** One baseline of the case as the API answered it. */
export interface CalendarCaseModel {
  baselineId: string;
  /** The chosen shape and the terms beside the weather, e.g. "4P + day type: break". */
  model: string;
  cvrmse: number;
  guideline14: boolean;
  /** Avoided energy over the reporting year, kWh, from GET /v1/meters/{id}/savings. */
  savings: number;
  uncertainty: number;
}

export interface CalendarCase {
  facilityId: string;
  facilityName: string;
  meterId: string;
  weatherOnly: CalendarCaseModel;
  withCalendar: CalendarCaseModel;
  /** The saving the scenario built into the reporting year (the truth both are judged against), kWh. */
  trueSavings: number;
}

async function describeModel(call: Call, baseline: any, meterId: string): Promise<CalendarCaseModel> {
  const chosen = baseline.fit.candidates.find((c: { model: string }) => c.model === baseline.chosen);
  const terms: string[] = baseline.fit.variables ?? [];
  const savings = await call('GET', `/v1/meters/${meterId}/savings?confidence=0.9`);
  return {
    baselineId: baseline.id,
    model: [baseline.chosen, ...terms].join(' + '),
    cvrmse: chosen.stats.cvrmse,
    guideline14: chosen.guideline14?.pass === true,
    savings: savings.totals.savings,
    uncertainty: savings.totals.uncertainty.exact.absolute,
  };
}

/** Seed the centre through the API: engineer's calls through `call`, the billing system's through `billing`. */
export async function seedCalendarCase(
  call: Call,
  billing: Call,
  stationId: string,
  weatherByDate: ReadonlyMap<string, number>,
): Promise<CalendarCase> {
  const { facility: plan, meter: meterPlan, calendar } = CALENDAR_DEMO;
  const facility = await call('POST', '/v1/facilities', plan);
  const meter = await call('POST', `/v1/facilities/${facility.id}/meters`, {
    name: meterPlan.name,
    fuel: meterPlan.fuel,
    unit: meterPlan.unit,
    weatherStationId: stationId,
  });
  await billing('POST', `/v1/meters/${meter.id}/readings`, {
    readings: calendarDemoBills(weatherByDate, BASELINE_START, BASELINE_END, 0, 101),
  });
  const window = { start: BASELINE_START, end: BASELINE_END };

  // First: weather alone, frozen as the plan first agreed it.
  const weatherOnly = await call('POST', `/v1/meters/${meter.id}/baselines`, window);
  await call('POST', `/v1/baselines/${weatherOnly.id}/freeze`, { note: 'Baseline agreed in the M&V plan (demo)' });
  await billing('POST', `/v1/meters/${meter.id}/readings`, {
    readings: calendarDemoBills(weatherByDate, BASELINE_END, REPORTING_END, meterPlan.reportingSaving, 102),
  });
  await call('PUT', `/v1/meters/${meter.id}/rates`, {
    currency: CONTRACT_CURRENCY,
    rates: [{ from: BASELINE_END, price: meterPlan.price, escalation: meterPlan.escalation }],
  });
  const first = await describeModel(call, weatherOnly, meter.id);

  // Then: the centre's calendar, a refit with its day types, frozen in place of the first.
  await call('PUT', `/v1/facilities/${facility.id}/calendar`, calendar);
  const withCalendar = await call('POST', `/v1/meters/${meter.id}/baselines`, {
    ...window,
    options: { dayTypes: true },
  });
  await call('POST', `/v1/baselines/${withCalendar.id}/freeze`, {
    note: 'Baseline with the centre’s day types (demo)',
    supersedeReason:
      'The weather-only baseline booked the longer 2025 summer break as savings: use falls in breaks whatever the weather (demo)',
  });
  const second = await describeModel(call, withCalendar, meter.id);

  return {
    facilityId: facility.id,
    facilityName: plan.name,
    meterId: meter.id,
    weatherOnly: first,
    withCalendar: second,
    trueSavings: calendarDemoBuiltInSavings(weatherByDate, BASELINE_END, REPORTING_END),
  };
}

/** The lines `npm run demo` prints for the case. */
export function describeCalendarCase(base: string, found: CalendarCase): string[] {
  const kWh = (value: number) => `${Math.round(value).toLocaleString('en-US')} kWh`;
  const line = (label: string, m: CalendarCaseModel) =>
    `    ${label} ${m.model}, CV(RMSE) ${(m.cvrmse * 100).toFixed(1)}%, Guideline 14 ${m.guideline14 ? 'met' : 'not met'}; 2025 avoided energy ${kWh(m.savings)} ± ${kWh(m.uncertainty)} (90%)`;
  return [
    `  Why a calendar matters: ${found.facilityName}, whose electricity falls in breaks and at weekends`,
    '  whatever the weather, and whose 2025 summer break ran two weeks longer than the baseline years’:',
    line('weather only (superseded):', found.weatherOnly),
    line('with its calendar (frozen):', found.withCalendar),
    `    the scenario's own 2025 saving:  ${kWh(found.trueSavings)}`,
    `    savings:        ${base}/v1/meters/${found.meterId}/savings?confidence=0.9`,
    `    calendar:       ${base}/v1/facilities/${found.facilityId}/calendar`,
  ];
}
