/**
 * Bootstrapping a new database: with the bootstrap key, exactly one
 * organisation and one admin key appear, even when several instances start
 * at once (this file runs on SQLite and on PostgreSQL). Synthetic: the test
 * sets the truth.
 */
import { describe, expect, it } from 'vitest';
import { openStore } from '../../src/store/connect.js';
import { migrateToLatest } from '../../src/store/migrate.js';
import { authenticate } from '../../src/store/api-keys.js';
import { verifyAllAuditChains } from '../../src/store/audit.js';
import { bootstrapIfEmpty } from '../../src/services/organisations.js';
import { dropTestDatabase, freshTestDatabaseUrl, testDialect } from '../support/database.js';

const KEY = `mvl_Bootkey1_${'k'.repeat(40)}`;
const AT = '2026-01-01T00:00:00.000Z';

describe('bootstrapIfEmpty', () => {
  it('creates one organisation and its admin key once, and never again', async () => {
    const url = freshTestDatabaseUrl();
    const store = openStore(url);
    try {
      await migrateToLatest(store.db);
      expect(await bootstrapIfEmpty(store.db, undefined, AT)).toBe(false);
      expect(await bootstrapIfEmpty(store.db, KEY, AT)).toBe(true);
      expect(await bootstrapIfEmpty(store.db, KEY, AT)).toBe(false);
      expect((await authenticate(store.db, KEY))?.role).toBe('admin');
      expect(await store.db.selectFrom('organisations').selectAll().execute()).toHaveLength(1);
    } finally {
      await store.close();
      await dropTestDatabase(url);
    }
  });

  it('lets exactly one of several instances starting together bootstrap', async () => {
    const url = freshTestDatabaseUrl();
    if (testDialect() === 'sqlite') return; // an in-memory SQLite database cannot be shared by several stores
    const stores = [openStore(url), openStore(url), openStore(url), openStore(url)];
    try {
      await migrateToLatest(stores[0]!.db);
      const outcomes = await Promise.allSettled(stores.map((store) => bootstrapIfEmpty(store.db, KEY, AT)));
      expect(outcomes.map((o) => o.status)).toEqual(['fulfilled', 'fulfilled', 'fulfilled', 'fulfilled']);
      expect(outcomes.filter((o) => o.status === 'fulfilled' && o.value === true)).toHaveLength(1);
      expect(await stores[0]!.db.selectFrom('organisations').selectAll().execute()).toHaveLength(1);
      expect((await verifyAllAuditChains(stores[0]!.db)).ok).toBe(true);
    } finally {
      for (const store of stores) await store.close();
      await dropTestDatabase(url);
    }
  });
});
