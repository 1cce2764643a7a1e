/** The --json output: one document, two-space indent, non-finite numbers as null. */

export function toJsonDocument(document: unknown): string {
  return `${JSON.stringify(document, (_key, value: unknown) => (typeof value === 'number' && !Number.isFinite(value) ? null : value), 2)}\n`;
}
