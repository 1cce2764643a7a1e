/**
 * The small guards of a service facing the network: text stored as NFC with
 * lone surrogates refused, failed authentication limited per address, the
 * protective headers on the paths that bypass the hooks, and timeouts that
 * free a connection held by a trickled request.
 *
 * Check values: Unicode Standard Annex #15 (NFC: "é" as U+0065 U+0301
 * composes to U+00E9); RFC 8259 §8.2 (a lone surrogate escape is not a
 * Unicode character); RFC 6585 §4 (429 with Retry-After); RFC 9110 §15.5.9
 * (408 Request Timeout); common practice (OWASP secure headers) for the
 * header set; the limits themselves are this service's (the test sets them).
 */
import { connect } from 'node:net';
import type { FastifyInstance } from 'fastify';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildApp } from '../../src/http/app.js';
import { FailedAuthenticationLimit } from '../../src/http/plugins/failed-authentication.js';
import { makeTestApi, type TestApi } from '../support/api.js';
import { databaseDigest } from '../support/db-digest.js';

let api: TestApi;
beforeAll(async () => {
  api = await makeTestApi();
});
afterAll(async () => api?.close());

describe('text as stored', () => {
  it('stores names in NFC, so a decomposed spelling is the composed one', async () => {
    const decomposed = 'Cafe\u0301 annex (invented)';
    const created = await api.call('POST', '/v1/facilities', { body: { name: decomposed } });
    expect(created.status).toBe(201);
    expect(created.json.name).toBe('Caf\u00e9 annex (invented)');
    const read = await api.call('GET', `/v1/facilities/${created.json.id}`);
    expect(read.json.name).toBe('Caf\u00e9 annex (invented)');
  });

  const bodies: { what: string; raw: string; field: string }[] = [
    { what: 'a lone high surrogate', raw: '{"name":"Hall \\ud800 (invented)"}', field: 'name' },
    { what: 'a lone low surrogate', raw: '{"name":"\\udc00"}', field: 'name' },
    { what: 'a surrogate in a nested note', raw: '{"name":"Ok (invented)","address":"\\udbff"}', field: 'address' },
  ];
  for (const c of bodies) {
    it(`refuses ${c.what} with 400 naming ${c.field}, storing nothing`, async () => {
      const before = await databaseDigest(api.store.db);
      const response = await api.call('POST', '/v1/facilities', { body: c.raw });
      expect(response.status).toBe(400);
      expect(response.headers['content-type']).toContain('application/problem+json');
      expect(response.json.errors[0].field).toBe(c.field);
      expect(response.json.detail).toContain('lone UTF-16 surrogate');
      expect(await databaseDigest(api.store.db)).toBe(before);
    });
  }

  it('keeps a well-formed pair (an emoji outside the BMP)', async () => {
    const created = await api.call('POST', '/v1/facilities', { body: '{"name":"Hall \\ud83c\\udf33 (invented)"}' });
    expect(created.status).toBe(201);
    expect(created.json.name).toBe('Hall \u{1F333} (invented)');
  });
});

describe('failed authentication, limited per address', () => {
  it('counts failures per address in a window and forgets them after it', () => {
    let now = 0;
    const limit = new FailedAuthenticationLimit(3, 60_000, () => now);
    for (let i = 0; i < 3; i++) {
      expect(limit.retryAfterSeconds('10.0.0.1')).toBe(0);
      limit.recordFailure('10.0.0.1');
    }
    expect(limit.retryAfterSeconds('10.0.0.1')).toBe(60);
    expect(limit.retryAfterSeconds('10.0.0.2')).toBe(0);
    now = 45_500;
    expect(limit.retryAfterSeconds('10.0.0.1')).toBe(15);
    now = 60_000;
    expect(limit.retryAfterSeconds('10.0.0.1')).toBe(0);
  });

  it('stays bounded in memory under a flood of addresses', () => {
    const limit = new FailedAuthenticationLimit(3, 60_000, () => 0);
    for (let i = 0; i < 25_000; i++) limit.recordFailure(`address-${i}`);
    expect((limit as unknown as { windows: Map<string, unknown> }).windows.size).toBeLessThanOrEqual(10_000);
  });

  it('answers 429 with Retry-After after the limit, even to a good key, and lets other addresses in', async () => {
    const app = await buildApp({ store: api.store, failedAuthenticationsPerMinute: 4 });
    try {
      const get = (token: string, remoteAddress: string) =>
        app.inject({
          method: 'GET',
          url: '/v1/facilities',
          remoteAddress,
          headers: { authorization: `Bearer ${token}` },
        });
      const forged = `mvl_AAAAAAAA_${'y'.repeat(40)}`;
      for (let i = 0; i < 4; i++) expect((await get(forged, '192.0.2.7')).statusCode).toBe(401);
      const limited = await get(api.keys.analyst, '192.0.2.7');
      expect(limited.statusCode).toBe(429);
      expect(Number(limited.headers['retry-after'])).toBeGreaterThan(0);
      expect(limited.headers['content-type']).toContain('application/problem+json');
      expect(limited.headers['x-content-type-options']).toBe('nosniff');
      expect((await get(api.keys.analyst, '192.0.2.8')).statusCode).toBe(200);
    } finally {
      await app.close();
    }
  });
});

describe('every response path carries the protective headers', () => {
  let served: FastifyInstance;
  let port: number;
  beforeAll(async () => {
    served = await buildApp({ store: api.store, requestTimeoutMs: 1_000, headersTimeoutMs: 1_000 });
    await served.listen({ port: 0, host: '127.0.0.1' });
    port = (served.server.address() as { port: number }).port;
  });
  afterAll(async () => served?.close());

  /** One raw exchange; `trickle` sends the rest of the body a byte at a time, 200 ms apart. */
  function raw(text: string, trickle = 0): Promise<{ head: string; body: string; ms: number }> {
    return new Promise((resolve, reject) => {
      const started = Date.now();
      let received = '';
      let timer: NodeJS.Timeout | undefined;
      const socket = connect(port, '127.0.0.1', () => {
        socket.write(text);
        let left = trickle;
        if (left > 0)
          timer = setInterval(() => {
            if (left-- <= 0 || socket.destroyed) return clearInterval(timer);
            socket.write('x');
          }, 200);
      });
      socket.on('data', (chunk) => (received += chunk.toString('utf8')));
      socket.on('error', () => undefined);
      socket.on('close', () => {
        clearInterval(timer);
        const [head = '', body = ''] = received.split('\r\n\r\n');
        resolve({ head: head.toLowerCase(), body, ms: Date.now() - started });
      });
      socket.setTimeout(15_000, () => reject(new Error('no answer in 15 s')));
    });
  }

  const expectProtected = (head: string) => {
    expect(head).toContain('x-content-type-options: nosniff');
    expect(head).toMatch(/x-frame-options: deny|frame-ancestors 'none'/);
    expect(head).toContain('referrer-policy: no-referrer');
    expect(head).toContain('content-type: application/problem+json');
  };

  it('a URL with broken percent-encoding (answered by the router before any hook)', async () => {
    const { head } = await raw('GET /v1/meters/%E0%A4%A HTTP/1.1\r\nHost: x\r\nConnection: close\r\n\r\n');
    expect(head.startsWith('http/1.1 400')).toBe(true);
    expectProtected(head);
  });

  it('a path parameter over the length limit (answered by the router before any hook)', async () => {
    const { head } = await raw(`GET /v1/meters/${'m'.repeat(150)} HTTP/1.1\r\nHost: x\r\nConnection: close\r\n\r\n`);
    expect(head.startsWith('http/1.1 400')).toBe(true);
    expectProtected(head);
  });

  it('malformed HTTP (answered by the connection handler)', async () => {
    const { head, body } = await raw('GET /v1/facilities HTTP/1.1\r\nHost x no colon\r\n\r\n');
    expect(head.startsWith('http/1.1 400')).toBe(true);
    expectProtected(head);
    expect(JSON.parse(body).status).toBe(400);
  });

  it('closes a trickled body with 408 when the request takes longer than its limit', async () => {
    const { head, ms } = await raw(
      `POST /v1/facilities HTTP/1.1\r\nHost: x\r\nAuthorization: Bearer ${api.keys.engineer}\r\nContent-Type: application/json\r\nContent-Length: 100000\r\n\r\n{`,
      40,
    );
    expect(head.split('\r\n')[0]).toBe('http/1.1 408 request timeout');
    expectProtected(head);
    // The limit is 1 s and Node checks it every second: closed well before the 8 s the trickle would take.
    expect(ms).toBeLessThan(6_000);
  });
});

describe('text checks on deeply nested bodies', () => {
  it('walks a body nested 5,000 levels deep without running out of stack (400 from the schema, not 500)', async () => {
    const deep = `{"name":"Deep (invented)","address":${'['.repeat(5000)}${']'.repeat(5000)}}`;
    const response = await api.call('POST', '/v1/facilities', { body: deep });
    expect(response.status).toBe(400);
    const surrogate = `{"name":"x","address":${'['.repeat(3000)}"\\ud800"${']'.repeat(3000)}}`;
    const refused = await api.call('POST', '/v1/facilities', { body: surrogate });
    expect(refused.status).toBe(400);
    expect(refused.json.detail).toContain('lone UTF-16 surrogate');
  });
});
