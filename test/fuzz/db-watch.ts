/**
 * Proves a rejected request stored nothing. databaseDigest (every table's
 * full contents) is the proof; on SQLite, total_changes() (rows written on
 * the connection, rolled back or not) says cheaply when nothing at all was
 * written, so the digest is taken only when something was, plus on a
 * sample. On PostgreSQL the digest is taken on the sample only.
 */
import { sql } from 'kysely';
import type { Store } from '../../src/store/connect.js';
import { databaseDigest } from '../support/db-digest.js';

export class DatabaseWatch {
  private digest = '';
  private changes = -1;
  digestsTaken = 0;
  checked = 0;

  constructor(private readonly store: Store) {}

  private async totalChanges(): Promise<number> {
    if (this.store.dialect !== 'sqlite') return -1;
    const result = await sql<{ n: number }>`select total_changes() as n`.execute(this.store.db);
    return Number(result.rows[0]!.n);
  }

  private async takeDigest(): Promise<string> {
    this.digestsTaken++;
    return databaseDigest(this.store.db);
  }

  /** The current state becomes the one later rejected requests must leave alone. */
  async accept(): Promise<void> {
    const changes = await this.totalChanges();
    // A replay or a no-op write touched no row: the state, and so its digest, is as it was.
    if (this.store.dialect === 'sqlite' && changes === this.changes && this.digest !== '') return;
    this.changes = changes;
    this.digest = await this.takeDigest();
  }

  /**
   * After a request that must not have written (rejected, or a read): null
   * when the database is as it was, else what changed. `sampled` forces the
   * full digest even when no row was written.
   */
  async unchanged(sampled: boolean): Promise<string | null> {
    this.checked++;
    const changes = await this.totalChanges();
    const written = this.store.dialect !== 'sqlite' || changes !== this.changes;
    if (!written && !sampled) return null;
    if (this.store.dialect !== 'sqlite' && !sampled) return null;
    const now = await this.takeDigest();
    this.changes = changes;
    if (now === this.digest) return null;
    const was = this.digest;
    this.digest = now;
    return `the database digest changed from ${was.slice(0, 12)} to ${now.slice(0, 12)}`;
  }
}
