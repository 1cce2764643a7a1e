/**
 * The OpenAPI document. Check values: the OpenAPI 3.1.0 specification (the
 * version string, `$ref` into components, security requirements) and the
 * committed openapi/openapi.json (written by `npm run openapi`).
 */
import { readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { formatOpenApi, OPENAPI_FILE } from '../../src/http/openapi/document.js';
import { makeTestApi, type TestApi } from '../support/api.js';

type Operation = { tags?: string[]; summary?: string; security?: unknown[]; responses?: Record<string, unknown> };
type Document = {
  openapi: string;
  paths: Record<string, Record<string, Operation>>;
  components?: { schemas?: Record<string, unknown> };
};

const METHODS = ['get', 'post', 'put', 'patch', 'delete'];

let api: TestApi;
let document: Document;
beforeAll(async () => {
  api = await makeTestApi();
  const response = await api.call('GET', '/openapi.json', { as: 'none' });
  expect(response.status).toBe(200);
  document = response.json;
});
afterAll(async () => api.close());

function operations(): { method: string; path: string; op: Operation }[] {
  return Object.entries(document.paths).flatMap(([path, item]) =>
    METHODS.filter((m) => item[m]).map((method) => ({ method, path, op: item[method]! })),
  );
}

describe('the OpenAPI document', () => {
  it('matches the committed openapi/openapi.json', () => {
    let committed = '';
    try {
      committed = readFileSync(OPENAPI_FILE, 'utf8');
    } catch {
      // fall through to the message below
    }
    const live = formatOpenApi(document);
    if (live !== committed) {
      expect.fail('openapi/openapi.json is out of date with the routes: run `npm run openapi` and commit the result');
    }
  });

  it('is OpenAPI 3.1.0', () => {
    expect(document.openapi).toBe('3.1.0'); // the OpenAPI specification version the app declares
  });

  it('gives every /v1 operation security and tags, and every operation a summary', () => {
    const lacking = operations()
      .filter(({ path, op }) => !op.summary || !op.tags?.length || (path.startsWith('/v1/') && !op.security?.length))
      .map(({ method, path }) => `${method.toUpperCase()} ${path}`);
    expect(lacking).toEqual([]);
    expect(operations().filter(({ path }) => path.startsWith('/v1/')).length).toBeGreaterThan(0);
  });

  it('documents the problem responses of every /v1 operation', () => {
    const lacking = operations()
      .filter(({ path, op }) => path.startsWith('/v1/') && !['401', '403'].every((code) => op.responses?.[code]))
      .map(({ method, path }) => `${method.toUpperCase()} ${path}`);
    expect(lacking).toEqual([]);
  });

  it('resolves every $ref to a schema in components', () => {
    const refs = new Set<string>();
    const walk = (value: unknown): void => {
      if (Array.isArray(value)) value.forEach(walk);
      else if (value && typeof value === 'object') {
        for (const [key, inner] of Object.entries(value)) {
          if (key === '$ref' && typeof inner === 'string') refs.add(inner);
          else walk(inner);
        }
      }
    };
    walk(document.paths);
    const defined = new Set(
      Object.keys(document.components?.schemas ?? {}).map((name) => `#/components/schemas/${name}`),
    );
    expect([...refs].filter((ref) => !defined.has(ref)).sort()).toEqual([]);
  });

  it('serves the interactive documentation at /docs', async () => {
    const response = await api.app.inject({ method: 'GET', url: '/docs' });
    const page =
      response.statusCode >= 300 && response.statusCode < 400
        ? await api.app.inject({ method: 'GET', url: String(response.headers.location) })
        : response;
    expect(page.statusCode).toBe(200);
    expect(page.headers['content-type']).toMatch(/^text\/html/);
    expect(page.body.toLowerCase()).toContain('swagger-ui');
  });
});
