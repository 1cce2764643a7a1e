/** /healthz and /readyz. Check values: the API contract (bodies and status codes, no key needed). */
import { describe, expect, it } from 'vitest';
import { makeTestApi } from '../support/api.js';
import { testDialect } from '../support/database.js';

describe('health', () => {
  it('answers /healthz and /readyz without a key', async () => {
    const api = await makeTestApi();
    try {
      const live = await api.call('GET', '/healthz', { as: 'none' });
      expect(live.status).toBe(200);
      expect(live.json).toEqual({ status: 'ok' });
      const ready = await api.call('GET', '/readyz', { as: 'none' });
      expect(ready.status).toBe(200);
      expect(ready.json).toEqual({ status: 'ready', database: testDialect() });
      expect(ready.headers['x-request-id']).toEqual(expect.any(String));
    } finally {
      await api.close();
    }
  });

  it('answers /readyz with 503 problem+json when the database is gone, while /healthz stays up', async () => {
    const api = await makeTestApi();
    try {
      await api.store.close();
      const ready = await api.call('GET', '/readyz', { as: 'none' });
      expect(ready.status).toBe(503); // contract: not ready
      expect(ready.headers['content-type']).toMatch(/^application\/problem\+json/);
      expect(ready.json).toMatchObject({
        status: 503,
        title: 'Not available right now',
        database: 'failing',
        detail: expect.stringContaining('database'),
      });
      expect(ready.headers['retry-after']).toBe('5');
      expect((await api.call('GET', '/healthz', { as: 'none' })).status).toBe(200);
    } finally {
      await api.app.close();
    }
  });

  it('echoes a well-formed X-Request-Id and replaces a malformed one', async () => {
    const api = await makeTestApi();
    try {
      const kept = await api.call('GET', '/healthz', { as: 'none', headers: { 'x-request-id': 'probe-42' } });
      expect(kept.headers['x-request-id']).toBe('probe-42');
      const replaced = await api.call('GET', '/healthz', {
        as: 'none',
        headers: { 'x-request-id': 'bad id with spaces' },
      });
      expect(replaced.headers['x-request-id']).not.toBe('bad id with spaces');
    } finally {
      await api.close();
    }
  });
});
