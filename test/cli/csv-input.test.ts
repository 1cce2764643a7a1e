/** The CSV layer on its own: header handling, line numbers, cells. Synthetic: each test writes its own small file text. */
import { describe, expect, it } from 'vitest';
import { parseCsvTable } from '../../src/lib/csv/csv-table.js';
import { readingsFromTable } from '../../src/cli/input/readings-file.js';
import { weatherFromTable } from '../../src/cli/input/weather-file.js';
import { InputFileError } from '../../src/cli/errors.js';
import { formatFixed, formatPercent, formatSignificant } from '../../src/cli/format/numbers.js';

describe('CSV tables', () => {
  it('trims and lower-cases header names, strips a BOM and keeps file line numbers across blank lines', () => {
    const table = parseCsvTable(
      'r.csv',
      '\uFEFF Start ,END, Quantity ,Cost\r\n\r\n2024-01-01,2024-02-01,100,12.50\r\n\r\n2024-02-01,2024-03-01,90,11\r\n',
    );
    expect(table.columns).toEqual(['start', 'end', 'quantity', 'cost']);
    expect(table.rows.map((r) => r.line)).toEqual([3, 5]);
    const { readings, lines } = readingsFromTable(table);
    expect(readings).toEqual([
      { start: '2024-01-01', end: '2024-02-01', quantity: 100 },
      { start: '2024-02-01', end: '2024-03-01', quantity: 90 },
    ]);
    expect(lines).toEqual([3, 5]);
  });

  it('reads the estimated flag in its accepted spellings', () => {
    const words = ['true', 'FALSE', 'yes', 'No', '1', '0', ''];
    const rows = words.map(
      (word, k) => `2024-01-${String(k + 1).padStart(2, '0')},2024-01-${String(k + 2).padStart(2, '0')},10,${word}`,
    );
    const { readings } = readingsFromTable(
      parseCsvTable('r.csv', ['start,end,quantity,estimated', ...rows].join('\n')),
    );
    expect(readings.map((r) => r.estimated)).toEqual([true, false, true, false, true, false, false]);
  });

  it('refuses a column named twice', () => {
    expect(() => parseCsvTable('r.csv', 'start,end,quantity,Start\n')).toThrow(
      /r\.csv row 1, field "start": the column appears more than once/,
    );
  });

  it('refuses an empty file', () => {
    expect(() => parseCsvTable('r.csv', '\n\n')).toThrow(InputFileError);
  });

  it('prefers temp over tmin/tmax when a weather file has both', () => {
    const { weather, source } = weatherFromTable(
      parseCsvTable('w.csv', 'date,temp,tmin,tmax\n2024-01-01,40,0,100\n'),
      'F',
    );
    expect(source).toBe('temp');
    expect(weather).toEqual([{ date: '2024-01-01', temp: 40 }]);
  });
});

describe('number formatting for the text reports', () => {
  it('groups thousands and fixes decimals without the machine locale', () => {
    // Hand-worked.
    expect(formatFixed(1234567.891, 1)).toBe('1,234,567.9');
    expect(formatFixed(-1234.4, 0)).toBe('-1,234');
    expect(formatFixed(-0.0001, 2)).toBe('0.00');
    expect(formatFixed(Number.NaN, 2)).toBe('n/a');
    expect(formatPercent(0.12345)).toBe('12.3%');
    expect(formatSignificant(-20.113890118566374)).toBe('-20.11');
    expect(formatSignificant(0.000012346)).toBe('1.235e-5');
  });
});
