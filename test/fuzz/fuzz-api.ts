/**
 * The service the fuzzer talks to: the ordinary test service (one key per
 * role, a second organisation), a realistic little ledger seeded through the
 * API, and a second app on the same database with a small body limit so
 * "just over the limit" bodies are cheap to send.
 */
import type { FastifyInstance } from 'fastify';
import { buildApp } from '../../src/http/app.js';
import type { Reading } from '../../src/engine/index.js';
import { makeTestApi, steppingClock, type TestApi } from '../support/api.js';
import { CLIMATES, SAMPLE_BUILDING, dailyWeather, monthlyReadings, seededRandom } from '../support/synthetic.js';

/** Small, so oversized bodies cost little; every seeded write goes through the default-limit app. */
export const FUZZ_BODY_LIMIT = 16 * 1024;

/** Real ids of the seeded ledger, by the kind of thing they name. */
export interface SeededIds {
  stations: string[];
  facilities: string[];
  meters: string[];
  baselines: string[];
  /** Keys the fuzzer may revoke (never the keys it sends). */
  apiKeys: string[];
  /** Ids of organisation B: every one must answer 404 to organisation A. */
  otherOrganisation: string[];
}

export interface FuzzService {
  api: TestApi;
  /** The same routes and database, with bodyLimit FUZZ_BODY_LIMIT. */
  app: FastifyInstance;
  ids: SeededIds;
  close(): Promise<void>;
}

async function expectStatus(
  response: Promise<{ status: number; text: string }>,
  status: number,
  what: string,
): Promise<any> {
  const answer = await response;
  if (answer.status !== status)
    throw new Error(`seeding ${what}: expected ${status}, got ${answer.status} ${answer.text.slice(0, 300)}`);
  return JSON.parse(answer.text);
}

/**
 * synthetic: the seed sets the truth. An invented depot in an invented
 * temperate climate: three years of daily weather, 24 monthly baseline bills
 * and 12 reporting bills, a frozen baseline and a second, draft one.
 */
async function seedLedger(api: TestApi): Promise<SeededIds> {
  const random = seededRandom(606);
  const weather = dailyWeather(CLIMATES.temperate, '2023-01-01', 1096, random);
  const baseline: Reading[] = monthlyReadings(SAMPLE_BUILDING, weather, '2023-01-01', 24, random);
  const reporting: Reading[] = monthlyReadings(
    { ...SAMPLE_BUILDING, base: 255, heatingRate: 6.5 },
    weather,
    '2025-01-01',
    12,
    random,
  );

  const station = await expectStatus(
    api.call('POST', '/v1/weather-stations', { body: { name: 'Invented hill station', temperatureUnit: 'F' } }),
    201,
    'station',
  );
  await expectStatus(
    api.call('PUT', `/v1/weather-stations/${station.id}/observations`, {
      body: { observations: weather.map((d) => ({ date: d.date, temp: d.temp })) },
    }),
    200,
    'observations',
  );
  const facility = await expectStatus(
    api.call('POST', '/v1/facilities', { body: { name: 'Fuzz depot (invented)', floorArea: 12_500 } }),
    201,
    'facility',
  );
  const meter = await expectStatus(
    api.call('POST', `/v1/facilities/${facility.id}/meters`, {
      body: { name: 'Depot main electric (invented)', fuel: 'electricity', unit: 'kWh', weatherStationId: station.id },
    }),
    201,
    'meter',
  );
  const rows = [...baseline, ...reporting].map((r) => ({
    start: r.start,
    end: r.end,
    quantity: Math.round(r.quantity * 10) / 10,
  }));
  await expectStatus(
    api.call('POST', `/v1/meters/${meter.id}/readings`, { body: { readings: rows } }),
    201,
    'readings',
  );
  const frozen = await expectStatus(
    api.call('POST', `/v1/meters/${meter.id}/baselines`, { body: { start: '2023-01-01', end: '2025-01-01' } }),
    201,
    'baseline',
  );
  await expectStatus(
    api.call('POST', `/v1/baselines/${frozen.id}/freeze`, { body: { note: 'Agreed in the invented M&V plan' } }),
    200,
    'freeze',
  );
  const draft = await expectStatus(
    api.call('POST', `/v1/meters/${meter.id}/baselines`, { body: { start: '2023-02-01', end: '2025-01-01' } }),
    201,
    'draft',
  );

  const spareKeys: string[] = [];
  for (const role of ['analyst', 'integration'] as const) {
    spareKeys.push(
      (await expectStatus(api.call('POST', '/v1/api-keys', { body: { name: `spare ${role} key`, role } }), 201, 'key'))
        .key.id,
    );
  }
  const otherStation = await expectStatus(
    api.call('POST', '/v1/weather-stations', {
      as: 'other',
      body: { name: 'Other organisation station', temperatureUnit: 'C' },
    }),
    201,
    'other station',
  );
  return {
    stations: [station.id],
    facilities: [facility.id],
    meters: [meter.id],
    baselines: [frozen.id, draft.id],
    apiKeys: spareKeys,
    otherOrganisation: [otherStation.id],
  };
}

export async function startFuzzService(): Promise<FuzzService> {
  const now = steppingClock();
  const api = await makeTestApi({ now });
  const ids = await seedLedger(api);
  const app = await buildApp({ store: api.store, now, bodyLimit: FUZZ_BODY_LIMIT });
  await app.ready();
  return {
    api,
    app,
    ids,
    close: async () => {
      await app.close();
      await api.close();
    },
  };
}
