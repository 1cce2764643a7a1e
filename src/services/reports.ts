/**
 * The savings report: resolve the window (dates, a quarter or a contract
 * year), load each meter's frozen model, reporting readings, weather,
 * adjustments and rates, let the engine compute, and hand the figures to
 * the report assembly. Read-only: a report changes nothing it reads.
 */
import {
  TooFewPeriodsError,
  MissingVariableValuesError,
  checkAdjustment,
  contractYearsOverlapping,
  describeDateRanges,
  missingWeatherDates,
  contractYearWindow,
  alignPeriods,
  inWindowByMidpoint,
  normalisedSavings,
  projectionRefusals,
  quarterWindow,
  reportingExtrapolation,
  savingsFromAligned,
  residualCorrelation,
  describeFills,
  filledDaysByPeriod,
  type MeterResiduals,
  type DailyWeather,
  type DateWindow,
  type RateEntry,
  type Reading,
  type SavingsDocument,
  type TemperatureUnit,
  type VariableSeries,
} from '../engine/index.js';
import { reportingSeries } from './variables.js';
import { DomainError, summarise } from '../domain/errors.js';
import { assembleReport, type FacilityInput } from '../reports/assemble.js';
import type { Rollup } from '../reports/totals.js';
import { guaranteeStatus } from '../reports/guarantees.js';
import { meterReport, missingMeterReport, type StoredAdjustment } from '../reports/meter-report.js';
import type {
  ContractSummary,
  GuaranteeStatus,
  MeterReport,
  ReportWindow,
  SavingsReport,
} from '../reports/savings-report.js';
import type { Kysely } from 'kysely';
import { readSnapshot } from '../store/transactions.js';
import type { BaselineRow, Database, FillMethod, MeterRow } from '../store/schema.js';
import type { Selectable } from 'kysely';
import { signatureData } from '../reports/signature-data.js';
import type { Executor } from './context.js';
import { DEFAULT_CONTRACT_CONFIDENCE, toContract } from './contracts.js';
import { shapeName } from '../reports/shape-names.js';
import { getFacilityRow } from './facilities.js';
import { loadReadings, loadWeatherFor, type ReadingWindow } from './meter-data.js';
import { loadFilledDays } from './weather-gaps.js';
import { loadSchedule } from './rates.js';
import { frozenModel, type FrozenModel, type ProjectionModel } from './frozen-models.js';

export interface ReportQuery {
  from?: string;
  to?: string;
  quarter?: string;
  contractYear?: number;
  facilityId?: string;
  confidence?: number;
}

/** What a report knows of one meter before it looks at the window: its frozen model, rates, adjustments, normal year. */
export interface MeterContext {
  meter: MeterRow;
  temperatureUnit: TemperatureUnit;
  stationName: string;
  baseline: {
    id: string;
    version: number;
    contentHash: string;
    start: string;
    end: string;
    temperatureForm: 'daily' | 'mean';
  } | null;
  /** The whole model where the report draws charts (signature), else at least what projections need. */
  model: ProjectionModel | FrozenModel | null;
  rates: { currency: string | null; entries: RateEntry[] };
  adjustments: StoredAdjustment[];
  normalYear: { temps: number[]; contentHash: string; source: string } | null;
}

/**
 * Where a report's meters read their reporting readings, their station's
 * weather and its filled days: one query per meter here, or from rows read
 * for many meters at once (report-stream.ts). Both must answer exactly what
 * loadReadings, loadWeatherFor and loadFilledDays answer.
 */
export interface ReportReads {
  readings(meterId: string, window: ReadingWindow): Promise<Reading[]>;
  /** The station's daily weather over the readings' days (it may hold more days: an alignment reads only its periods' own). */
  weather(stationId: string, readings: readonly Reading[]): Promise<DailyWeather>;
  filledDays(stationId: string, from: string, to: string): Promise<Map<string, FillMethod>>;
  /** The reporting values of a frozen model's independent variables over the window. */
  variableSeries(
    variables: Parameters<typeof reportingSeries>[1],
    window: { from: string; to: string },
  ): Promise<VariableSeries[]>;
}

/** One query per meter and window. */
export function queryPerMeter(db: Executor): ReportReads {
  return {
    readings: (meterId, window) => loadReadings(db, meterId, window),
    weather: (stationId, readings) => loadWeatherFor(db, stationId, readings),
    filledDays: (stationId, from, to) => loadFilledDays(db, stationId, from, to),
    variableSeries: (variables, window) => reportingSeries(db, variables, window),
  };
}

/** What a meter's report carries beyond its figures. */
export interface MeterReportOptions {
  /** The energy-signature chart's points (the HTML's charts); a streamed report leaves them out (null). */
  signature: boolean;
}

const WITH_SIGNATURE: MeterReportOptions = { signature: true };

/** Above this many meters an organisation's HTML report is made per facility (facilityId): a printable document of thousands of meters helps no reader. */
export const HTML_METER_LIMIT = 200;

/** Refuse an HTML report of a whole organisation above HTML_METER_LIMIT meters, naming the two ways that work. */
export async function checkHtmlReportSize(db: Executor, organisationId: string, query: ReportQuery): Promise<void> {
  if (query.facilityId !== undefined) return;
  const row = await db
    .selectFrom('meters')
    .select((eb) => eb.fn.countAll<number | string>().as('count'))
    .where('organisation_id', '=', organisationId)
    .executeTakeFirstOrThrow();
  const meters = Number(row.count);
  if (meters > HTML_METER_LIMIT) {
    throw new DomainError(
      'unprocessable',
      `facilityId: this organisation has ${meters} meters; above ${HTML_METER_LIMIT} the HTML report is made per facility: give facilityId, or ask GET /v1/reports/savings/stream for the whole organisation as JSON or CSV`,
      [{ field: 'facilityId', message: `required above ${HTML_METER_LIMIT} meters for format=html` }],
    );
  }
}

/** The report, read from one consistent snapshot so every figure and the audit head it names agree. */
export function savingsReport(
  db: Kysely<Database>,
  organisationId: string,
  query: ReportQuery,
): Promise<SavingsReport> {
  return readSnapshot(db, (trx) => buildReport(trx, organisationId, query));
}

/** The report read through `db` as it stands (inside a caller's transaction, e.g. when a statement is issued). */
export function savingsReportIn(db: Executor, organisationId: string, query: ReportQuery): Promise<SavingsReport> {
  return buildReport(db, organisationId, query);
}

/** What a report is about before any meter is read: the organisation, its facilities in order, their contracts, the window, the confidence, the audit head. */
export interface ReportFrame {
  organisation: { id: string; name: string };
  facilityRows: { id: string; name: string; address: string | null }[];
  contracts: Map<string, ContractSummary>;
  window: ReportWindow;
  confidence: number;
  confidenceSource: 'request' | 'contract' | 'default';
  head: { seq: number; hash: string } | undefined;
}

/** Read the report's frame; a bad window or confidence is refused here, before anything is computed. */
export async function reportFrame(db: Executor, organisationId: string, query: ReportQuery): Promise<ReportFrame> {
  const organisation = await db
    .selectFrom('organisations')
    .select(['id', 'name'])
    .where('id', '=', organisationId)
    .executeTakeFirstOrThrow();
  const facilityRows = query.facilityId
    ? [await getFacilityRow(db, organisationId, query.facilityId)]
    : await db
        .selectFrom('facilities')
        .selectAll()
        .where('organisation_id', '=', organisationId)
        .orderBy('created_at')
        .orderBy('id')
        .execute();
  const contracts = new Map<string, ContractSummary>();
  for (const row of await db
    .selectFrom('contracts')
    .selectAll()
    .where('organisation_id', '=', organisationId)
    .execute()) {
    const c = toContract(row);
    contracts.set(c.facilityId, {
      start: c.start,
      years: c.years,
      currency: c.currency,
      energyUnit: c.energyUnit,
      guarantees: c.guarantees,
      reference: c.reference,
      parties: c.parties,
      mvPlanReference: c.mvPlanReference,
      mvOption: c.mvOption,
      confidence: c.confidence,
    });
  }
  const { confidence, source: confidenceSource } = resolveConfidence(
    query.confidence,
    facilityRows.map((f) => contracts.get(f.id) ?? null),
  );
  const window = resolveWindow(
    query,
    facilityRows.map((f) => contracts.get(f.id) ?? null),
  );
  const head = await db
    .selectFrom('audit_log')
    .select(['seq', 'hash'])
    .where('organisation_id', '=', organisationId)
    .orderBy('seq', 'desc')
    .limit(1)
    .executeTakeFirst();
  return { organisation, facilityRows, contracts, window, confidence, confidenceSource, head };
}

async function buildReport(db: Executor, organisationId: string, query: ReportQuery): Promise<SavingsReport> {
  const { organisation, facilityRows, contracts, window, confidence, confidenceSource, head } = await reportFrame(
    db,
    organisationId,
    query,
  );
  const reads = queryPerMeter(db);

  // Every meter's context first: the roll-up's correlation comes from all the report's meters.
  const contextsByFacility = new Map<string, MeterContext[]>();
  for (const facility of facilityRows) {
    const meterRows = await db
      .selectFrom('meters')
      .selectAll()
      .where('facility_id', '=', facility.id)
      .orderBy('created_at')
      .orderBy('id')
      .execute();
    contextsByFacility.set(facility.id, await Promise.all(meterRows.map((meter) => meterContext(db, meter))));
  }
  const correlation = residualCorrelation([...contextsByFacility.values()].flat().flatMap(baselineResiduals));
  const rollup: Rollup = { correlation };

  const normalYears = new Map<string, SavingsReport['normalYears'][number]>();
  const facilities: FacilityInput[] = [];
  for (const facility of facilityRows) {
    const { input, usedNormalYears } = await facilityInWindow(
      reads,
      facility,
      contextsByFacility.get(facility.id)!,
      contracts.get(facility.id) ?? null,
      window,
      confidence,
      rollup,
      WITH_SIGNATURE,
    );
    facilities.push(input);
    for (const used of usedNormalYears) normalYears.set(used.stationId, used);
  }
  const reportingMeters = facilities.flatMap((f) => f.meters).filter((m) => m.missing === null).length;
  if (reportingMeters === 0) {
    // Each meter's own reason, the ones missing weather first: that is the cause a user can fix.
    const reasons = facilities
      .flatMap((f) => f.meters.map((m) => ({ field: `meter ${m.id} (${m.name})`, message: m.missing ?? '' })))
      .sort(
        (a, b) => Number(b.message.startsWith('missing weather')) - Number(a.message.startsWith('missing weather')),
      );
    throw nothingToReport(query, window, reasons);
  }
  return assembleReport({
    organisation,
    window,
    confidence,
    confidenceSource,
    dataAsOf: { auditSeq: head?.seq ?? 0, auditHash: head?.hash ?? '' },
    facilities,
    normalYears: [...normalYears.values()].sort((a, b) => (a.stationId < b.stationId ? -1 : 1)),
    correlation,
  });
}

/** The answer when no meter has figures in the window, with each meter's reason when they are known. */
export function nothingToReport(
  query: ReportQuery,
  window: ReportWindow,
  reasons: { field: string; message: string }[] = [],
): DomainError {
  const scope = query.facilityId ? `facility ${query.facilityId}` : 'this organisation';
  return new DomainError(
    'unprocessable',
    `no meter of ${scope} has reporting data in ${window.label} (${window.from}..${window.to})${reasons.length > 0 ? `: ${summarise(reasons)}` : ''}; readings count in the window that holds their midpoint`,
    reasons.slice(0, 100),
  );
}

/** A meter's frozen baseline residuals with their periods and its station, for the roll-up's correlation (none without a frozen baseline). */
export function baselineResiduals(ctx: Pick<MeterContext, 'model' | 'meter'>): MeterResiduals[] {
  const model = ctx.model;
  if (!model) return [];
  // The fit's residuals are in start-date order, as are the periods' dates.
  const periods = model.residualPeriods;
  if (periods.length !== model.fit.residuals.length) return [];
  return [
    {
      group: ctx.meter.weather_station_id,
      periods: periods.map((p, i) => ({ start: p.start, end: p.end, residual: model.fit.residuals[i]! })),
    },
  ];
}

/** One facility over the window: its meters, and its guarantee status for every contract year the window touches. */
export async function facilityInWindow(
  reads: ReportReads,
  facility: { id: string; name: string; address: string | null },
  contexts: readonly MeterContext[],
  contract: ContractSummary | null,
  window: DateWindow,
  confidence: number,
  rollup: Rollup,
  options: MeterReportOptions,
): Promise<{ input: FacilityInput; usedNormalYears: SavingsReport['normalYears'] }> {
  const meters = await Promise.all(contexts.map((ctx) => meterInWindow(reads, ctx, window, confidence, options)));
  const usedNormalYears = contexts.flatMap((ctx, i) =>
    ctx.normalYear && meters[i]!.normalised.available
      ? [
          {
            stationId: ctx.meter.weather_station_id,
            contentHash: ctx.normalYear.contentHash,
            source: ctx.normalYear.source,
          },
        ]
      : [],
  );
  const guarantees: GuaranteeStatus[] = [];
  for (const year of contract ? contractYearsOverlapping(contract.start, contract.years, window) : []) {
    const yearWindow = contractYearWindow(contract!.start, contract!.years, year);
    const through = window.to < yearWindow.to ? window.to : yearWindow.to;
    // The year to date needs its own figures unless it is exactly the report's window.
    const sameWindow = yearWindow.from === window.from && through === window.to;
    const yearMeters = sameWindow
      ? meters
      : await Promise.all(
          contexts.map((ctx) => meterInWindow(reads, ctx, { from: yearWindow.from, to: through }, confidence, options)),
        );
    guarantees.push(
      guaranteeStatus(
        contract!,
        {
          contractYear: year,
          yearStart: yearWindow.from,
          yearEnd: yearWindow.to,
          measuredThrough: through,
          complete: through === yearWindow.to,
          meters: yearMeters,
        },
        rollup,
      ),
    );
  }
  return {
    input: { id: facility.id, name: facility.name, address: facility.address, contract, meters, guarantees },
    usedNormalYears,
  };
}

/**
 * One confidence level for every ± of a report: the request's, else the
 * contract's (every facility in the report with a contract must name the
 * same level; a facility without one counts at the default), else the
 * default of 90%. The Guideline 14 significance test keeps its own 68%.
 */
export function resolveConfidence(
  requested: number | undefined,
  contracts: readonly (ContractSummary | null)[],
): { confidence: number; source: 'request' | 'contract' | 'default' } {
  if (requested !== undefined) return { confidence: requested, source: 'request' };
  const levels = new Set(contracts.map((c) => c?.confidence ?? DEFAULT_CONTRACT_CONFIDENCE));
  if (levels.size > 1) {
    throw new DomainError(
      'unprocessable',
      `confidence: the facilities' contracts name different confidence levels (${[...levels].sort().join(', ')}); give confidence or facilityId`,
      [{ field: 'confidence', message: 'contracts differ: give confidence' }],
    );
  }
  const hasContract = contracts.some((c) => c !== null);
  return { confidence: [...levels][0] ?? DEFAULT_CONTRACT_CONFIDENCE, source: hasContract ? 'contract' : 'default' };
}

/** Exactly one of: from and to, quarter, contractYear. */
export function resolveWindow(query: ReportQuery, contracts: readonly (ContractSummary | null)[]): ReportWindow {
  const given = [
    query.from !== undefined || query.to !== undefined,
    query.quarter !== undefined,
    query.contractYear !== undefined,
  ].filter(Boolean).length;
  if (given !== 1) {
    throw new DomainError(
      'invalid',
      'from: give the window as from and to, or quarter (e.g. 2026-Q3), or contractYear; exactly one of them',
      [{ field: 'from', message: 'give from and to, quarter, or contractYear' }],
    );
  }
  if (query.quarter !== undefined) {
    let w: DateWindow;
    try {
      w = quarterWindow(query.quarter);
    } catch (error) {
      throw new DomainError('invalid', `quarter: ${(error as Error).message}`, [
        { field: 'quarter', message: (error as Error).message },
      ]);
    }
    return { ...w, kind: 'quarter', label: query.quarter };
  }
  if (query.contractYear !== undefined) {
    const present = contracts.filter((c): c is ContractSummary => c !== null);
    if (present.length === 0)
      throw new DomainError(
        'unprocessable',
        'contractYear: no facility in the report has a contract (PUT /v1/facilities/{id}/contract)',
        [{ field: 'contractYear', message: 'no contract' }],
      );
    const starts = new Set(present.map((c) => c.start));
    if (starts.size > 1) {
      throw new DomainError(
        'unprocessable',
        `contractYear: the facilities' contracts start on different dates (${[...starts].sort().join(', ')}); give facilityId`,
        [{ field: 'contractYear', message: 'contracts differ: give facilityId' }],
      );
    }
    const years = Math.max(...present.map((c) => c.years));
    if (query.contractYear > years) {
      throw new DomainError(
        'unprocessable',
        `contractYear: the contract runs ${years} year(s); there is no contract year ${query.contractYear}`,
        [{ field: 'contractYear', message: `at most ${years}` }],
      );
    }
    const w = contractYearWindow(present[0]!.start, years, query.contractYear);
    return { ...w, kind: 'contract-year', label: `contract year ${query.contractYear} (${w.from}..${w.to})` };
  }
  if (query.from === undefined || query.to === undefined) {
    const field = query.from === undefined ? 'from' : 'to';
    throw new DomainError('invalid', `${field}: a date window needs both from and to`, [
      { field, message: 'needed with the other' },
    ]);
  }
  if (!(query.to > query.from))
    throw new DomainError('invalid', 'to: must be after from', [{ field: 'to', message: 'must be after from' }]);
  return { from: query.from, to: query.to, kind: 'range', label: `${query.from}..${query.to}` };
}

async function meterContext(db: Executor, meter: MeterRow): Promise<MeterContext> {
  const baseline = await db
    .selectFrom('baselines')
    .select(['id', 'version', 'content_hash', 'period_start', 'period_end', 'temperature_form'])
    .where('meter_id', '=', meter.id)
    .where('status', '=', 'frozen')
    .executeTakeFirst();
  const model = baseline?.content_hash ? await frozenModel(db, baseline.id, baseline.content_hash) : null;
  const schedule = await loadSchedule(db, meter.id, meter.unit);
  const adjustmentRows = await db
    .selectFrom('adjustments')
    .selectAll()
    .where('meter_id', '=', meter.id)
    .where('withdrawn_at', 'is', null)
    .orderBy('period_start')
    .execute();
  const normal = await db
    .selectFrom('normal_years')
    .selectAll()
    .where('station_id', '=', meter.weather_station_id)
    .executeTakeFirst();
  const station = await db
    .selectFrom('weather_stations')
    .select(['temperature_unit', 'name'])
    .where('id', '=', meter.weather_station_id)
    .executeTakeFirstOrThrow();
  return meterContextOf({
    meter,
    temperatureUnit: station.temperature_unit,
    stationName: station.name,
    baseline: baseline ?? null,
    model,
    schedule,
    adjustmentRows,
    normal: normal ?? null,
  });
}

/** A meter's context from the rows read for it (one meter at a time above, many at once in report-stream.ts). */
export function meterContextOf(rows: {
  meter: MeterRow;
  temperatureUnit: TemperatureUnit;
  stationName: string;
  baseline: Pick<
    BaselineRow,
    'id' | 'version' | 'content_hash' | 'period_start' | 'period_end' | 'temperature_form'
  > | null;
  model: ProjectionModel | FrozenModel | null;
  schedule: { currency: string | null; rates: RateEntry[] };
  adjustmentRows: readonly Selectable<Database['adjustments']>[];
  normal: { temps_json: string; content_hash: string; source: string } | null;
}): MeterContext {
  const { meter, baseline, model, schedule, adjustmentRows, normal } = rows;
  return {
    meter,
    temperatureUnit: rows.temperatureUnit,
    stationName: rows.stationName,
    baseline: baseline?.content_hash
      ? {
          id: baseline.id,
          version: baseline.version,
          contentHash: baseline.content_hash,
          start: baseline.period_start,
          end: baseline.period_end,
          temperatureForm: baseline.temperature_form,
        }
      : null,
    model,
    rates: { currency: schedule.currency, entries: schedule.rates },
    adjustments: adjustmentRows.map((row) => ({
      id: row.id,
      start: row.period_start,
      end: row.period_end,
      quantity: row.quantity,
      perDay: row.per_day,
      reason: row.reason,
      uncertainty: row.uncertainty,
      recordedAt: row.created_at,
      recordedBy: row.created_by,
    })),
    normalYear: normal
      ? { temps: JSON.parse(normal.temps_json) as number[], contentHash: normal.content_hash, source: normal.source }
      : null,
  };
}

/** The whole model a chart needs: a report that draws charts reads whole models (meterContext). */
function withBaselinePeriods(model: ProjectionModel | FrozenModel): FrozenModel {
  if (!('baselinePeriods' in model)) throw new Error('a report with charts needs the whole frozen model');
  return model;
}

/** One meter's figures over `window`, or the reason it has none. */
async function meterInWindow(
  reads: ReportReads,
  ctx: MeterContext,
  window: DateWindow,
  confidence: number,
  options: MeterReportOptions,
): Promise<MeterReport> {
  const { meter, baseline, model } = ctx;
  const overlapping = ctx.adjustments.filter((a) => a.start < window.to && a.end > window.from);
  const identity = {
    id: meter.id,
    name: meter.name,
    fuel: meter.fuel,
    unit: meter.unit,
    weatherStationId: meter.weather_station_id,
    weatherStationName: ctx.stationName,
    temperatureUnit: ctx.temperatureUnit,
  };
  if (!baseline || !model) return missingMeterReport(identity, null, 'the meter has no frozen baseline', overlapping);
  const baselineInfo = {
    id: baseline.id,
    version: baseline.version,
    contentHash: baseline.contentHash,
    model: model.fit.model,
    modelName: shapeName(model.fit.model),
    start: baseline.start,
    end: baseline.end,
    temperatureRange: { ...model.fit.temperatureRange },
    cvrmse: model.fit.stats.cvrmse,
    nmbe: model.fit.stats.nmbe,
    coefficients: model.fit.coefficients.map((c) => ({
      name: c.name,
      estimate: c.estimate,
      standardError: c.standardError,
    })),
    changepoints: model.fit.changepointEstimates.map((c) => ({
      name: c.name,
      estimate: c.estimate,
      standardError: c.standardError,
    })),
    meetsGuideline14: null as boolean | null,
    temperatureForm: baseline.temperatureForm,
    sufficiency: { sufficient: model.sufficiency.sufficient, reasons: model.sufficiency.reasons },
    overrides: model.overrides,
    exclusions: model.exclusions.map((e) => ({ start: e.start, end: e.end, reason: e.reason })),
  };
  // A stored adjustment that cannot be applied (brought in behind the API's back) is named, not blamed on the weather.
  const broken = ctx.adjustments.map(checkAdjustment).find((error) => error !== null);
  if (broken) {
    const usable = overlapping.filter((a) => a.id !== broken.adjustmentId && checkAdjustment(a) === null);
    return missingMeterReport(identity, baselineInfo, `${broken.message}: withdraw it and record it again`, usable);
  }
  const start = window.from > baseline.end ? window.from : baseline.end;
  const candidates = await reads.readings(meter.id, {
    startOnOrAfter: baseline.end,
    startBefore: window.to,
    endAfter: start,
  });
  const readings: Reading[] = candidates.filter((r) => inWindowByMidpoint(r, window));
  if (readings.length === 0)
    return missingMeterReport(
      identity,
      baselineInfo,
      `no reporting readings in ${window.from}..${window.to}`,
      overlapping,
    );
  const weather = await reads.weather(meter.weather_station_id, readings);
  const lastEnd = readings.reduce((end, r) => (r.end > end ? r.end : end), readings[0]!.end);
  const variableSeries =
    model.variables.length === 0
      ? []
      : await reads.variableSeries(model.variables, { from: readings[0]!.start, to: lastEnd });
  const aligned = alignPeriods(readings, weather, { minCoverage: model.minCoverage, variableSeries });
  let savings: SavingsDocument;
  try {
    savings = savingsFromAligned(model.fit, { limits: model.limits, excluded: model.excluded }, aligned, {
      confidence,
      adjustments: ctx.adjustments,
    });
  } catch (error) {
    if (error instanceof MissingVariableValuesError)
      return missingMeterReport(identity, baselineInfo, error.message, overlapping);
    if (!(error instanceof TooFewPeriodsError)) throw error;
    // Name the real cause: the dates without weather at the meter's station.
    const missingDates = describeDateRanges(missingWeatherDates(readings, weather));
    return missingMeterReport(
      identity,
      baselineInfo,
      `missing weather for dates ${missingDates} at weather station ${meter.weather_station_id}: every reporting reading in the window lacks enough weather (post observations to PUT /v1/weather-stations/${meter.weather_station_id}/observations)`,
      overlapping,
    );
  }
  const extrapolation = reportingExtrapolation(model.fit, aligned.periods);
  const refusal = projectionRefusals(
    { sufficiency: model.sufficiency, extrapolation, overrides: model.overrides },
    { requireSufficiency: false },
  )[0];
  if (refusal) {
    return missingMeterReport(
      identity,
      baselineInfo,
      `savings refused: ${refusal.reason}; the frozen baseline carries no extrapolation override`,
      overlapping,
      extrapolation,
    );
  }
  baselineInfo.meetsGuideline14 = savings.baseline.guideline14?.pass ?? null;
  const normalised = ctx.normalYear
    ? normalisedSavings(model.fit, readings, weather, ctx.normalYear.temps, {
        minCoverage: model.minCoverage,
        confidence,
      })
    : {
        available: false as const,
        reason: 'the weather station has no normal year (PUT /v1/weather-stations/{id}/normal-year)',
      };
  const filled = await reads.filledDays(meter.weather_station_id, readings[0]!.start, lastEnd);
  const report = meterReport({
    meter: identity,
    baseline: baselineInfo,
    savings,
    rates: ctx.rates,
    adjustments: overlapping,
    normalised,
    signature: options.signature ? signatureData(withBaselinePeriods(model), savings, meter.unit) : null,
    extrapolation,
    weatherFills: filledDaysByPeriod(savings.periods, filled),
  });
  // The baseline's own weather: filled days it was fitted on are named beside it.
  const baselineFills = filledDaysByPeriod(
    [{ start: baseline.start, end: baseline.end }],
    await reads.filledDays(meter.weather_station_id, baseline.start, baseline.end),
  )[0];
  if (baselineFills)
    report.notes.push(
      `baseline weather: ${describeFills(baselineFills.days, baselineFills.interpolation, baselineFills.secondStation)}`,
    );
  return report;
}
