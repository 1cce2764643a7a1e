/**
 * Savings computed once per data version. A meter's savings depend only on
 * its frozen baseline, its readings, its station's weather and its
 * adjustments; every write to those replaces the meter's data-version token
 * in its own transaction (store/data-versions.ts). The rendered document is
 * kept in memory under (organisation, meter, token, query), with a strong
 * entity tag, so a repeated request costs one indexed lookup of the token.
 *
 * Never stale: a document is stored only when the token read after computing
 * it equals the one read before. Every statement of the computation ran
 * between those two reads, and any commit that changed the data in between
 * would have replaced the token (tokens are random, never reused), so the
 * document is exactly the data under that token. Each instance keeps its own
 * memory; the token lives in the database, so a write through one instance
 * is seen by every other at its next request.
 */
import { createHash } from 'node:crypto';
import { notFound } from '../domain/errors.js';
import { BoundedCache } from '../lib/bounded-cache.js';
import { meterVersion } from '../store/data-versions.js';
import type { Executor } from './context.js';
import { meterSavings, type MeterSavings, type SavingsQuery } from './savings.js';

/** A savings document as sent: its bytes and their entity tag. */
export interface SavingsRepresentation {
  body: string;
  /** A strong entity tag (RFC 9110 §8.8.3) of the body. */
  etag: string;
}

/** Memory for rendered documents per service instance (our own figure: about 2,000 documents of a 36-month meter). */
export const SAVINGS_CACHE_BYTES = 32 * 1024 * 1024;

export class SavingsCache {
  private readonly documents: BoundedCache<SavingsRepresentation>;
  /** Counters for tests and the benchmark. */
  readonly stats = { hits: 0, misses: 0 };

  constructor(budgetBytes = SAVINGS_CACHE_BYTES) {
    this.documents = new BoundedCache(budgetBytes, (entry) => 2 * entry.body.length + 200);
  }

  /**
   * The meter's savings for the query, from memory while its data version
   * stands, else computed (and kept). `render` turns a document into the
   * response body (the route's own serialiser, always the same one), so a
   * kept body is byte-identical to a fresh one.
   */
  async savings(
    db: Executor,
    organisationId: string,
    meterId: string,
    query: SavingsQuery,
    render: (document: MeterSavings) => string,
  ): Promise<SavingsRepresentation> {
    // The version alone first (a light query): a kept document needs nothing more.
    const version = await meterVersion(db, organisationId, meterId);
    if (version === undefined) throw notFound('meter', meterId);
    const key = version === null ? null : cacheKey(organisationId, meterId, version, query);
    const cached = key === null ? undefined : this.documents.get(key);
    if (cached) {
      this.stats.hits++;
      return cached;
    }
    this.stats.misses++;
    const body = render(await meterSavings(db, organisationId, meterId, query));
    const representation: SavingsRepresentation = {
      body,
      etag: `"${createHash('sha256').update(body).digest('base64url')}"`,
    };
    if (key !== null && (await meterVersion(db, organisationId, meterId)) === version)
      this.documents.set(key, representation);
    return representation;
  }
}

function cacheKey(organisationId: string, meterId: string, version: string, query: SavingsQuery): string {
  return JSON.stringify([
    organisationId,
    meterId,
    version,
    query.from ?? null,
    query.to ?? null,
    query.confidence ?? null,
  ]);
}

/**
 * Whether an If-None-Match header matches the entity tag: `*`, or any listed
 * tag by the weak comparison GET uses (RFC 9110 §13.1.2: W/ ignored).
 */
export function noneMatchHits(header: string | undefined, etag: string): boolean {
  if (header === undefined) return false;
  if (header.trim() === '*') return true;
  const opaque = etag.replace(/^W\//, '');
  return header.split(',').some((tag) => tag.trim().replace(/^W\//, '') === opaque);
}
