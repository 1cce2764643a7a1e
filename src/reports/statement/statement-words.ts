/**
 * The words a statement uses in every format: its status as the running
 * header states it, its title, UTC times, a workflow step and a signed
 * checkpoint in one line each.
 */
import type { StatementDocument, StatementStep } from './statement-document.js';
import type { SignedCheckpoint } from '../../lib/checkpoint-signature.js';

export const STEP_WORDS: Record<StatementStep['step'], string> = {
  prepared: 'Prepared',
  approved: 'Approved',
  rejected: 'Rejected',
  voided: 'Voided',
};

/** What the running header says of the copy's status. */
export function statusWords(document: StatementDocument): string {
  switch (document.statement.status) {
    case 'prepared':
      return 'AWAITING APPROVAL: not for payment';
    case 'approved':
      return 'APPROVED';
    case 'rejected':
      return 'REJECTED: not for payment';
    case 'voided':
      return 'VOID: not for payment';
  }
}

/** The statement's title, also the HTML document's title. */
export function statementTitle(document: StatementDocument): string {
  return `Savings statement ${document.statement.id}: ${document.report.organisation.name}, ${document.report.window.label}`;
}

export function utc(at: string): string {
  // Stored times are ISO 8601 in UTC: shown to the second, marked UTC.
  return `${at.slice(0, 10)} ${at.slice(11, 19)} UTC`;
}

/** A checkpoint in words, with everything an auditor needs to check its signature. */
export function checkpointWords(checkpoint: SignedCheckpoint): string {
  return `audit checkpoint: sequence ${checkpoint.seq} hash ${checkpoint.headHash} signed ${utc(checkpoint.signedAt)} by key ${checkpoint.keyId}, Ed25519 signature ${checkpoint.signature}`;
}

export function stepLine(step: StatementStep): string {
  const reason = step.reason === null ? '' : `; reason: ${step.reason}`;
  const replaced = step.replacedBy ? `; replaced by ${step.replacedBy}` : '';
  return `${STEP_WORDS[step.step]} by ${step.by.name} (${step.by.role}, key ${step.by.keyId}) at ${utc(step.at)}${reason}${replaced}`;
}
