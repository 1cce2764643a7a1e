/**
 * What the workbench needs of the service: the static page at /app under its
 * own strict content security policy (files looked up by exact name, never
 * by a path on disk), the calling key's role and permissions (/v1/me), and
 * the numbers behind the bench's charts (/v1/baselines/{id}/points).
 *
 * Check values: ROLE_PERMISSIONS (src/domain/principal.ts); the Guideline 14
 * definition CV(RMSE) = sqrt(Σe²/(n−p))/Ē (the field brief) recomputed from
 * the residuals the route returns, against the fit document's own CV(RMSE);
 * synthetic files the test writes.
 */
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { FastifyInstance } from 'fastify';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildApp } from '../../src/http/app.js';
import {
  loadWorkbenchFiles,
  WORKBENCH_CSP,
  type WorkbenchFiles,
  type WorkbenchFolders,
} from '../../src/http/plugins/workbench.js';
import { openStore } from '../../src/store/connect.js';
import type { Store } from '../../src/store/store.js';
import { ROLE_PERMISSIONS } from '../../src/domain/principal.js';
import { ROLES } from '../../src/store/api-keys.js';
import { makeTestApi, type TestApi } from '../support/api.js';
import { CLIMATES, SAMPLE_BUILDING, dailyWeather, monthlyReadings, seededRandom } from '../support/synthetic.js';

describe('the /app static files', () => {
  let folder: string;
  let app: FastifyInstance;
  let empty: FastifyInstance;
  const stores: Store[] = [];
  let files: WorkbenchFiles;

  async function appWith(folders: WorkbenchFolders): Promise<FastifyInstance> {
    const store = openStore('sqlite::memory:');
    stores.push(store);
    return buildApp({ store, workbench: folders });
  }

  beforeAll(async () => {
    folder = mkdtempSync(join(tmpdir(), 'mvledger-app-'));
    mkdirSync(join(folder, 'public'));
    mkdirSync(join(folder, 'modules'));
    // synthetic: a page naming its build folder, its styles and its script
    writeFileSync(
      join(folder, 'public', 'index.html'),
      '<!doctype html><title>test page</title><link rel="stylesheet" href="{{build}}/workbench.css" />\n' +
        '<script type="module" src="{{build}}/workbench.js"></script>\n',
    );
    writeFileSync(join(folder, 'public', 'workbench.css'), 'body { margin: 0; }\n');
    writeFileSync(join(folder, 'public', 'notes.txt'), 'not served: not a page type\n');
    writeFileSync(join(folder, 'modules', 'workbench.js'), 'export const b = 2;\n');
    const folders = { public: join(folder, 'public'), modules: join(folder, 'modules') };
    files = loadWorkbenchFiles(folders);
    app = await appWith(folders);
    empty = await appWith({ public: join(folder, 'nothing'), modules: join(folder, 'nothing') });
  });
  afterAll(async () => {
    await app?.close();
    await empty?.close();
    for (const store of stores) await store.close();
    rmSync(folder, { recursive: true, force: true });
  });

  it('serves the page, its styles and its modules with their types, under the build id', async () => {
    expect((await app.inject('/app')).headers.location).toBe('/app/');
    const page = await app.inject('/app/');
    expect(page.statusCode).toBe(200);
    expect(page.headers['content-type']).toBe('text/html; charset=utf-8');
    expect(page.body).toContain('test page');
    expect(page.body).toContain(`href="${files.build}/workbench.css"`);
    expect(page.body).toContain(`src="${files.build}/workbench.js"`);
    expect(page.body).not.toContain('{{');
    expect((await app.inject(`/app/${files.build}/workbench.css`)).headers['content-type']).toBe(
      'text/css; charset=utf-8',
    );
    const module = await app.inject(`/app/${files.build}/workbench.js`);
    expect(module.statusCode).toBe(200);
    expect(module.headers['content-type']).toBe('text/javascript; charset=utf-8');
  });

  it('lets the browser keep the files for good (a new build has a new id) and revalidate the page', async () => {
    const module = await app.inject(`/app/${files.build}/workbench.js`);
    expect(module.headers['cache-control']).toBe('public, max-age=31536000, immutable');
    expect((await app.inject('/app/')).headers['cache-control']).toBe('no-cache');
    expect((await app.inject('/app/an-older-build/workbench.js')).statusCode).toBe(404);
  });

  it('gives a changed build a new id, so no browser mixes an old cached file with a new page', () => {
    const before = files.build;
    const changed = mkdtempSync(join(tmpdir(), 'mvledger-app-changed-'));
    try {
      writeFileSync(join(changed, 'workbench.js'), 'export const b = 3;\n'); // synthetic: one character differs
      expect(loadWorkbenchFiles({ public: join(folder, 'public'), modules: changed }).build).not.toBe(before);
      expect(loadWorkbenchFiles({ public: join(folder, 'public'), modules: join(folder, 'modules') }).build).toBe(
        before,
      );
    } finally {
      rmSync(changed, { recursive: true, force: true });
    }
  });

  it('sends a policy with nothing inline and no other origin, on every answer', async () => {
    for (const url of [
      '/app/',
      `/app/${files.build}/workbench.css`,
      `/app/${files.build}/workbench.js`,
      `/app/${files.build}/missing.js`,
    ]) {
      const response = await app.inject(url);
      expect(response.headers['content-security-policy'], url).toBe(WORKBENCH_CSP);
      expect(response.headers['x-content-type-options']).toBe('nosniff');
    }
    expect(WORKBENCH_CSP).not.toContain('unsafe');
    expect(WORKBENCH_CSP).not.toMatch(/https?:|\*/);
    expect(WORKBENCH_CSP).toContain("default-src 'none'");
    expect(WORKBENCH_CSP).toContain("script-src 'self'");
    expect(WORKBENCH_CSP).toContain("frame-ancestors 'none'");
  });

  it('answers 304 to a matching ETag', async () => {
    const first = await app.inject('/app/');
    const again = await app.inject({ url: '/app/', headers: { 'if-none-match': String(first.headers.etag) } });
    expect(again.statusCode).toBe(304);
  });

  it('serves only known files: no other type, no path outside the folders', async () => {
    for (const url of [
      `/app/${files.build}/notes.txt`,
      `/app/${files.build}/index.html`,
      '/app/../package.json',
      `/app/${files.build}/%2e%2e/package.json`,
      `/app/${files.build}/x/../../package.json`,
      `/app/${files.build}/%2e%2e%2f%2e%2e%2fpackage.json`,
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
    for (const candidate of points.json.candidates as {
      model: string;
      residuals: number[];
      expectedPerDay: number[];
      line: unknown[];
    }[]) {
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

    // Addressed by the meter, the newest version and its points are exactly the answers by id.
    const second = await api.call('POST', `/v1/meters/${meter.json.id}/baselines`, {
      as: 'engineer',
      body: { start: '2023-02-01', end: '2025-01-01' },
    });
    expect(second.json.version).toBe(2);
    const byMeter = await api.call('GET', `/v1/meters/${meter.json.id}/baselines/newest`, { as: 'analyst' });
    expect(byMeter.status).toBe(200);
    expect(byMeter.json).toEqual((await api.call('GET', `/v1/baselines/${second.json.id}`, { as: 'analyst' })).json);
    const newestPoints = await api.call('GET', `/v1/meters/${meter.json.id}/baselines/newest/points`, {
      as: 'analyst',
    });
    expect(newestPoints.json).toEqual(
      (await api.call('GET', `/v1/baselines/${second.json.id}/points`, { as: 'analyst' })).json,
    );
    expect(newestPoints.json.baselineId).toBe(second.json.id);
    // Another organisation sees neither.
    for (const path of ['newest', 'newest/points'])
      expect((await api.call('GET', `/v1/meters/${meter.json.id}/baselines/${path}`, { as: 'other' })).status).toBe(
        404,
      );
  });

  it('answers 404, saying so, for a meter with no baseline yet', async () => {
    const station = await api.call('POST', '/v1/weather-stations', {
      as: 'engineer',
      body: { name: 'Second station (invented)', temperatureUnit: 'C' },
    });
    const facility = await api.call('POST', '/v1/facilities', {
      as: 'engineer',
      body: { name: 'Unfitted hall (invented)' },
    });
    const meter = await api.call('POST', `/v1/facilities/${facility.json.id}/meters`, {
      as: 'engineer',
      body: { name: 'New meter (invented)', fuel: 'electricity', unit: 'kWh', weatherStationId: station.json.id },
    });
    for (const path of ['newest', 'newest/points']) {
      const response = await api.call('GET', `/v1/meters/${meter.json.id}/baselines/${path}`, { as: 'analyst' });
      expect(response.status).toBe(404);
      expect(response.json.detail).toContain('has no baseline yet');
    }
  });
});
