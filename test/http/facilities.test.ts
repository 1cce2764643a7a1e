/**
 * /v1/facilities. Check values: the API contract (status codes, field names)
 * and synthetic inputs whose truth the test sets.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApi, type TestApi } from '../support/api.js';
import { databaseDigest } from '../support/db-digest.js';

let api: TestApi;
beforeAll(async () => {
  api = await makeTestApi();
});
afterAll(async () => api.close());

describe('facilities', () => {
  it('creates a facility and reads it back one by one and in the list', async () => {
    const body = { name: 'Fernbrook Depot (invented)', address: '1 Invented Way', floorArea: 4250.5 }; // synthetic: the test sets the truth
    const created = await api.call('POST', '/v1/facilities', { as: 'engineer', body });
    expect(created.status).toBe(201); // contract: create answers 201
    expect(created.json).toMatchObject({ name: body.name, address: body.address, floorArea: 4250.5 });
    expect(created.json.id).toMatch(/^fac_/); // contract: ids are prefixed
    expect(typeof created.json.createdAt).toBe('string');

    const one = await api.call('GET', `/v1/facilities/${created.json.id}`, { as: 'analyst' });
    expect(one.status).toBe(200);
    expect(one.json).toEqual(created.json);

    const list = await api.call('GET', '/v1/facilities', { as: 'analyst' });
    expect(list.status).toBe(200);
    expect(list.json.facilities).toContainEqual(created.json);
  });

  it('takes a name alone: address and floor area are null', async () => {
    const created = await api.call('POST', '/v1/facilities', { body: { name: 'Bare Hall' } });
    expect(created.status).toBe(201);
    expect(created.json).toMatchObject({ name: 'Bare Hall', address: null, floorArea: null }); // contract: optional fields stored as null
  });

  it('writes one audit row for the create, with the facility as its after', async () => {
    const created = await api.call('POST', '/v1/facilities', { as: 'engineer', body: { name: 'Audited Annex' } });
    const audit = await api.call('GET', `/v1/audit?entity=facility&entityId=${created.json.id}`, { as: 'analyst' });
    expect(audit.json.entries).toHaveLength(1); // contract: exactly one audit row per logical write
    expect(audit.json.entries[0]).toMatchObject({
      action: 'create',
      entityType: 'facility',
      entityId: created.json.id,
      before: null,
      after: created.json,
    });
  });

  const invalid: { why: string; body: unknown; field: string }[] = [
    { why: 'no name', body: { address: 'x' }, field: 'name' },
    { why: 'an empty name', body: { name: '   ' }, field: 'name' },
    { why: 'a zero floor area', body: { name: 'A', floorArea: 0 }, field: 'floorArea' },
    { why: 'a negative floor area', body: { name: 'A', floorArea: -10 }, field: 'floorArea' },
    { why: 'a text floor area', body: { name: 'A', floorArea: '100' }, field: 'floorArea' },
    { why: 'an unknown field', body: { name: 'A', colour: 'red' }, field: '(body)' },
  ];
  for (const c of invalid) {
    it(`refuses ${c.why} with 400 naming the field, and stores nothing`, async () => {
      const before = await databaseDigest(api.store.db);
      const response = await api.call('POST', '/v1/facilities', { body: c.body });
      expect(response.status).toBe(400); // contract: validation problem
      expect(response.headers['content-type']).toContain('application/problem+json');
      expect(response.json.errors.map((e: { field: string }) => e.field)).toContain(c.field);
      expect(await databaseDigest(api.store.db)).toBe(before);
    });
  }

  it("answers 404 for an unknown id and for another organisation's facility", async () => {
    expect((await api.call('GET', '/v1/facilities/fac_nothing')).status).toBe(404);
    const theirs = await api.call('POST', '/v1/facilities', { as: 'other', body: { name: 'Their Site' } });
    expect(theirs.status).toBe(201);
    const response = await api.call('GET', `/v1/facilities/${theirs.json.id}`, { as: 'admin' });
    expect(response.status).toBe(404); // contract: another organisation's ids answer 404
    const list = await api.call('GET', '/v1/facilities', { as: 'admin' });
    expect(list.json.facilities.map((f: { id: string }) => f.id)).not.toContain(theirs.json.id);
  });

  it('is refused to roles without the permission', async () => {
    expect((await api.call('POST', '/v1/facilities', { as: 'analyst', body: { name: 'A' } })).status).toBe(403); // analyst lacks ledger
    expect((await api.call('POST', '/v1/facilities', { as: 'integration', body: { name: 'A' } })).status).toBe(403); // integration lacks ledger
    expect((await api.call('GET', '/v1/facilities', { as: 'integration' })).status).toBe(403); // integration lacks read
  });

  it('replays a create sent again with the same Idempotency-Key', async () => {
    const headers = { 'idempotency-key': 'facility-create-1' };
    const first = await api.call('POST', '/v1/facilities', { body: { name: 'Once Only' }, headers });
    const again = await api.call('POST', '/v1/facilities', { body: { name: 'Once Only' }, headers });
    expect(again.status).toBe(201);
    expect(again.headers['idempotent-replayed']).toBe('true');
    expect(again.json).toEqual(first.json);
  });
});
