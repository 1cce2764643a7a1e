/**
 * An issued savings statement as plain data: the savings report exactly as
 * rendered at issue, wrapped with what a filed document needs (its id, the
 * issue time, the "data through" date, the request, and the approval block:
 * every workflow step with the key holder's name, role and UTC time).
 *
 * A statement is stored as copies, never changed: copy 1 is the issued copy
 * (awaiting approval); each later step (approval, rejection, voiding) stores
 * a new copy whose approval block shows that step, carrying the content
 * hashes of the issued copy it refers to. The report inside every copy is
 * the same, byte for byte.
 */
import { sha256Hex } from '../../lib/canonical-json.js';
import type { SavingsReport } from '../savings-report.js';
import type { SignedCheckpoint } from '../../lib/checkpoint-signature.js';

export const STATEMENT_FORMAT = 'mvledger-savings-statement';
export const STATEMENT_VERSION = 1;

export type StatementStatusName = 'prepared' | 'approved' | 'rejected' | 'voided';
export type CopyKind = 'issued' | 'approved' | 'rejected' | 'voided';

/** Who took a step: the API key, its holder's name and its role. */
export interface StepActor {
  keyId: string;
  name: string;
  role: string;
}

/** One step of the workflow as the approval block shows it. */
export interface StatementStep {
  step: StatementStatusName;
  by: StepActor;
  /** Server clock, UTC, ISO 8601. */
  at: string;
  /** The reason given (rejection, voiding); null otherwise. */
  reason: string | null;
  /** Voiding only: the statement that replaces this one, if named. */
  replacedBy?: string | null;
}

/** The request a statement was issued for, as given. */
export interface StatementRequest {
  window: { quarter: string } | { contractYear: number } | { from: string; to: string };
  facilityId: string | null;
  confidence: number | null;
}

export interface ContentHashes {
  json: string;
  csv: string;
  html: string;
}

export interface StatementDocument {
  format: typeof STATEMENT_FORMAT;
  version: typeof STATEMENT_VERSION;
  statement: {
    id: string;
    /** 1 for the issued copy, then one more per workflow step. */
    copy: number;
    copyKind: CopyKind;
    /** The status this copy shows. */
    status: StatementStatusName;
    /** When it was prepared (the issue date), UTC. */
    issuedAt: string;
    /** Last day (inclusive) of the latest reporting reading counted; null when none. */
    dataThrough: string | null;
    note: string | null;
    request: StatementRequest;
    /** Every step so far, oldest first: the approval block. */
    steps: StatementStep[];
    /** Later copies: the content hashes of the issued copy (copy 1) this copy stands for. */
    issuedCopy: ContentHashes | null;
    /**
     * The signed audit checkpoint of the head the figures were read at
     * (report.dataAsOf), when the service signs checkpoints: with the
     * service's public key and an export, anyone can check that the trail
     * behind the figures has not been rewritten or cut since.
     */
    checkpoint?: SignedCheckpoint;
  };
  report: SavingsReport;
}

/** The day before an ISO date (readings' ends are exclusive). */
function dayBefore(date: string): string {
  const d = new Date(`${date}T00:00:00.000Z`);
  d.setUTCDate(d.getUTCDate() - 1);
  return d.toISOString().slice(0, 10);
}

/** Last day (inclusive) of the latest reporting period any meter of the report counts; null when none. */
export function dataThrough(report: SavingsReport): string | null {
  let latest: string | null = null;
  for (const facility of report.facilities)
    for (const meter of facility.meters)
      for (const period of meter.periods) if (latest === null || period.end > latest) latest = period.end;
  return latest === null ? null : dayBefore(latest);
}

/** SHA-256 of stored text, as the content-hash header and the resource show it. */
export function textHash(text: string): string {
  return sha256Hex(text);
}
