/**
 * CSV cells of the savings report. Check values: RFC 4180 quoting (fields
 * with commas, quotes or line ends are quoted, quotes doubled), the common
 * practice of defusing cells a spreadsheet would run as formulas, and
 * hand-worked number text.
 */
import { describe, expect, it } from 'vitest';
import { parse } from 'csv-parse/sync';
import { csvMoney, csvNumber, csvText, CSV_COLUMNS, minorUnitDigits, renderReportCsv } from '../../src/reports/csv.js';
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

  it('has the temperature_form column after every earlier column, and the money columns added after it', () => {
    expect(CSV_COLUMNS.slice(-4)).toEqual(['note', 'temperature_form', 'cost_guaranteed', 'cost_difference']);
    const form = (id: string) => parse(meterRow(id))[0]![CSV_COLUMNS.indexOf('temperature_form')];
    expect(form(IDS.libraryElectricity)).toBe('daily');
    expect(form(IDS.hallGas)).toBe('mean');
    expect(form(IDS.libraryGas)).toBe(''); // no baseline, no form
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

describe('CSV money carried sub-cent digits and shared columns with energy', () => {
  it("writes money to the currency's minor unit (ISO 4217 minor units, as ICU carries them)", () => {
    expect(minorUnitDigits('USD')).toBe(2); // ISO 4217: 2
    expect(minorUnitDigits('JPY')).toBe(0); // ISO 4217: 0
    expect(minorUnitDigits('KWD')).toBe(3); // ISO 4217: 3
    expect(csvMoney(1234.5, 'USD')).toBe('1234.50');
    expect(csvMoney(2.675, 'EUR')).toBe('2.68'); // hand-worked: a half goes away from zero
    expect(csvMoney(-2.675, 'EUR')).toBe('-2.68');
    expect(csvMoney(1234.5, 'JPY')).toBe('1235');
    expect(csvMoney(-0.001, 'USD')).toBe('0.00'); // no "-0"
  });

  it('puts a cost guarantee in its own money columns and every money cell at two decimals (the sample is in USD)', () => {
    const table = parse(renderReportCsv(SAMPLE_REPORT)) as string[][];
    const column = (name: (typeof CSV_COLUMNS)[number]) => CSV_COLUMNS.indexOf(name);
    const body = table.slice(1);
    const guarantees = body.filter((r) => r[0] === 'guarantee');
    const cost = guarantees.find((r) => r[column('currency')] !== '')!;
    const energy = guarantees.find((r) => r[column('unit')] !== '')!;
    expect(cost[column('guaranteed')]).toBe(''); // money never in an energy column
    expect(cost[column('difference')]).toBe('');
    expect(cost[column('cost_guaranteed')]).toMatch(/^-?\d+\.\d{2}$/);
    expect(cost[column('cost_difference')]).toMatch(/^-?\d+\.\d{2}$/);
    expect(energy[column('cost_guaranteed')]).toBe(''); // energy never in a money column
    expect(energy[column('guaranteed')]).not.toBe('');
    for (const row of body) {
      for (const name of ['cost_avoided', 'cost_uncertainty', 'cost_guaranteed', 'cost_difference'] as const) {
        const value = row[column(name)]!;
        if (value !== '') expect(value, `${row[0]} ${name}`).toMatch(/^-?\d+\.\d{2}$/); // USD: two decimals
      }
    }
  });
});
