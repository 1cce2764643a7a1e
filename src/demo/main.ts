/**
 * `npm run demo`: the service on a fresh demo database, seeded through its
 * own API with the invented Quillfen school district (see scenario.ts), then
 * left running with an admin key and the URLs to try printed.
 *
 *   --seed-only   seed, print, and stop (used by the tests)
 *   PORT, HOST    as for the service (default 127.0.0.1:8080)
 */
import { mkdirSync, rmSync, writeFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { loadConfig } from '../config.js';
import { startService, type RunningService } from '../server.js';
import { generateApiKey } from '../store/api-keys.js';
import { convertEnergy, NORMAL_YEAR_DAYS } from '../engine/index.js';
import {
  BASELINE_END,
  CONTRACT_CURRENCY,
  DEMO_DISTRICT,
  CONTRACT_START,
  CONTRACT_YEARS,
  DEMO_QUARTER,
  demoBuiltInSavings,
  demoNormalYear,
  BASELINE_START,
  DEMO_FACILITIES,
  DEMO_STATION,
  REPORTING_END,
  demoBills,
  demoWeather,
} from './scenario.js';
import { describeCalendarCase, seedCalendarCase, type CalendarCase } from './calendar-case.js';

export const DEMO_DATABASE = join('var', 'demo', 'mvledger-demo.sqlite');

export interface DemoSeed {
  adminKey: string;
  analystKey: string;
  engineerKey: string;
  integrationKey: string;
  stationId: string;
  facilities: {
    id: string;
    name: string;
    meters: { id: string; name: string; unit: string; baselineId: string; model: string }[];
  }[];
  /** The early-years centre fitted without and with its calendar (calendar-case.ts). */
  calendarCase: CalendarCase;
  /** HTML reports fetched from the API and saved next to the demo database. */
  reports: { quarter: string; contractYear: string };
}

type Call = (method: string, path: string, body?: unknown) => Promise<any>;

function client(base: string, token: string): Call {
  return async (method, path, body) => {
    const response = await fetch(`${base}${path}`, {
      method,
      headers: {
        authorization: `Bearer ${token}`,
        ...(body === undefined ? {} : { 'content-type': 'application/json' }),
      },
      ...(body === undefined ? {} : { body: JSON.stringify(body) }),
    });
    const text = await response.text();
    if (!response.ok) throw new Error(`${method} ${path} answered ${response.status}: ${text.slice(0, 300)}`);
    return text ? JSON.parse(text) : undefined;
  };
}

/** Seed the running service through its API, as an engineer and a billing system would. */
export async function seedDemo(
  base: string,
  adminKey: string,
  reportFolder = dirname(DEMO_DATABASE),
): Promise<DemoSeed> {
  const call = client(base, adminKey);
  const analyst = await call('POST', '/v1/api-keys', { name: 'finance analyst (demo)', role: 'analyst' });
  const engineer = await call('POST', '/v1/api-keys', {
    name: 'performance-contract engineer (demo)',
    role: 'engineer',
  });
  const integration = await call('POST', '/v1/api-keys', { name: 'billing system (demo)', role: 'integration' });
  const billing = client(base, integration.token);

  const weather = demoWeather();
  const weatherByDate = new Map(weather.map((day) => [day.date, day.temp]));
  const station = await call('POST', '/v1/weather-stations', { name: DEMO_STATION, temperatureUnit: 'F' });
  await billing('PUT', `/v1/weather-stations/${station.id}/observations`, { observations: weather });
  await call('PUT', `/v1/weather-stations/${station.id}/normal-year`, {
    source: 'Invented long-term mean of the Quillfen valley (demo)',
    days: demoNormalYear(NORMAL_YEAR_DAYS),
  });

  const facilities: DemoSeed['facilities'] = [];
  let seed = 1;
  for (const plan of DEMO_FACILITIES) {
    const facility = await call('POST', '/v1/facilities', {
      name: plan.name,
      address: plan.address,
      floorArea: plan.floorArea,
    });
    const meters: DemoSeed['facilities'][number]['meters'] = [];
    let builtInMMBtu = 0;
    let builtInCost = 0;
    for (const meterPlan of plan.meters) {
      const meter = await call('POST', `/v1/facilities/${facility.id}/meters`, {
        name: meterPlan.name,
        fuel: meterPlan.fuel,
        unit: meterPlan.unit,
        weatherStationId: station.id,
      });
      const baselineBills = demoBills(meterPlan, weatherByDate, BASELINE_START, BASELINE_END, 0, seed++);
      const reportingBills = demoBills(
        meterPlan,
        weatherByDate,
        BASELINE_END,
        REPORTING_END,
        meterPlan.reportingSaving,
        seed++,
      );
      await call('POST', `/v1/meters/${meter.id}/readings`, { readings: baselineBills });
      const baseline = await call('POST', `/v1/meters/${meter.id}/baselines`, {
        start: BASELINE_START,
        end: BASELINE_END,
      });
      await call('POST', `/v1/baselines/${baseline.id}/freeze`, { note: 'Baseline agreed in the M&V plan (demo)' });
      await billing('POST', `/v1/meters/${meter.id}/readings`, { readings: reportingBills });
      await call('PUT', `/v1/meters/${meter.id}/rates`, {
        currency: CONTRACT_CURRENCY,
        rates: [{ from: BASELINE_END, price: meterPlan.price, escalation: meterPlan.escalation }],
      });
      if (meterPlan.change) {
        const { start, end, perDay, reason, uncertainty } = meterPlan.change;
        await call('POST', `/v1/meters/${meter.id}/adjustments`, { start, end, perDay, reason, uncertainty });
      }
      const builtIn = demoBuiltInSavings(meterPlan, weatherByDate, BASELINE_END, REPORTING_END);
      builtInMMBtu += convertEnergy(builtIn, meterPlan.unit, 'MMBtu');
      builtInCost += builtIn * meterPlan.price;
      meters.push({
        id: meter.id,
        name: meterPlan.name,
        unit: meterPlan.unit,
        baselineId: baseline.id,
        model: baseline.chosen,
      });
    }
    // Invented guarantees: a share of what the scenario builds in, so one school falls short.
    const guarantee = (value: number, step: number) => Math.round((value * plan.guaranteeShare) / step) * step;
    await call('PUT', `/v1/facilities/${facility.id}/contract`, {
      start: CONTRACT_START,
      years: CONTRACT_YEARS,
      currency: CONTRACT_CURRENCY,
      energyUnit: 'MMBtu',
      guarantees: Array.from({ length: CONTRACT_YEARS }, (_, i) => ({
        year: i + 1,
        energy: guarantee(builtInMMBtu, 10),
        cost: guarantee(builtInCost, 100),
      })),
      // Invented identification: the reference, parties and plan a statement shows.
      reference: `EPC-DEMO-${facilities.length + 1} (invented)`,
      parties: [
        { role: 'customer', name: `${plan.name} board (invented)` },
        { role: 'energy service company', name: 'Tallowmere Retrofit Partners (invented)' },
      ],
      mvPlanReference: 'M&V plan, revision 2 (invented)',
      mvOption: 'C',
      confidence: 0.9,
    });
    facilities.push({ id: facility.id, name: plan.name, meters });
  }
  const calendarCase = await seedCalendarCase(client(base, engineer.token), billing, station.id, weatherByDate);
  const reports = {
    quarter: await saveReport(
      base,
      analyst.token,
      `quarter=${DEMO_QUARTER}&format=html`,
      join(reportFolder, `savings-report-${DEMO_QUARTER}.html`),
    ),
    contractYear: await saveReport(
      base,
      analyst.token,
      'contractYear=1&format=html&confidence=0.9',
      join(reportFolder, 'savings-report-contract-year-1.html'),
    ),
  };
  return {
    adminKey,
    analystKey: analyst.token,
    engineerKey: engineer.token,
    integrationKey: integration.token,
    stationId: station.id,
    facilities,
    calendarCase,
    reports,
  };
}

/** Fetch a report as the finance analyst would, and keep it as a file a browser can open. */
async function saveReport(base: string, token: string, query: string, file: string): Promise<string> {
  const response = await fetch(`${base}/v1/reports/savings?${query}`, {
    headers: { authorization: `Bearer ${token}` },
  });
  const text = await response.text();
  if (!response.ok)
    throw new Error(`GET /v1/reports/savings?${query} answered ${response.status}: ${text.slice(0, 300)}`);
  mkdirSync(dirname(file), { recursive: true });
  writeFileSync(file, text);
  return file;
}

export function describeDemo(base: string, seed: DemoSeed): string {
  const first = seed.facilities[0]!.meters[0]!;
  const lines = [
    '',
    'mvledger demo: the invented Quillfen School District (three schools, electricity and gas, and an early-years centre,',
    `baseline ${BASELINE_START}..${BASELINE_END}, reporting year 2025)`,
    '',
    `  admin key:        ${seed.adminKey}`,
    `  engineer key:     ${seed.engineerKey}`,
    `  analyst key:      ${seed.analystKey}`,
    `  integration key:  ${seed.integrationKey}`,
    '',
    `  workbench:        ${base}/app/  (paste a key above; it stays in that browser tab only)`,
    `  API docs:         ${base}/docs`,
    `  facilities:       ${base}/v1/facilities`,
    '',
    `  quarterly report ${DEMO_QUARTER}, saved from the API; open it in a browser:`,
    `    ${pathToFileURL(resolve(seed.reports.quarter)).href}`,
    `  contract year 1 report, saved likewise:`,
    `    ${pathToFileURL(resolve(seed.reports.contractYear)).href}`,
    `  the same from the API (key in the Authorization header):`,
    `    ${base}/v1/reports/savings?quarter=${DEMO_QUARTER}&format=html`,
    `    ${base}/v1/reports/savings?quarter=${DEMO_QUARTER}&format=csv`,
    `    ${base}/v1/reports/savings?quarter=${DEMO_QUARTER}`,
  ];
  for (const facility of seed.facilities) {
    for (const meter of facility.meters) {
      lines.push(`  ${facility.name}, ${meter.name} (${meter.model}):`);
      lines.push(`    savings:        ${base}/v1/meters/${meter.id}/savings?confidence=0.9`);
      lines.push(`    signature:      ${base}/v1/baselines/${meter.baselineId}/signature.svg`);
    }
  }
  lines.push('');
  lines.push(...describeCalendarCase(base, seed.calendarCase));
  lines.push('');
  lines.push(`  audit check:      ${base}/v1/audit/verify`);
  lines.push('');
  lines.push('Try:');
  lines.push(
    `  curl -H "Authorization: Bearer ${seed.analystKey}" "${base}/v1/meters/${first.id}/savings?confidence=0.9"`,
  );
  lines.push(
    `  curl -H "Authorization: Bearer ${seed.analystKey}" -o signature.svg "${base}/v1/baselines/${first.baselineId}/signature.svg"`,
  );
  lines.push(
    `  curl -H "Authorization: Bearer ${seed.analystKey}" -o report.html "${base}/v1/reports/savings?quarter=${DEMO_QUARTER}&format=html"`,
  );
  lines.push('');
  lines.push("The figures are estimates under the contract's M&V plan and the cited methods; contractual and");
  lines.push('engineering decisions rest with the parties and a licensed professional, under local rules.');
  lines.push('');
  return lines.join('\n');
}

export async function runDemo(options: {
  seedOnly: boolean;
  databaseFile?: string;
  port?: number;
  print?: (text: string) => void;
}): Promise<{ service: RunningService; seed: DemoSeed; base: string }> {
  const print = options.print ?? ((text: string) => process.stdout.write(text));
  const databaseFile = options.databaseFile ?? DEMO_DATABASE;
  for (const suffix of ['', '-wal', '-shm']) rmSync(`${databaseFile}${suffix}`, { force: true });
  const { token } = generateApiKey();
  const config = {
    ...loadConfig(),
    databaseUrl: `sqlite:${databaseFile}`,
    bootstrapKey: token,
    bootstrapOrganisation: DEMO_DISTRICT,
    logLevel: 'warn' as const,
  };
  if (options.port !== undefined) config.port = options.port;
  const service = await startService(config);
  const base = service.url.replace('[::1]', 'localhost');
  const seed = await seedDemo(base, token, dirname(databaseFile));
  print(describeDemo(base, seed));
  if (options.seedOnly) await service.stop();
  else print('Serving until Ctrl-C.\n');
  return { service, seed, base };
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  const seedOnly = process.argv.includes('--seed-only');
  runDemo({ seedOnly })
    .then(({ service }) => {
      if (seedOnly) return;
      for (const signal of ['SIGINT', 'SIGTERM'] as const)
        process.once(signal, () => void service.stop().then(() => process.exit(0)));
    })
    .catch((error: unknown) => {
      process.stderr.write(`mvledger demo: ${error instanceof Error ? error.message : String(error)}\n`);
      process.exit(1);
    });
}
