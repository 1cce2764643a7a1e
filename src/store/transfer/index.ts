/**
 * Moving one organisation between databases: `exportOrganisation` reads every
 * row of it, exactly as stored, into one document (our own format,
 * "mvledger-export", version EXPORT_VERSION); `importOrganisation` checks such a document
 * and stores it in another database in one transaction, or stores nothing.
 *
 * What the checks can prove: the audit trail inside the document recomputes
 * to the head it states, and every frozen (or superseded) baseline still
 * matches its content hash. Other rows carry no hash of their own; an edited
 * reading or name passes if it is well formed.
 *
 * API keys travel as their hashes, so a key keeps working after the move.
 * Idempotency keys are transient and stay behind.
 *
 * The modules: document.ts (format, versions, tables), columns.ts (each
 * table's columns per version), export.ts, check-rows.ts, check-integrity.ts,
 * rules.ts (the API's rules), check-document.ts, import.ts.
 */
export {
  EXPORT_FORMAT,
  EXPORT_VERSION,
  TRANSFER_TABLES,
  TransferInputError,
  type Cell,
  type ExportDocument,
  type ExportRow,
  type OrganisationRecord,
  type TransferTable,
} from './document.js';
export { exportOrganisation } from './export.js';
export { checkDocument } from './check-document.js';
export { importOrganisation, type ImportSummary } from './import.js';
