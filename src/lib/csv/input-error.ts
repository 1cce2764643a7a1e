/**
 * A problem in an input text (a file, or a request body), located at a CSV
 * row and a field. `file` names the input (a path, or "request body"); `line` is the line
 * number in it (header = 1).
 */
export class InputFileError extends Error {
  override name = 'InputFileError';
  constructor(
    readonly file: string,
    readonly line: number | null,
    readonly field: string | null,
    readonly detail: string,
  ) {
    super(describeLocation(file, line, field) + ': ' + detail);
  }
}

function describeLocation(file: string, line: number | null, field: string | null): string {
  let where = file;
  if (line !== null) where += ` row ${line}`;
  if (field !== null) where += `${line !== null ? ',' : ''} field "${field}"`;
  return where;
}
