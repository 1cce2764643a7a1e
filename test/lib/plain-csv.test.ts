/**
 * The hand split of plain CSV files against csv-parse (the reference
 * library the table reader otherwise uses, with the same options): on
 * seeded random texts made of the characters that matter (fields, commas,
 * spaces, blank lines, LF or CRLF endings, a byte-order mark), both give the
 * same records and the same line numbers; texts outside the plain form are
 * left to the parser. Synthetic: the texts are invented, csv-parse sets the truth.
 */
import { parse } from 'csv-parse/sync';
import { describe, expect, it } from 'vitest';
import { parseCsvTable, parsePlainCsv } from '../../src/lib/csv/csv-table.js';
import { seededRandom } from '../support/synthetic.js';

const OPTIONS = { bom: true, trim: true, skip_empty_lines: true, relax_column_count: true, info: true } as const;

function reference(text: string): { record: string[]; lines: number }[] {
  return (parse(text, OPTIONS) as unknown as { record: string[]; info: { lines: number } }[]).map((r) => ({
    record: r.record,
    lines: r.info.lines,
  }));
}

describe('parsePlainCsv', () => {
  it('gives csv-parse’s records and line numbers on 1,000 random plain texts', () => {
    const random = seededRandom(404);
    const pieces = ['2025-01-01', '12.5', '-3', 'meter-7', 'a b', '', ' ', '  x  ', ','];
    for (let t = 0; t < 1000; t++) {
      const crlf = random.uniform() < 0.3;
      const lines: string[] = [];
      const count = random.integer(0, 8);
      for (let l = 0; l < count; l++) {
        const fields = random.integer(0, 4);
        lines.push(Array.from({ length: fields }, () => pieces[random.integer(0, pieces.length - 1)]!).join(','));
      }
      let text = lines.join(crlf ? '\r\n' : '\n');
      if (random.uniform() < 0.5) text += crlf ? '\r\n' : '\n';
      if (random.uniform() < 0.1) text = `\uFEFF${text}`;
      const fast = parsePlainCsv(text);
      expect(fast, JSON.stringify(text)).not.toBeNull();
      expect(
        fast!.map((r) => ({ record: r.record, lines: r.info.lines })),
        JSON.stringify(text),
      ).toEqual(reference(text));
    }
  });

  it('leaves quotes, tabs, other characters and mixed line ends to the parser', () => {
    for (const text of ['a,"b"\n', 'a\tb\n', 'café,1\n', 'a,b\r\nc,d\n', 'a\rb\r'])
      expect(parsePlainCsv(text), JSON.stringify(text)).toBeNull();
    // …and the table reader still reads them through it.
    expect(parseCsvTable('f.csv', 'date,temp\n"2025-01-01",5\n').rows[0]!.cells.get('date')).toBe('2025-01-01');
  });
});
