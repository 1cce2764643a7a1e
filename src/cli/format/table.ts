/** A plain-text table: padded columns, a rule under the header, two spaces between columns. */

export interface Column {
  title: string;
  align: 'left' | 'right';
}

export function renderTable(columns: readonly Column[], rows: readonly (readonly string[])[]): string[] {
  const widths = columns.map((column, k) => Math.max(column.title.length, ...rows.map((row) => (row[k] ?? '').length)));
  const line = (cells: readonly string[]) =>
    columns
      .map((column, k) => {
        const text = cells[k] ?? '';
        return column.align === 'right' ? text.padStart(widths[k]!) : text.padEnd(widths[k]!);
      })
      .join('  ')
      .trimEnd();
  return [line(columns.map((c) => c.title)), widths.map((w) => '-'.repeat(w)).join('  '), ...rows.map(line)];
}
