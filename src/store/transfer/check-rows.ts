/**
 * The shape of a document's rows: each cell of the column's type, no unknown
 * column, the exported organisation's id, one row per key; rows of an older
 * version get the columns added since. Failures name the place (`tables.readings[3].quantity`).
 */
import { columnsAddedAfter, ruleFor, type ColumnRule, type TableRule } from './columns.js';
import { TransferInputError, type Cell, type ExportRow, type TransferTable } from './document.js';

export function isObject(value: unknown): value is Record<string, unknown> {
  return value !== null && typeof value === 'object' && !Array.isArray(value);
}

export function shown(value: unknown): string {
  if (value === undefined) return 'nothing';
  const text = JSON.stringify(value) ?? String(value);
  return text.length > 60 ? `${text.slice(0, 57)}...` : text;
}

export function fail(path: string, message: string): never {
  throw new TransferInputError(`${path}: ${message}`);
}

export function checkCell(path: string, value: unknown, rule: ColumnRule): void {
  if (value === undefined) fail(path, 'missing');
  if (value === null) {
    if (!rule.nullable) fail(path, 'must not be null');
    return;
  }
  if (rule.type === 'text' && typeof value !== 'string') fail(path, `must be text, got ${shown(value)}`);
  if (rule.type === 'real' && !(typeof value === 'number' && Number.isFinite(value)))
    fail(path, `must be a finite number, got ${shown(value)}`);
  if (rule.type === 'integer' && !Number.isSafeInteger(value))
    fail(path, `must be a whole number, got ${shown(value)}`);
  if (rule.min !== undefined && (value as number) < rule.min)
    fail(path, `must be at least ${rule.min}, got ${shown(value)}`);
  if (rule.oneOf && !rule.oneOf.includes(value as Cell))
    fail(path, `must be one of ${rule.oneOf.join(', ')}, got ${shown(value)}`);
}

export function checkRow(
  path: string,
  value: unknown,
  rule: TableRule,
  organisationId: string | null,
  version: number,
): ExportRow {
  if (!isObject(value)) fail(path, `must be an object, got ${shown(value)}`);
  for (const [column, columnRule] of Object.entries(rule.columns))
    checkCell(`${path}.${column}`, value[column], columnRule);
  for (const column of Object.keys(value)) {
    if (!Object.hasOwn(rule.columns, column)) fail(`${path}.${column}`, `not a column of format version ${version}`);
  }
  if (organisationId !== null && 'organisation_id' in value && value.organisation_id !== organisationId) {
    fail(
      `${path}.organisation_id`,
      `must be the exported organisation ${organisationId}, got ${shown(value.organisation_id)}`,
    );
  }
  return value as ExportRow;
}

export function checkTable(table: TransferTable, value: unknown, organisationId: string, version: number): ExportRow[] {
  if (!Array.isArray(value)) fail(`tables.${table}`, `must be a list of rows, got ${shown(value)}`);
  const rule = ruleFor(table, version);
  const added = columnsAddedAfter(table, version);
  const seen = new Set<string>();
  return value.map((entry, index) => {
    const checked = checkRow(`tables.${table}[${index}]`, entry, rule, organisationId, version);
    const row = added
      ? { ...checked, ...Object.fromEntries(Object.entries(added).map(([column, fill]) => [column, fill(checked)])) }
      : checked;
    const key = JSON.stringify(rule.key.map((column) => row[column]));
    if (seen.has(key)) fail(`tables.${table}[${index}]`, `a second row with the key ${rule.key.join(', ')} = ${key}`);
    seen.add(key);
    return row;
  });
}
