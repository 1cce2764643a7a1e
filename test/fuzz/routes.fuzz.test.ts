/**
 * Property-based fuzzing of every route in the app's own OpenAPI document:
 * path ids, query strings, bodies (schema-guided and hostile, raw JSON, CSV,
 * wrong content types, just over the body limit) and keys. Properties, from
 * the API contract (RFC 9457 problem details; nothing stored from a rejected
 * request) and common practice (no 5xx on bad input, no internals in
 * answers):
 *  - every answer is 2xx or 4xx; a 4xx is problem+json with type, title,
 *    status and detail; no answer carries a stack trace or a source path;
 *  - a rejected request, and any read, leaves the database digest as it was;
 *  - at the end every organisation's audit chain still verifies.
 * The seed is fixed (MVLEDGER_FUZZ_SEED overrides it; MVLEDGER_FUZZ_SCALE
 * multiplies the runs) and printed with the figures in one summary line.
 * A failure names the request in full; replay it with the printed seed.
 */
import { afterAll, describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { verifyAllAuditChains } from '../../src/store/audit.js';
import { testDialect } from '../support/database.js';
import { FUZZ_BODY_LIMIT, startFuzzService } from './fuzz-api.js';
import { routeName, routesFromOpenApi, type FuzzRoute } from './openapi-routes.js';
import { requestArb, type FuzzRequest } from './requests.js';
import { bodyShapeViolation, contractViolation, describeRequest, type FuzzResponse } from './properties.js';
import { DatabaseWatch } from './db-watch.js';
import { count, newFigures, summaryLine, type RouteFigures } from './figures.js';

const SEED = Number(process.env.MVLEDGER_FUZZ_SEED ?? 606_2026);
// PostgreSQL digests every rejected write (no cheap change counter there), so it runs a quarter of the inputs.
const SCALE = Number(process.env.MVLEDGER_FUZZ_SCALE ?? (testDialect() === 'postgres' ? 0.25 : 1));
/** Every this-many checks the full digest is taken even when no row was written. */
const DIGEST_SAMPLE_EVERY = 100;
const SOURCE_ROOT = process.cwd();

/** Runs per route: routes that fit or compute savings on real ids cost more per request. */
function runsFor(route: FuzzRoute): number {
  const heavy = /\/baselines$|\/savings$|\/choose$|\/freeze$|signature\.svg$/.test(route.path);
  return Math.max(1, Math.round((heavy ? 250 : 400) * SCALE));
}

/** A seed per route from the run's seed and the route's name, so adding a route leaves the others' inputs alone. */
function seedFor(route: FuzzRoute): number {
  let hash = SEED | 0;
  for (const ch of routeName(route)) hash = (Math.imul(hash, 31) + ch.charCodeAt(0)) | 0;
  return hash;
}

const started = performance.now();
const service = await startFuzzService();
const routes = routesFromOpenApi(service.app.swagger());
const watch = new DatabaseWatch(service.api.store);
await watch.accept();
const context = {
  ids: service.ids,
  tokens: { ...service.api.keys, other: service.api.otherKey },
  bodyLimit: FUZZ_BODY_LIMIT,
};
const allFigures: RouteFigures[] = [];

afterAll(async () => {
  console.log(
    summaryLine(SEED, allFigures, {
      routeCount: routes.length,
      digests: watch.digestsTaken,
      checkedUnchanged: watch.checked,
      seconds: Math.round((performance.now() - started) / 100) / 10,
    }),
  );
  await service.close();
});

/** Send through fastify.inject; null when the test client itself refuses the request. */
async function send(request: FuzzRequest): Promise<FuzzResponse | null> {
  try {
    const response = await service.app.inject({
      method: request.method as 'GET',
      url: request.url,
      headers: request.headers,
      ...(request.payload !== undefined ? { payload: request.payload } : {}),
    });
    return { status: response.statusCode, headers: response.headers, body: response.body };
  } catch {
    return null;
  }
}

/** Sends one request and checks both properties; throws with the request spelled out. */
async function check(route: FuzzRoute | null, request: FuzzRequest, figures: RouteFigures): Promise<void> {
  const response = await send(request);
  count(figures, request.kind, response?.status ?? null);
  if (response === null) return;
  const violation =
    contractViolation(request, response, SOURCE_ROOT) ?? (route ? bodyShapeViolation(route, request, response) : null);
  if (violation) {
    await watch.accept(); // so the next route's checks start from what is stored now
    throw new Error(`${violation}\n${describeRequest(request)}`);
  }
  const accepted = response.status >= 200 && response.status < 300;
  if (accepted && request.method !== 'GET') {
    await watch.accept();
    return;
  }
  // SQLite says cheaply whether anything was written; elsewhere every rejected write is digested.
  const sampled =
    watch.checked % DIGEST_SAMPLE_EVERY === 0 || (service.api.store.dialect !== 'sqlite' && request.method !== 'GET');
  const changed = await watch.unchanged(sampled);
  if (changed)
    throw new Error(
      `${accepted ? 'a read' : `a rejected request (${response.status})`} changed the database: ${changed}\n${describeRequest(request)}`,
    );
}

describe('every route, fuzzed', () => {
  it('finds the routes in the OpenAPI document', () => {
    // The API contract: the documented surface (health, keys, audit, stations, facilities, meters, readings, baselines, savings,
    // adjustments, rates, contracts, normal years, reports).
    expect(routes.length).toBeGreaterThanOrEqual(37);
    // The API contract: the five routes documented as also taking text/csv.
    expect(
      routes
        .filter((r) => r.takesCsv)
        .map(routeName)
        .sort(),
    ).toEqual([
      'POST /v1/meters/{id}/readings',
      'POST /v1/variables/{id}/values',
      'PUT /v1/facilities/{id}/calendar',
      'PUT /v1/weather-stations/{id}/normal-year',
      'PUT /v1/weather-stations/{id}/observations',
    ]);
  });

  for (const route of routes) {
    it(`${routeName(route)}: 2xx or a 4xx problem, nothing stored when rejected`, async () => {
      const figures = newFigures(routeName(route));
      allFigures.push(figures);
      const begun = performance.now();
      await fc.assert(
        fc.asyncProperty(requestArb(route, context), (request) => check(route, request, figures)),
        { seed: seedFor(route), numRuns: runsFor(route), endOnFailure: true },
      );
      figures.milliseconds = performance.now() - begun;
    });
  }

  it('answers methods a path does not declare with a 4xx problem', async () => {
    const figures = newFigures('undeclared methods');
    allFigures.push(figures);
    const byPath = new Map<string, Set<string>>();
    for (const route of routes) byPath.set(route.path, (byPath.get(route.path) ?? new Set()).add(route.method));
    const realId = service.ids.meters[0]!;
    for (const [path, declared] of byPath) {
      for (const method of ['GET', 'POST', 'PUT', 'DELETE', 'PATCH', 'OPTIONS']) {
        if (declared.has(method)) continue;
        await check(
          null,
          {
            method,
            url: path.replace(/\{[^}]+\}/g, realId),
            headers: { authorization: `Bearer ${context.tokens.admin}`, 'content-type': 'application/json' },
            payload: '{}',
            kind: 'method',
          },
          figures,
        );
      }
    }
    expect(figures.runs).toBeGreaterThan(0);
  });

  it('leaves every audit chain verifying, nothing changed since the last accepted write, and no prototype polluted', async () => {
    // The ledger's contract: a hash-chained audit trail that verifies end to end.
    const verdict = await verifyAllAuditChains(service.api.store.db);
    expect(verdict.ok, JSON.stringify(verdict)).toBe(true);
    expect(verdict.chains).toBe(2); // synthetic: the test service has organisations A and B
    expect(await watch.unchanged(true)).toBeNull();
    // synthetic: the generators build only requests the test client can send, so every input reached the app.
    expect(allFigures.reduce((n, f) => n + f.unsendable, 0)).toBe(0);
    // common practice: bodies with __proto__ / constructor.prototype keys must not reach Object.prototype.
    expect(Object.keys(Object.prototype)).toEqual([]);
    expect(({} as Record<string, unknown>).polluted).toBeUndefined();
  });
});
