/**
 * A large invented portfolio, written straight through the store (no HTTP,
 * no per-row audit) for benchmarks and the streamed report's tests: one
 * organisation ("Thistlewade Energy Partners", invented), weather stations
 * with three years of daily weather and a normal year each, facilities with
 * a ten-year contract, meters with 36 monthly bills (two baseline years,
 * 2023–2024, and a reporting year, 2025, after an invented retrofit), a
 * contract rate and a frozen baseline each. Seeded: the same options give
 * the same rows (ids included).
 *
 * Fitting 10,000 baselines would take minutes, so meters share a smaller
 * set of invented building archetypes (a few per station): a meter's
 * baseline bills are its archetype's, and its frozen baseline is its own row
 * (own id, meter and content hash) holding the archetype's fit. Reporting
 * bills are the meter's own: the archetype's daily response with the meter's
 * saving and noise. A report therefore does the same work per meter as on
 * real data: every meter's frozen model is read, checked and parsed on its
 * own (its compact stored form, written here as a freeze writes it).
 */
import type { Kysely } from 'kysely';
import {
  addDays,
  analyseBaseline,
  type DailyTemperature,
  type ModelName,
  type Reading,
  type ShapeFit,
} from '../engine/index.js';
import { canonicalJson, sha256Hex } from '../lib/canonical-json.js';
import { seededRandom, type Random } from '../lib/seeded-random.js';
import { baselineContentHash, toStoredJson } from '../store/baseline-content.js';
import type { BaselineRow, Database, FrozenModelRow } from '../store/schema.js';
import { deriveFrozenModel, storedModelRow, type FrozenModel } from '../services/frozen-models.js';

export interface PortfolioOptions {
  facilities: number;
  metersPerFacility: number;
  stations: number;
  /** Building archetypes per station (each fitted once). */
  archetypesPerStation: number;
  seed: number;
}

export const FULL_PORTFOLIO: PortfolioOptions = {
  facilities: 2000,
  metersPerFacility: 5,
  stations: 20,
  archetypesPerStation: 10,
  seed: 2026,
};

export interface GeneratedPortfolio {
  organisationId: string;
  facilities: number;
  meters: number;
  readings: number;
  baselinesFitted: number;
}

const FIRST_DAY = '2023-01-01';
const DAYS = 1096; // 2023-01-01 .. 2025-12-31
const BASELINE_END = '2025-01-01';
const CONTRACT_START = '2025-01-01';
const CREATED_AT = '2026-01-15T09:00:00.000Z';
const KEY_ID = 'key_portfolio-generator';
const INSERT_ROWS = 500;

const PLACE_WORDS = [
  'Alder',
  'Brindle',
  'Corrow',
  'Dunmere',
  'Eskhollow',
  'Fallowby',
  'Gorsemoor',
  'Hazelmere',
  'Ivyreach',
  'Juniper',
];
const SITE_WORDS = ['Court', 'Works', 'Hall', 'Depot', 'Library', 'School', 'Clinic', 'Yard', 'House', 'Centre'];

interface Archetype {
  station: number;
  fuel: 'electricity' | 'natural-gas';
  unit: 'kWh' | 'therm';
  price: number;
  usePerDay: (temp: number) => number;
  baselineBills: Reading[];
  fit?: { row: Omit<BaselineRow, 'id' | 'meter_id' | 'content_hash'> };
  /** The frozen model every meter of this archetype stores (the content it derives from differs only in ids). */
  model?: FrozenModel;
}

/** Generate the portfolio into `db` (migrated, without this organisation), in one transaction. */
export function generatePortfolio(
  db: Kysely<Database>,
  options: PortfolioOptions = FULL_PORTFOLIO,
): Promise<GeneratedPortfolio> {
  return db.transaction().execute((trx) => generate(trx, options));
}

async function generate(db: Kysely<Database>, options: PortfolioOptions): Promise<GeneratedPortfolio> {
  const random = seededRandom(options.seed);
  const id = idMaker(options.seed);
  const organisationId = id('org');
  const days = Array.from({ length: DAYS }, (_, d) => addDays(FIRST_DAY, d));

  await db
    .insertInto('organisations')
    .values({ id: organisationId, name: 'Thistlewade Energy Partners', created_at: CREATED_AT })
    .execute();

  // Stations: a seasonal cycle of their own, with day-to-day AR(1) departures.
  const stations = Array.from({ length: options.stations }, (_, s) => {
    const mean = 48 + 14 * random.uniform();
    const swing = 16 + 10 * random.uniform();
    const seasonal = (d: number) => mean - swing * Math.cos((2 * Math.PI * (d - 20)) / 365.25);
    let departure = 0;
    const weather: DailyTemperature[] = days.map((date, d) => {
      departure = 0.7 * departure + 4 * random.normal();
      return { date, temp: Math.round((seasonal(d) + departure) * 10) / 10 };
    });
    const normal = Array.from({ length: 365 }, (_, d) => Math.round(seasonal(d) * 10) / 10);
    return { id: id('wst'), name: `${PLACE_WORDS[s % PLACE_WORDS.length]} Ridge station ${s + 1}`, weather, normal };
  });
  for (const station of stations) {
    await db
      .insertInto('weather_stations')
      .values({
        id: station.id,
        organisation_id: organisationId,
        name: station.name,
        temperature_unit: 'F',
        created_at: CREATED_AT,
      })
      .execute();
    await insertChunks(
      db,
      'weather_observations',
      station.weather.map((w) => ({
        station_id: station.id,
        date: w.date,
        temp: w.temp,
        tmin: null,
        tmax: null,
        updated_at: CREATED_AT,
        fill_method: null,
        fill_note: null,
      })),
    );
    const source = 'synthetic: the generator’s seasonal cycle';
    await db
      .insertInto('normal_years')
      .values({
        station_id: station.id,
        source,
        temps_json: canonicalJson(station.normal),
        content_hash: sha256Hex(canonicalJson({ source, temps: station.normal })),
        updated_at: CREATED_AT,
      })
      .execute();
  }

  const archetypes: Archetype[] = [];
  for (let s = 0; s < stations.length; s++) {
    for (let a = 0; a < options.archetypesPerStation; a++)
      archetypes.push(makeArchetype(random, s, a, stations[s]!.weather));
  }

  let meters = 0;
  let readings = 0;
  let fitted = 0;
  let facilityRows: Database['facilities'][] = [];
  let contractRows: Database['contracts'][] = [];
  let meterRows: Database['meters'][] = [];
  let readingRows: Database['readings'][] = [];
  let rateRows: Database['rates'][] = [];
  let baselineRows: BaselineRow[] = [];
  let modelRows: FrozenModelRow[] = [];
  const flush = async (force: boolean) => {
    if (!force && readingRows.length < 20_000) return;
    await insertChunks(db, 'facilities', facilityRows);
    await insertChunks(db, 'contracts', contractRows);
    await insertChunks(db, 'meters', meterRows);
    await insertChunks(db, 'readings', readingRows);
    await insertChunks(db, 'rates', rateRows);
    for (let i = 0; i < baselineRows.length; i += 50)
      await db
        .insertInto('baselines')
        .values(baselineRows.slice(i, i + 50))
        .execute();
    for (let i = 0; i < modelRows.length; i += 200)
      await db
        .insertInto('frozen_models')
        .values(modelRows.slice(i, i + 200))
        .execute();
    facilityRows = [];
    contractRows = [];
    meterRows = [];
    readingRows = [];
    rateRows = [];
    baselineRows = [];
    modelRows = [];
  };

  for (let f = 0; f < options.facilities; f++) {
    const facilityId = id('fac');
    const station = f % stations.length;
    const name = `${PLACE_WORDS[random.integer(0, PLACE_WORDS.length - 1)]} ${SITE_WORDS[random.integer(0, SITE_WORDS.length - 1)]} ${f + 1}`;
    facilityRows.push({
      id: facilityId,
      organisation_id: organisationId,
      name,
      address: null,
      floor_area: null,
      created_at: stamp(f),
    });
    contractRows.push({
      facility_id: facilityId,
      organisation_id: organisationId,
      contract_start: CONTRACT_START,
      years: 10,
      currency: 'USD',
      energy_unit: 'MMBtu',
      guarantees_json: canonicalJson([{ year: 1, energy: 150, cost: 2500 }]),
      updated_at: CREATED_AT,
      reference: null,
      parties_json: canonicalJson([]),
      mv_plan_reference: null,
      mv_option: null,
      confidence: 0.9,
    });
    for (let m = 0; m < options.metersPerFacility; m++) {
      const archetype =
        archetypes[station * options.archetypesPerStation + random.integer(0, options.archetypesPerStation - 1)]!;
      if (!archetype.fit) {
        archetype.fit = fitArchetype(archetype, stations[station]!.weather);
        fitted++;
      }
      const meterId = id('mtr');
      meterRows.push({
        id: meterId,
        organisation_id: organisationId,
        facility_id: facilityId,
        name: `${archetype.fuel === 'electricity' ? 'Electricity' : 'Gas'} meter ${m + 1}`,
        fuel: archetype.fuel,
        unit: archetype.unit,
        weather_station_id: stations[station]!.id,
        created_at: stamp(f * options.metersPerFacility + m),
      });
      const saving = 0.05 + 0.2 * random.uniform();
      const reporting = monthlyBills(
        stations[station]!.weather,
        24,
        12,
        (t) => archetype.usePerDay(t) * (1 - saving),
        random,
        0.04,
      );
      for (const bill of [...archetype.baselineBills, ...reporting]) {
        readingRows.push({
          meter_id: meterId,
          period_start: bill.start,
          period_end: bill.end,
          quantity: bill.quantity,
          estimated: 0,
          cost: null,
          created_at: CREATED_AT,
          updated_at: CREATED_AT,
        });
      }
      readings += 36;
      rateRows.push({
        meter_id: meterId,
        effective_from: FIRST_DAY,
        effective_to: null,
        price: archetype.price,
        escalation: 0,
        currency: 'USD',
        updated_at: CREATED_AT,
      });
      const row: BaselineRow = {
        ...archetype.fit.row,
        organisation_id: organisationId,
        id: id('bsl'),
        meter_id: meterId,
        content_hash: null,
      };
      row.content_hash = baselineContentHash(row);
      baselineRows.push(row);
      archetype.model ??= deriveFrozenModel(row, row.content_hash);
      modelRows.push(storedModelRow(row.id, row.content_hash, archetype.model));
      meters++;
    }
    await flush(false);
  }
  await flush(true);
  return { organisationId, facilities: options.facilities, meters, readings, baselinesFitted: fitted };
}

function makeArchetype(
  random: Random,
  station: number,
  index: number,
  weather: readonly DailyTemperature[],
): Archetype {
  const electric = index % 2 === 0;
  const size = 0.5 + 2 * random.uniform();
  const base = (electric ? 900 : 40) * size;
  const heatingBelow = 52 + 8 * random.uniform();
  const coolingAbove = 66 + 8 * random.uniform();
  const heatingRate = (electric ? 6 : 4) * size * random.uniform();
  const coolingRate = electric ? 30 * size * (0.3 + random.uniform()) : 0;
  const usePerDay = (t: number) =>
    base + heatingRate * Math.max(0, heatingBelow - t) + coolingRate * Math.max(0, t - coolingAbove);
  return {
    station,
    fuel: electric ? 'electricity' : 'natural-gas',
    unit: electric ? 'kWh' : 'therm',
    price: electric ? 0.14 : 1.2,
    usePerDay,
    baselineBills: monthlyBills(weather, 0, 24, usePerDay, random, 0.03),
  };
}

/** `count` calendar-month bills from month `first` (0 = January 2023), each the sum of the days' use with a per-bill wiggle. */
function monthlyBills(
  weather: readonly DailyTemperature[],
  first: number,
  count: number,
  usePerDay: (temp: number) => number,
  random: Random,
  noise: number,
): Reading[] {
  const bills: Reading[] = [];
  let index = 0;
  const startOf = (k: number) => {
    const y = 2023 + Math.floor(k / 12);
    return `${y}-${String((k % 12) + 1).padStart(2, '0')}-01`;
  };
  for (let k = first; k < first + count; k++) {
    const start = startOf(k);
    const end = startOf(k + 1);
    while (index < weather.length && weather[index]!.date < start) index++;
    let quantity = 0;
    for (let d = index; d < weather.length && weather[d]!.date < end; d++) quantity += usePerDay(weather[d]!.temp);
    bills.push({ start, end, quantity: Math.round(quantity * (1 + noise * random.normal()) * 100) / 100 });
  }
  return bills;
}

function fitArchetype(archetype: Archetype, weather: readonly DailyTemperature[]): NonNullable<Archetype['fit']> {
  const baselineWeather = weather.filter((w) => w.date < BASELINE_END);
  const analysis = analyseBaseline(archetype.baselineBills, baselineWeather, {});
  const fits: Partial<Record<ModelName, ShapeFit>> = {};
  for (const candidate of analysis.choice.candidates) if (candidate.fit) fits[candidate.model] = candidate.fit;
  return {
    row: {
      organisation_id: '',
      version: 1,
      period_start: FIRST_DAY,
      period_end: BASELINE_END,
      status: 'frozen',
      options_json: toStoredJson({}),
      document_json: toStoredJson(analysis.document),
      fits_json: toStoredJson(fits),
      inputs_json: toStoredJson({ readings: archetype.baselineBills, weather: baselineWeather, temperatureUnit: 'F' }),
      selected_model: analysis.choice.selected,
      chosen_model: analysis.choice.selected,
      choice_reason: null,
      note: 'generated portfolio',
      frozen_at: CREATED_AT,
      frozen_by: KEY_ID,
      supersedes_id: null,
      supersede_reason: null,
      created_at: CREATED_AT,
      created_by: KEY_ID,
      temperature_form: analysis.document.temperatureForm,
      short_baseline_override: null,
      extrapolation_override: null,
    },
  };
}

/** Deterministic ids in the service's form (prefix and a UUID-shaped hex), from the seed and a counter. */
function idMaker(seed: number): (kind: string) => string {
  let counter = 0;
  return (kind) => {
    const hex = sha256Hex(`${seed}:${counter++}`).slice(0, 32);
    return `${kind}_${hex.slice(0, 8)}-${hex.slice(8, 12)}-${hex.slice(12, 16)}-${hex.slice(16, 20)}-${hex.slice(20, 32)}`;
  };
}

/** Creation times one second apart, so the report's order (created_at, id) is the generation order. */
function stamp(k: number): string {
  return new Date(Date.parse(CREATED_AT) + k * 1000).toISOString();
}

async function insertChunks<T extends keyof Database>(
  db: Kysely<Database>,
  table: T,
  rows: readonly Database[T][],
): Promise<void> {
  for (let i = 0; i < rows.length; i += INSERT_ROWS) {
    // eslint-disable-next-line @typescript-eslint/no-explicit-any
    await db
      .insertInto(table)
      .values(rows.slice(i, i + INSERT_ROWS) as any)
      .execute();
  }
}
