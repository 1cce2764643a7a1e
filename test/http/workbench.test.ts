/**
 * What the workbench needs of the service: the static page at /app under its
 * own strict content security policy (files looked up by exact name, never
 * by a path on disk), the calling key's role and permissions (/v1/me), and
 * the numbers behind the bench's charts (/v1/baselines/{id}/points).
 *
 * Check values: ROLE_PERMISSIONS (src/http/principal.ts); the Guideline 14
 * definition CV(RMSE) = sqrt(Σe²/(n−p))/Ē (the field brief) recomputed from
 * the residuals the route returns, against the fit document's own CV(RMSE);
 * synthetic files the test writes.
 */
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Fastify, { type FastifyInstance } from 'fastify';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { installWorkbench, WORKBENCH_CSP } from '../../src/http/plugins/workbench.js';
import { ROLE_PERMISSIONS } from '../../src/domain/principal.js';
import { ROLES } from '../../src/store/api-keys.js';
import { makeTestApi, type TestApi } from '../support/api.js';
import { CLIMATES, SAMPLE_BUILDING, dailyWeather, monthlyReadings, seededRandom } from '../support/synthetic.js';

describe('the /app static files', () => {
  let folder: string;
  let app: FastifyInstance;
  let empty: FastifyInstance;

  beforeAll(async () => {
    folder = mkdtempSync(join(tmpdir(), 'mvledger-app-'));
    mkdirSync(join(folder, 'public'));
    mkdirSync(join(folder, 'modules', 'web', 'src'), { recursive: true });
    writeFileSync(join(folder, 'public', 'index.html'), '<!doctype html><title>test page</title>\n');
    writeFileSync(join(folder, 'public', 'workbench.css'), 'body { margin: 0; }\n');
    writeFileSync(join(folder, 'public', 'notes.txt'), 'not served: not a page type\n');
    writeFileSync(join(folder, 'modules', 'web', 'src', 'main.js'), 'export {};\n');
    app = Fastify();
    installWorkbench(app, { public: join(folder, 'public'), modules: join(folder, 'modules') });
    empty = Fastify();
    installWorkbench(empty, { public: join(folder, 'nothing'), modules: join(folder, 'nothing') });
  });
  afterAll(async () => {
    await app.close();
    await empty.close();
    rmSync(folder, { recursive: true, force: true });
  });

  it('serves the page, its styles and its modules with their types', async () => {
    expect((await app.inject('/app')).headers.location).toBe('/app/');
    const page = await app.inject('/app/');
    expect(page.statusCode).toBe(200);
    expect(page.headers['content-type']).toBe('text/html; charset=utf-8');
    expect(page.body).toContain('test page');
    expect((await app.inject('/app/workbench.css')).headers['content-type']).toBe('text/css; charset=utf-8');
    const module = await app.inject('/app/js/web/src/main.js');
    expect(module.statusCode).toBe(200);
    expect(module.headers['content-type']).toBe('text/javascript; charset=utf-8');
  });

  it('sends a policy with nothing inline and no other origin, on every answer', async () => {
    for (const url of ['/app/', '/app/workbench.css', '/app/js/web/src/main.js', '/app/missing.js']) {
      const response = await app.inject(url);
      expect(response.headers['content-security-policy']).toBe(WORKBENCH_CSP);
      expect(response.headers['x-content-type-options']).toBe('nosniff');
    }
    expect(WORKBENCH_CSP).not.toContain('unsafe');
    expect(WORKBENCH_CSP).not.toMatch(/https?:|\*/);
    expect(WORKBENCH_CSP).toContain("default-src 'none'");
    expect(WORKBENCH_CSP).toContain("frame-ancestors 'none'");
  });

  it('answers 304 to a matching ETag', async () => {
    const first = await app.inject('/app/workbench.css');
    const again = await app.inject({ url: '/app/workbench.css', headers: { 'if-none-match': String(first.headers.etag) } });
    expect(again.statusCode).toBe(304);
  });

  it('serves only known files: no other type, no path outside the folders', async () => {
    for (const url of [
      '/app/notes.txt',
      '/app/../package.json',
      '/app/%2e%2e/package.json',
      '/app/js/../../package.json',
      '/app/js/%2e%2e%2f%2e%2e%2fpackage.json',
    ]) {
      const response = await app.inject(url);
      expect([400, 404], url).toContain(response.statusCode);
      expect(response.body).not.toContain('"name"');
    }
  });

  it('says plainly when the page has not been built', async () => {
    const response = await empty.inject('/app/');
    expect(response.statusCode).toBe(503);
    expect(response.body).toContain('npm run build');
  });
});

describe('/v1/me and /v1/baselines/{id}/points', () => {
  let api: TestApi;
  // synthetic: an invented building in an invented climate; 24 monthly bills.
  const random = seededRandom(23);
  const weather = dailyWeather(CLIMATES.temperate, '2023-01-01', 731, random);
  const bills = monthlyReadings(SAMPLE_BUILDING, weather, '2023-01-01', 24, random);

  beforeAll(async () => {
    api = await makeTestApi();
  });
  afterAll(async () => api.close());

  it('tells each role its own name, role and permissions, never its secret', async () => {
    for (const role of ROLES) {
      const response = await api.call('GET', '/v1/me', { as: role });
      expect(response.status).toBe(200);
      expect(response.json.key.role).toBe(role);
      expect(response.json.permissions).toEqual(ROLE_PERMISSIONS[role]);
      expect(response.json.organisation.name).toBe('Organisation A (test)');
      expect(response.text).not.toContain(api.keys[role].split('_')[2]!);
    }
    expect((await api.call('GET', '/v1/me', { as: 'none' })).status).toBe(401);
  });

  it('gives every fitted shape its line, expected use and residuals, agreeing with the fit’s own statistics', async () => {
    const station = await api.call('POST', '/v1/weather-stations', {
      as: 'engineer',
      body: { name: 'Invented station', temperatureUnit: 'F' },
    });
    await api.call('PUT', `/v1/weather-stations/${station.json.id}/observations`, {
      as: 'integration',
      body: { observations: weather.map((d) => ({ date: d.date, temp: d.temp })) },
    });
    const facility = await api.call('POST', '/v1/facilities', { as: 'engineer', body: { name: 'Invented hall' } });
    const meter = await api.call('POST', `/v1/facilities/${facility.json.id}/meters`, {
      as: 'engineer',
      body: { name: 'Main (invented)', fuel: 'electricity', unit: 'kWh', weatherStationId: station.json.id },
    });
    await api.call('POST', `/v1/meters/${meter.json.id}/readings`, {
      as: 'integration',
      body: { readings: bills.map((b) => ({ start: b.start, end: b.end, quantity: b.quantity })) },
    });
    const draft = await api.call('POST', `/v1/meters/${meter.json.id}/baselines`, {
      as: 'engineer',
      body: { start: '2023-01-01', end: '2025-01-01' },
    });
    expect(draft.status).toBe(201);

    const points = await api.call('GET', `/v1/baselines/${draft.json.id}/points`, { as: 'analyst' });
    expect(points.status).toBe(200);
    expect(points.json.periods).toHaveLength(draft.json.fit.periods.used);
    expect(points.json.chosen).toBe(draft.json.chosen);
    const fitted = draft.json.fit.candidates.filter((c: { stats: unknown }) => c.stats !== null);
    expect(points.json.candidates.map((c: { model: string }) => c.model).sort()).toEqual(
      fitted.map((c: { model: string }) => c.model).sort(),
    );

    const periods = points.json.periods as { quantity: number; days: number; usePerDay: number }[];
    const meanQuantity = periods.reduce((sum, p) => sum + p.quantity, 0) / periods.length;
    for (const candidate of points.json.candidates as { model: string; residuals: number[]; expectedPerDay: number[]; line: unknown[] }[]) {
      const document = fitted.find((c: { model: string }) => c.model === candidate.model);
      // residual = quantity − days × expected, as the route states
      candidate.residuals.forEach((e, i) =>
        expect(e).toBeCloseTo(periods[i]!.quantity - periods[i]!.days * candidate.expectedPerDay[i]!, 6),
      );
      // Guideline 14: CV(RMSE) = sqrt(Σe²/(n−p)) / Ē
      const sse = candidate.residuals.reduce((sum, e) => sum + e * e, 0);
      const cvrmse = Math.sqrt(sse / (document.n - document.p)) / meanQuantity;
      expect(cvrmse).toBeCloseTo(document.stats.cvrmse, 9);
      expect(candidate.line.length).toBeGreaterThanOrEqual(2);
    }
    // 1P: the expected use is the day-weighted mean use per day (hand-worked: Σq / Σdays).
    const mean = points.json.candidates.find((c: { model: string }) => c.model === '1P');
    const weighted = periods.reduce((s, p) => s + p.quantity, 0) / periods.reduce((s, p) => s + p.days, 0);
    for (const value of mean.expectedPerDay) expect(value).toBeCloseTo(weighted, 9);
  });
});
