/**
 * The savings report of a whole organisation, written as it is computed
 * (JSON or CSV) so that memory stays bounded however many meters it holds.
 *
 * Two passes over the facilities, a chunk of them at a time, inside one
 * read snapshot: the first pools the meters' baseline residuals into the
 * roll-up's correlation (which every total's ± needs); the second computes
 * each facility with exactly the code of the whole-document report
 * (reports.ts: facilityInWindow, facilityReport) and writes it out. A chunk's
 * meters, frozen baselines, rates, adjustments and reporting readings are
 * read with one query each, and a station's weather once for many meters.
 * What is kept until the end is small per meter: its common-unit totals and
 * cost with its station (for the portfolio's sums, added in the same order
 * as the whole-document report adds them, so the totals agree to the bit),
 * its frozen baseline's id and hash, and the notices.
 *
 * The streamed document differs from the whole one in three stated ways:
 * keys come in the order they can be written (facilities before the
 * portfolio), meters carry no chart points (`signature` is null: the
 * charts are in the per-facility HTML), and `contentHash` is the SHA-256 of
 * the document's bytes before it (a whole document's hash is over its
 * canonical JSON, which needs every figure before the first byte).
 */
import { createHash, type Hash } from 'node:crypto';
import type { Kysely } from 'kysely';
import {
  canonicalEnergyUnit,
  contractYearsOverlapping,
  contractYearWindow,
  energyFactor,
  ENERGY_FACTOR_SOURCE,
  PooledResidualCorrelation,
  type DailyTemperature,
  type DailyWeather,
  DayIndexedWeather,
  type Reading,
  type TemperatureUnit,
} from '../engine/index.js';
import { facilityNotices, facilityReport } from '../reports/assemble.js';
import { CSV_HEADER, closingRows, csvLine, facilityRows, portfolioRows } from '../reports/csv.js';
import { REPORT_CAUTION, reportMethod } from '../reports/method.js';
import { facilityNotAvailableNotices, portfolioNotAvailableNotices } from '../reports/not-available.js';
import {
  REPORT_FORMAT,
  REPORT_VERSION,
  type CommonEnergyUnit,
  type CostTotal,
  type EnergyTotal,
  type SavingsReport,
} from '../reports/savings-report.js';
import {
  COMMON_UNITS,
  commonParts,
  costParts,
  sumCommonTotals,
  sumCosts,
  type Rollup,
  type StationTotal,
} from '../reports/totals.js';
import { readSnapshotOnce } from '../store/transactions.js';
import type { BaselineRow, Database, FillMethod, MeterRow } from '../store/schema.js';
import type { Executor } from './context.js';
import { loadDailyWeather, loadReadings, spanOf, type ReadingWindow } from './meter-data.js';
import { scheduleOfRows } from './rates.js';
import {
  baselineResiduals,
  facilityInWindow,
  meterContextOf,
  nothingToReport,
  reportFrame,
  type MeterContext,
  type ReportFrame,
  type ReportQuery,
  type ReportReads,
} from './reports.js';
import { projectionModelsOf, type ProjectionModel } from './frozen-models.js';
import { reportingSeries } from './variables.js';

export type StreamFormat = 'json' | 'csv';

/** Where the report goes, a piece at a time; a returned promise is awaited before the next piece (backpressure). */
export type ReportSink = (text: string) => void | Promise<void>;

/** Facilities read and computed together (about five meters each in the generated portfolio). */
export const FACILITY_CHUNK = 100;

/** What the stream wrote, for logs and benchmarks. */
export interface StreamedReportSummary {
  facilities: number;
  meters: number;
  bytes: number;
  contentHash: string;
}

/**
 * Check what can be refused before the first byte: the window, and that some
 * meter has reporting readings in it after its frozen baseline. (Readings
 * whose midpoint falls outside the window, or that lack weather, can still
 * leave every meter without figures: the streamed report then says so per
 * meter, as notices.)
 */
export async function checkStreamedReport(
  db: Kysely<Database>,
  organisationId: string,
  query: ReportQuery,
): Promise<void> {
  const frame = await reportFrame(db, organisationId, query);
  let probe = db
    .selectFrom('readings')
    .innerJoin('baselines', 'baselines.meter_id', 'readings.meter_id')
    .innerJoin('meters', 'meters.id', 'readings.meter_id')
    .select('readings.meter_id')
    .where('meters.organisation_id', '=', organisationId)
    .where('baselines.status', '=', 'frozen')
    .whereRef('readings.period_start', '>=', 'baselines.period_end')
    .where('readings.period_start', '<', frame.window.to)
    .where('readings.period_end', '>', frame.window.from);
  if (query.facilityId !== undefined) probe = probe.where('meters.facility_id', '=', query.facilityId);
  if (!(await probe.limit(1).executeTakeFirst())) throw nothingToReport(query, frame.window);
}

/** Write the report to `sink`, from one consistent snapshot (read once: what has been written is never written again). */
export function streamSavingsReport(
  db: Kysely<Database>,
  organisationId: string,
  query: ReportQuery,
  format: StreamFormat,
  sink: ReportSink,
  facilitiesPerChunk = FACILITY_CHUNK,
): Promise<StreamedReportSummary> {
  return readSnapshotOnce(db, (trx) => writeReport(trx, organisationId, query, format, sink, facilitiesPerChunk));
}

async function writeReport(
  db: Executor,
  organisationId: string,
  query: ReportQuery,
  format: StreamFormat,
  sink: ReportSink,
  facilitiesPerChunk: number,
): Promise<StreamedReportSummary> {
  const frame = await reportFrame(db, organisationId, query);
  const stations = await stationData(db, organisationId);
  const chunks = chunk(frame.facilityRows, facilitiesPerChunk);

  // Pass 1: the pooled correlation of every meter's baseline residuals, in the report's meter order.
  const pooled = new PooledResidualCorrelation();
  const residualReads = async (facilities: readonly FacilityRow[]) => {
    const meters = await metersOf(db, facilities);
    return {
      meters,
      baselines: await frozenBaselines(
        db,
        meters.flatMap((m) => m.meters),
      ),
    };
  };
  for await (const { meters, baselines } of readAhead(chunks, residualReads)) {
    for (const { meters: list } of meters) {
      for (const meter of list) {
        const baseline = baselines.get(meter.id);
        for (const residuals of baselineResiduals({ meter, model: baseline?.model ?? null })) pooled.add(residuals);
      }
    }
  }
  const correlation = pooled.result();
  const rollup: Rollup = { correlation };

  const out = new HashingWriter(sink);
  const writer = format === 'json' ? new JsonReportWriter(out, frame, correlation) : new CsvReportWriter(out, frame);
  await writer.begin();

  // Pass 2: each facility computed as the whole-document report computes it, written, and let go.
  const kept = new RollupParts();
  const normalYears = new Map<string, SavingsReport['normalYears'][number]>();
  const chunkData = async (facilities: readonly FacilityRow[]) => {
    const meters = await metersOf(db, facilities);
    const allMeters = meters.flatMap((m) => m.meters);
    return {
      meters,
      baselines: await frozenBaselines(db, allMeters),
      schedules: await ratesOf(db, allMeters),
      adjustments: await adjustmentsOf(db, allMeters),
      reads: await chunkReads(db, allMeters, readingsFrom(frame, facilities), frame.window.to, stations),
    };
  };
  for await (const { meters, baselines, schedules, adjustments, reads } of readAhead(chunks, chunkData)) {
    for (const { facility, meters: list } of meters) {
      const contexts: MeterContext[] = list.map((meter) => {
        const baseline = baselines.get(meter.id);
        const station = stations.byId.get(meter.weather_station_id);
        if (!station) throw new Error(`meter ${meter.id}: weather station ${meter.weather_station_id} not found`);
        return meterContextOf({
          meter,
          temperatureUnit: station.unit,
          stationName: station.name,
          baseline: baseline?.row ?? null,
          model: baseline?.model ?? null,
          schedule: schedules.get(meter.id) ?? { currency: null, rates: [] },
          adjustmentRows: adjustments.get(meter.id) ?? [],
          normal: station.normal,
        });
      });
      const { input, usedNormalYears } = await facilityInWindow(
        reads,
        facility,
        contexts,
        frame.contracts.get(facility.id) ?? null,
        frame.window,
        frame.confidence,
        rollup,
        { signature: false },
      );
      const report = facilityReport(input, rollup);
      kept.add(report);
      for (const used of usedNormalYears) normalYears.set(used.stationId, used);
      await writer.facility(report);
      // Let the next chunk's queries and other requests move on between facilities.
      await new Promise<void>((resolve) => setImmediate(resolve));
    }
  }

  const portfolio = kept.portfolio(rollup);
  await writer.end({
    portfolio,
    baselines: kept.baselines,
    normalYears: [...normalYears.values()].sort((a, b) => (a.stationId < b.stationId ? -1 : 1)),
    unitFactors: kept.unitFactors(),
    notices: [...kept.notices, ...kept.notAvailable, ...portfolioNotAvailableNotices(portfolio)],
  });
  return { facilities: kept.facilities, meters: portfolio.meters, bytes: out.bytes, contentHash: out.finalHash ?? '' };
}

/** The small per-meter parts the end of the report needs, kept in the report's order. */
class RollupParts {
  facilities = 0;
  meters = 0;
  inRollup = 0;
  readonly common: StationTotal<Record<CommonEnergyUnit, EnergyTotal>>[] = [];
  readonly costs: StationTotal<CostTotal>[] = [];
  readonly baselines: SavingsReport['baselines'] = [];
  readonly units = new Set<string>(COMMON_UNITS);
  readonly notices: string[] = [];
  readonly notAvailable: string[] = [];

  add(facility: ReturnType<typeof facilityReport>): void {
    this.facilities++;
    this.meters += facility.meters.length;
    this.common.push(...commonParts(facility.meters));
    this.costs.push(...costParts(facility.meters));
    for (const m of facility.meters) {
      if (m.common !== null) this.inRollup++;
      const unit = canonicalEnergyUnit(m.unit);
      if (unit !== undefined) this.units.add(unit);
      if (m.baseline && m.missing === null)
        this.baselines.push({
          meterId: m.id,
          baselineId: m.baseline.id,
          version: m.baseline.version,
          contentHash: m.baseline.contentHash,
        });
    }
    this.notices.push(...facilityNotices(facility));
    this.notAvailable.push(...facilityNotAvailableNotices(facility));
  }

  portfolio(rollup: Rollup): SavingsReport['portfolio'] {
    return {
      totals: sumCommonTotals(this.common, rollup),
      cost: sumCosts(this.costs, rollup),
      meters: this.meters,
      metersInRollup: this.inRollup,
    };
  }

  unitFactors(): SavingsReport['unitFactors'] {
    return [...this.units].sort().map((unit) => {
      const f = energyFactor(unit)!;
      return { unit: f.unit, btu: f.btu, mmbtu: f.mmbtu, gj: f.gj };
    });
  }
}

interface ReportEnd {
  portfolio: SavingsReport['portfolio'];
  baselines: SavingsReport['baselines'];
  normalYears: SavingsReport['normalYears'];
  unitFactors: SavingsReport['unitFactors'];
  notices: string[];
}

/** Passes text to the sink and hashes every byte written. */
class HashingWriter {
  private readonly hash: Hash = createHash('sha256');
  bytes = 0;
  finalHash: string | null = null;

  constructor(private readonly sink: ReportSink) {}

  async write(text: string): Promise<void> {
    this.hash.update(text, 'utf8');
    this.bytes += Buffer.byteLength(text, 'utf8');
    await this.sink(text);
  }

  /** The SHA-256 of everything written so far (written once, at the end). */
  digest(): string {
    this.finalHash = this.hash.digest('hex');
    return this.finalHash;
  }

  /** Write without hashing (the hash's own field). */
  async writeUnhashed(text: string): Promise<void> {
    this.bytes += Buffer.byteLength(text, 'utf8');
    await this.sink(text);
  }
}

// JSON.stringify writes NaN and ±Infinity as null, as nonFiniteToNull would, without copying the document first.
const json = (value: unknown) => JSON.stringify(value);

/** The JSON document: one facility per line inside "facilities". */
class JsonReportWriter {
  private first = true;

  constructor(
    private readonly out: HashingWriter,
    private readonly frame: ReportFrame,
    private readonly correlation: ReturnType<PooledResidualCorrelation['result']>,
  ) {}

  async begin(): Promise<void> {
    const f = this.frame;
    const head = [
      `{"format":${json(REPORT_FORMAT)}`,
      `"version":${json(REPORT_VERSION)}`,
      `"streamed":true`,
      `"organisation":${json(f.organisation)}`,
      `"window":${json(f.window)}`,
      `"confidence":${json(f.confidence)}`,
      `"confidenceSource":${json(f.confidenceSource)}`,
      `"dataAsOf":${json({ auditSeq: f.head?.seq ?? 0, auditHash: f.head?.hash ?? '' })}`,
      `"rollup":${json({
        withinStation: this.correlation.withinGroup,
        acrossStations: this.correlation.acrossGroups,
        pairsWithinStation: this.correlation.pairsWithin,
        pairsAcrossStations: this.correlation.pairsAcross,
      })}`,
      `"method":${json(reportMethod(f.confidence))}`,
      `"facilities":[`,
    ];
    await this.out.write(`${head.join(',\n')}\n`);
  }

  async facility(report: ReturnType<typeof facilityReport>): Promise<void> {
    await this.out.write(`${this.first ? '' : ',\n'}${json(report)}`);
    this.first = false;
  }

  async end(end: ReportEnd): Promise<void> {
    const tail = [
      `\n],\n"portfolio":${json(end.portfolio)}`,
      `"baselines":${json(end.baselines)}`,
      `"normalYears":${json(end.normalYears)}`,
      `"unitFactors":${json(end.unitFactors)}`,
      `"unitFactorSource":${json(ENERGY_FACTOR_SOURCE)}`,
      `"notices":${json(end.notices)}`,
      `"caution":${json(REPORT_CAUTION)}`,
      `"contentHashCovers":"the bytes of this document before the contentHash key",\n`,
    ];
    await this.out.write(tail.join(',\n'));
    await this.out.writeUnhashed(`"contentHash":${json(this.out.digest())}}\n`);
  }
}

/** The CSV table: the report row, each facility's rows, then the portfolio, notices, caution and a digest row. */
class CsvReportWriter {
  constructor(
    private readonly out: HashingWriter,
    private readonly frame: ReportFrame,
  ) {}

  async begin(): Promise<void> {
    const { window: w, confidence, head } = this.frame;
    await this.out.write(
      CSV_HEADER +
        csvLine({
          record: 'report',
          start: w.from,
          end: w.to,
          note: `${w.label}; confidence ${confidence}; streamed: the portfolio rows follow the facilities; audit head ${head?.seq ?? 0} ${head?.hash ?? ''}`,
        }),
    );
  }

  async facility(report: ReturnType<typeof facilityReport>): Promise<void> {
    await this.out.write(facilityRows(report, this.frame.window).map(csvLine).join(''));
  }

  async end(end: ReportEnd): Promise<void> {
    const rows = [...portfolioRows(end.portfolio, this.frame.window), ...closingRows(end.notices, REPORT_CAUTION)];
    await this.out.write(rows.map(csvLine).join(''));
    const digest = this.out.digest();
    await this.out.writeUnhashed(
      csvLine({ record: 'digest', note: `content hash ${digest}: SHA-256 of every byte before this row` }),
    );
  }
}

// ---------------------------------------------------------------------------
// Reading a chunk of facilities at once.

/**
 * Each item's reads, the next item's started before this one's are handed
 * over: the database answers the next chunk's queries while this process
 * computes the current one. At most two chunks are held at once.
 */
async function* readAhead<I, T>(items: readonly I[], read: (item: I) => Promise<T>): AsyncGenerator<T> {
  // A read left pending when the consumer stops early must not become an unhandled rejection.
  const started = (item: I) => {
    const promise = read(item);
    promise.catch(() => undefined);
    return promise;
  };
  let next = items.length > 0 ? started(items[0]!) : null;
  for (let i = 0; i < items.length; i++) {
    const current = next!;
    next = i + 1 < items.length ? started(items[i + 1]!) : null;
    yield await current;
  }
}

function chunk<T>(items: readonly T[], size: number): T[][] {
  const out: T[][] = [];
  for (let i = 0; i < items.length; i += size) out.push(items.slice(i, i + size));
  return out;
}

type FacilityRow = ReportFrame['facilityRows'][number];

/** The chunk's facilities with their meters, each in the report's order (created_at, id). */
async function metersOf(
  db: Executor,
  facilities: readonly FacilityRow[],
): Promise<{ facility: FacilityRow; meters: MeterRow[] }[]> {
  const rows =
    facilities.length === 0
      ? []
      : await db
          .selectFrom('meters')
          .selectAll()
          .where(
            'facility_id',
            'in',
            facilities.map((f) => f.id),
          )
          .orderBy('created_at')
          .orderBy('id')
          .execute();
  const byFacility = new Map<string, MeterRow[]>(facilities.map((f) => [f.id, []]));
  for (const row of rows) byFacility.get(row.facility_id)?.push(row);
  return facilities.map((facility) => ({ facility, meters: byFacility.get(facility.id)! }));
}

type BaselineSummaryRow = Pick<
  BaselineRow,
  'id' | 'version' | 'content_hash' | 'period_start' | 'period_end' | 'temperature_form'
>;

/** Each meter's frozen baseline and its model (projectionModelsOf: the compact stored form where it checks out). */
async function frozenBaselines(
  db: Executor,
  meters: readonly MeterRow[],
): Promise<Map<string, { row: BaselineSummaryRow; model: ProjectionModel | null }>> {
  const out = new Map<string, { row: BaselineSummaryRow; model: ProjectionModel | null }>();
  if (meters.length === 0) return out;
  const rows = await db
    .selectFrom('baselines')
    .select(['id', 'meter_id', 'version', 'content_hash', 'period_start', 'period_end', 'temperature_form'])
    .where(
      'meter_id',
      'in',
      meters.map((m) => m.id),
    )
    .where('status', '=', 'frozen')
    .execute();
  const models = await projectionModelsOf(db, rows);
  for (const row of rows) out.set(row.meter_id, { row, model: models.get(row.id) ?? null });
  return out;
}

async function ratesOf(
  db: Executor,
  meters: readonly MeterRow[],
): Promise<Map<string, ReturnType<typeof scheduleOfRows>>> {
  const out = new Map<string, ReturnType<typeof scheduleOfRows>>();
  if (meters.length === 0) return out;
  const rows = await db
    .selectFrom('rates')
    .selectAll()
    .where(
      'meter_id',
      'in',
      meters.map((m) => m.id),
    )
    .orderBy('meter_id')
    .orderBy('effective_from')
    .execute();
  const byMeter = new Map<string, typeof rows>();
  for (const row of rows) byMeter.set(row.meter_id, [...(byMeter.get(row.meter_id) ?? []), row]);
  for (const meter of meters) out.set(meter.id, scheduleOfRows(meter.id, meter.unit, byMeter.get(meter.id) ?? []));
  return out;
}

async function adjustmentsOf(db: Executor, meters: readonly MeterRow[]) {
  const ids = meters.map((m) => m.id);
  const rows =
    ids.length === 0
      ? []
      : await db
          .selectFrom('adjustments')
          .selectAll()
          .where('meter_id', 'in', ids)
          .where('withdrawn_at', 'is', null)
          .orderBy('period_start')
          .execute();
  const byMeter = new Map<string, typeof rows>();
  for (const row of rows) {
    const list = byMeter.get(row.meter_id);
    if (list) list.push(row);
    else byMeter.set(row.meter_id, [row]);
  }
  return byMeter;
}

interface StationData {
  byId: Map<
    string,
    { unit: TemperatureUnit; name: string; normal: { temps_json: string; content_hash: string; source: string } | null }
  >;
  weather: StationWeather;
  /** Each station's filled days (date → method), read once for the whole report: they are few. */
  filled: Map<string, Map<string, FillMethod>>;
}

async function stationData(db: Executor, organisationId: string): Promise<StationData> {
  const stations = await db
    .selectFrom('weather_stations')
    .select(['id', 'temperature_unit', 'name'])
    .where('organisation_id', '=', organisationId)
    .execute();
  const ids = stations.map((s) => s.id);
  const normals =
    ids.length === 0 ? [] : await db.selectFrom('normal_years').selectAll().where('station_id', 'in', ids).execute();
  const normalById = new Map(normals.map((n) => [n.station_id, n]));
  const filled = new Map<string, Map<string, FillMethod>>();
  if (ids.length > 0) {
    const rows = await db
      .selectFrom('weather_observations')
      .select(['station_id', 'date', 'fill_method'])
      .where('station_id', 'in', ids)
      .where('fill_method', 'is not', null)
      .execute();
    for (const row of rows) {
      let days = filled.get(row.station_id);
      if (!days) filled.set(row.station_id, (days = new Map()));
      days.set(row.date, row.fill_method!);
    }
  }
  return {
    byId: new Map(
      stations.map((s) => [s.id, { unit: s.temperature_unit, name: s.name, normal: normalById.get(s.id) ?? null }]),
    ),
    weather: new StationWeather(db),
    filled,
  };
}

/** The earliest day a chunk's readings are asked from: the window's start, or the start of a contract year it touches. */
function readingsFrom(frame: ReportFrame, facilities: readonly FacilityRow[]): string {
  let from = frame.window.from;
  for (const facility of facilities) {
    const contract = frame.contracts.get(facility.id);
    if (!contract) continue;
    for (const year of contractYearsOverlapping(contract.start, contract.years, frame.window)) {
      const start = contractYearWindow(contract.start, contract.years, year).from;
      if (start < from) from = start;
    }
  }
  return from;
}

/** Reporting readings of a chunk's meters, read at once; a request outside what was read falls back to its own query. */
async function chunkReads(
  db: Executor,
  meters: readonly MeterRow[],
  from: string,
  to: string,
  stations: StationData,
): Promise<ReportReads> {
  const byMeter = new Map<string, Reading[]>();
  if (meters.length > 0) {
    const rows = await db
      .selectFrom('readings')
      .select(['meter_id', 'period_start', 'period_end', 'quantity', 'estimated'])
      .where(
        'meter_id',
        'in',
        meters.map((m) => m.id),
      )
      .where('period_start', '<', to)
      .where('period_end', '>', from)
      .orderBy('meter_id')
      .orderBy('period_start')
      .orderBy('period_end')
      .execute();
    for (const row of rows) {
      const reading = {
        start: row.period_start,
        end: row.period_end,
        quantity: row.quantity,
        estimated: row.estimated === 1,
      };
      const list = byMeter.get(row.meter_id);
      if (list) list.push(reading);
      else byMeter.set(row.meter_id, [reading]);
    }
  }
  return {
    readings: async (meterId: string, window: ReadingWindow) => {
      const covered =
        window.endAfter !== undefined &&
        window.endAfter >= from &&
        window.startBefore !== undefined &&
        window.startBefore <= to;
      if (!covered) return loadReadings(db, meterId, window);
      return (byMeter.get(meterId) ?? []).filter(
        (r) =>
          (window.startOnOrAfter === undefined || r.start >= window.startOnOrAfter) &&
          (window.endOnOrBefore === undefined || r.end <= window.endOnOrBefore) &&
          r.start < window.startBefore! &&
          r.end > window.endAfter!,
      );
    },
    weather: (stationId, readings) => stations.weather.indexed(stationId, readings),
    filledDays: async (stationId, dayFrom, dayTo) => {
      // Exactly what loadFilledDays answers: the station's filled days on [dayFrom, dayTo).
      const out = new Map<string, FillMethod>();
      for (const [date, method] of stations.filled.get(stationId) ?? [])
        if (date >= dayFrom && date < dayTo) out.set(date, method);
      return out;
    },
    // Few meters carry variables: their values are read per meter.
    variableSeries: (variables, window) => reportingSeries(db, variables, window),
  };
}

/** Days of weather a station read holds beyond what was asked, so the next meters' requests fall inside it. */
const WEATHER_MARGIN_DAYS = 400;

/** Each station's daily weather, read once over a span wide enough for many meters and sliced per request. */
class StationWeather {
  private readonly spans = new Map<
    string,
    { from: string; to: string; days: DailyTemperature[]; index?: DayIndexedWeather }
  >();

  constructor(private readonly db: Executor) {}

  /**
   * The station's days over every day of `readings`, indexed once per span
   * read (it holds more days than they span: an alignment reads only its own).
   */
  async indexed(stationId: string, readings: readonly Reading[]): Promise<DailyWeather> {
    const wanted = spanOf(readings);
    if (wanted === null) return [];
    const { from, to } = wanted;
    let span = this.spans.get(stationId);
    if (!span || from < span.from || to > span.to) {
      const wideFrom = shiftDays(span && span.from < from ? span.from : from, -WEATHER_MARGIN_DAYS);
      const wideTo = shiftDays(span && span.to > to ? span.to : to, WEATHER_MARGIN_DAYS);
      span = { from: wideFrom, to: wideTo, days: await loadDailyWeather(this.db, stationId, wideFrom, wideTo) };
      this.spans.set(stationId, span);
    }
    span.index ??= new DayIndexedWeather(span.days);
    return span.index;
  }
}

function shiftDays(date: string, days: number): string {
  const shifted = new Date(Date.parse(`${date}T00:00:00Z`) + days * 86_400_000);
  const text = shifted.toISOString().slice(0, 10);
  // Keep within four-digit years, where ISO text order is date order.
  return text < '0001-01-01' ? '0001-01-01' : text > '9999-12-31' ? '9999-12-31' : text;
}
