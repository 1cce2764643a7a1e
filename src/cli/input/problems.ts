/**
 * Problems found in one file, reduced to the single line the user sees:
 * the earliest row first, and a count of the rest.
 */
import type { InputProblem } from '../../engine/index.js';
import { InputFileError } from '../errors.js';

export interface LocatedProblem {
  line: number;
  field: string;
  message: string;
}

/** Engine problems carry the record index; turn it into the record's line in the file. */
export function locateProblems(
  problems: readonly InputProblem[],
  lines: readonly number[],
  renameField: (field: string) => string = (f) => f,
): LocatedProblem[] {
  return problems.map((p) => {
    const related = p.relatedIndex === undefined ? undefined : lines[p.relatedIndex];
    return {
      line: lines[p.index] ?? 0,
      field: renameField(p.field),
      message: related === undefined ? p.message : `${p.message} (row ${related})`,
    };
  });
}

/**
 * Throw the first problem (by line, then by column order). Where the file
 * reader and the engine both flag the same cell, the first report wins.
 */
export function throwFirstProblem(
  file: string,
  problems: readonly LocatedProblem[],
  columnOrder: readonly string[],
): void {
  const unique = new Map<string, LocatedProblem>();
  for (const problem of problems) {
    const key = `${problem.line}\u0000${problem.field}`;
    if (!unique.has(key)) unique.set(key, problem);
  }
  const rank = (field: string) => {
    const index = columnOrder.indexOf(field);
    return index === -1 ? columnOrder.length : index;
  };
  const sorted = [...unique.values()].sort((a, b) => a.line - b.line || rank(a.field) - rank(b.field));
  const first = sorted[0];
  if (!first) return;
  const more = sorted.length - 1;
  const tail = more > 0 ? ` (and ${more} more problem${more === 1 ? '' : 's'} in this file)` : '';
  throw new InputFileError(file, first.line, first.field, first.message + tail);
}
