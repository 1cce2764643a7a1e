/**
 * CSV cells of the savings report. Check values: RFC 4180 quoting (fields
 * with commas, quotes or line ends are quoted, quotes doubled), the common
 * practice of defusing cells a spreadsheet would run as formulas, and
 * hand-worked number text.
 */
import { describe, expect, it } from 'vitest';
import { csvNumber, csvText, CSV_COLUMNS, renderReportCsv } from '../../src/reports/csv.js';
import { IDS, LIBRARY_OVERRIDE_REASON, SAMPLE_REPORT } from './fixtures/sample-report.js';

describe('csvNumber', () => {
  it('writes at most six decimals, without exponent or trailing zeros', () => {
    expect(csvNumber(1234.5)).toBe('1234.5');
    expect(csvNumber(0.1 + 0.2)).toBe('0.3'); // hand-worked: 0.30000000000000004 rounds to 0.3
    expect(csvNumber(1e-7)).toBe('0');
    expect(csvNumber(-0.0000004)).toBe('0'); // no "-0"
    expect(csvNumber(123456789.1234567)).toBe('123456789.123457');
    expect(csvNumber(-2.5)).toBe('-2.5');
    expect(csvNumber(3e20)).toBe('300000000000000000000');
  });
  it('leaves non-finite numbers empty', () => {
    expect(csvNumber(Number.NaN)).toBe('');
    expect(csvNumber(Number.POSITIVE_INFINITY)).toBe('');
  });
});

describe('csvText', () => {
  it('quotes fields with commas, quotes or line ends (RFC 4180)', () => {
    expect(csvText('plain')).toBe('plain');
    expect(csvText('a, b')).toBe('"a, b"');
    expect(csvText('say "hi"')).toBe('"say ""hi"""');
    expect(csvText('two\nlines')).toBe('"two\nlines"');
  });
  it('defuses text a spreadsheet would run as a formula (common practice)', () => {
    expect(csvText('=HYPERLINK("x")')).toBe(`"'=HYPERLINK(""x"")"`);
    expect(csvText('+1')).toBe("'+1");
    expect(csvText('-cmd')).toBe("'-cmd");
    expect(csvText('@sum')).toBe("'@sum");
  });
});

describe('the columns', () => {
  it('start with the record kind and name every figure once', () => {
    expect(CSV_COLUMNS[0]).toBe('record');
    expect(new Set(CSV_COLUMNS).size).toBe(CSV_COLUMNS.length);
  });
});

describe('a meter row of the sample report', () => {
  // Synthetic: the hand-built sample report sets the truth.
  const rows = renderReportCsv(SAMPLE_REPORT).split('\r\n');
  const meterRow = (id: string) => rows.find((row) => row.startsWith('meter,') && row.includes(id))!;

  it('ends with the temperature_form column, added after every earlier column', () => {
    expect(CSV_COLUMNS.slice(-2)).toEqual(['note', 'temperature_form']);
    expect(meterRow(IDS.libraryElectricity).endsWith(',daily')).toBe(true);
    expect(meterRow(IDS.hallGas).endsWith(',mean')).toBe(true);
    expect(meterRow(IDS.libraryGas).endsWith(',')).toBe(true); // no baseline, no form
  });

  it('carries the baseline notes (an override and its reason) and the parts of the combined ±', () => {
    const library = meterRow(IDS.libraryElectricity);
    expect(library).toContain(`frozen with an extrapolation override, reason: “${LIBRARY_OVERRIDE_REASON}”`);
    expect(library).toContain("uncertainty combines the model's 9000 and the adjustments' "); // synthetic: the fixture's parts
    expect(rows.find((row) => row.startsWith('adjustment,') && row.includes(IDS.libraryAdjustment))).toContain(
      'stated standard uncertainty of its total: 600 kWh',
    );
  });
});
