/**
 * /v1/api-keys. Check values: the API contract (status codes, what a key
 * looks like, the token shown once) and synthetic keys the test makes.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApi, type TestApi } from '../support/api.js';
import { databaseDigest } from '../support/db-digest.js';

let api: TestApi;
beforeAll(async () => {
  api = await makeTestApi();
});
afterAll(async () => api.close());

describe('API keys', () => {
  it('creates a key whose token works at once and is shown only in the create response', async () => {
    const created = await api.call('POST', '/v1/api-keys', { body: { name: 'billing feed', role: 'integration' } });
    expect(created.status).toBe(201); // contract
    expect(Object.keys(created.json).sort()).toEqual(['key', 'token']);
    expect(created.json.key).toMatchObject({ name: 'billing feed', role: 'integration', revokedAt: null });
    expect(created.json.token).toMatch(/^mvl_[A-Za-z0-9]{8}_[A-Za-z0-9]{32,}$/); // contract: mvl_<id>_<secret>
    expect(created.json.token).toContain(`mvl_${created.json.key.id}_`);

    const used = await api.call('GET', '/v1/weather-stations', { as: { token: created.json.token } });
    expect(used.status).toBe(403); // integration lacks read: authenticated, not permitted
    const list = await api.call('GET', '/v1/api-keys');
    expect(list.status).toBe(200);
    expect(list.json.keys).toContainEqual(created.json.key);
    expect(list.text).not.toContain(created.json.token);
    expect(list.text).not.toMatch(/secret|hash/i);

    const audit = await api.call('GET', `/v1/audit?entity=api-key&entityId=${created.json.key.id}`);
    expect(audit.json.entries).toHaveLength(1); // contract: one audit row for the create
    expect(audit.json.entries[0]).toMatchObject({ action: 'create', after: created.json.key });
    expect(audit.text).not.toContain(created.json.token.split('_')[2]);
  });

  it('revokes a key: it answers 401 afterwards, the audit has before and after, and a second revoke changes nothing', async () => {
    const created = await api.call('POST', '/v1/api-keys', { body: { name: 'short-lived', role: 'analyst' } });
    const token = created.json.token as string;
    expect((await api.call('GET', '/v1/facilities', { as: { token } })).status).toBe(200);

    const revoked = await api.call('DELETE', `/v1/api-keys/${created.json.key.id}`);
    expect(revoked.status).toBe(200); // contract: 200 with the key
    expect(revoked.json).toMatchObject({ id: created.json.key.id, revokedAt: expect.any(String) });
    expect((await api.call('GET', '/v1/facilities', { as: { token } })).status).toBe(401); // contract: revoked keys answer 401

    const audit = await api.call('GET', `/v1/audit?entity=api-key&entityId=${created.json.key.id}`);
    expect(audit.json.entries.map((e: { action: string }) => e.action)).toEqual(['create', 'revoke']);
    expect(audit.json.entries[1]).toMatchObject({ before: created.json.key, after: revoked.json });
    expect(audit.text).not.toContain(token.split('_')[2]);

    const before = await databaseDigest(api.store.db);
    const again = await api.call('DELETE', `/v1/api-keys/${created.json.key.id}`);
    expect(again.status).toBe(200);
    expect(again.json).toEqual(revoked.json); // synthetic: the first revoke set the time
    expect(await databaseDigest(api.store.db)).toBe(before);
  });

  it('refuses to revoke the key making the request (409) and stores nothing', async () => {
    const own = (await api.call('GET', '/v1/api-keys')).json.keys.find((k: { name: string }) => k.name === 'admin key');
    const before = await databaseDigest(api.store.db);
    const response = await api.call('DELETE', `/v1/api-keys/${own.id}`);
    expect(response.status).toBe(409); // contract: cannot lock oneself out
    expect(response.json.detail).toContain(own.id);
    expect(await databaseDigest(api.store.db)).toBe(before);
    expect((await api.call('GET', '/v1/api-keys')).status).toBe(200);
  });

  it("answers 404 for another organisation's key and leaves it live", async () => {
    const theirId = api.otherKey.split('_')[1]!;
    expect((await api.call('DELETE', `/v1/api-keys/${theirId}`)).status).toBe(404); // contract: other organisation's ids are 404
    expect((await api.call('GET', '/v1/api-keys', { as: 'other' })).status).toBe(200);
    const ours = (await api.call('GET', '/v1/api-keys')).json.keys.map((k: { id: string }) => k.id);
    expect(ours).not.toContain(theirId);
  });

  it('refuses a bad role or name, and an Idempotency-Key on create, storing nothing', async () => {
    const before = await databaseDigest(api.store.db);
    const badRole = await api.call('POST', '/v1/api-keys', { body: { name: 'x', role: 'superuser' } });
    expect(badRole.status).toBe(400);
    expect(badRole.json.errors[0].field).toBe('role');
    expect((await api.call('POST', '/v1/api-keys', { body: { role: 'admin' } })).json.errors[0].field).toBe('name');
    const replayable = await api.call('POST', '/v1/api-keys', {
      body: { name: 'x', role: 'admin' },
      headers: { 'idempotency-key': 'k1' },
    });
    expect(replayable.status).toBe(400); // design: a replay store would have to keep the token
    expect(replayable.json.errors[0].field).toBe('header.idempotency-key');
    expect(await databaseDigest(api.store.db)).toBe(before);
  });

  it('is for admins only', async () => {
    for (const role of ['engineer', 'analyst', 'integration'] as const) {
      expect((await api.call('GET', '/v1/api-keys', { as: role })).status, role).toBe(403); // only admin has the keys permission
      expect(
        (await api.call('POST', '/v1/api-keys', { as: role, body: { name: 'x', role: 'admin' } })).status,
        role,
      ).toBe(403);
    }
  });
});
