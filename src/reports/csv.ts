/**
 * The savings report as one CSV table (RFC 4180, CRLF line ends) for
 * spreadsheets and finance systems: a `record` column says what each row is
 * (report, portfolio, facility, guarantee, meter, period, adjustment,
 * notice, caution). Deterministic: numbers are written with at most six
 * decimals and no exponent, so the same report gives the same bytes.
 * Columns are only ever added at the end, so a reader that counts them keeps
 * working: temperature_form (a meter row's frozen form, daily or mean);
 * cost_guaranteed and cost_difference (a cost guarantee's money, which
 * before shared guaranteed and difference with energy). Energy and money
 * never share a column: `unit` names the energy columns' unit, `currency`
 * the money columns', and money is written to the currency's minor unit.
 */
import type { EnergyTotal, FacilityReport, MeterReport, SavingsReport } from './savings-report.js';

export const CSV_COLUMNS = [
  'record',
  'facility_id',
  'facility',
  'meter_id',
  'meter',
  'unit',
  'start',
  'end',
  'days',
  'mean_temp',
  'actual',
  'model_baseline',
  'adjustment',
  'adjusted_baseline',
  'savings',
  'fraction_saved',
  'uncertainty',
  'guaranteed',
  'difference',
  'currency',
  'rate',
  'cost_avoided',
  'cost_uncertainty',
  'outside_baseline_range',
  'note',
  'temperature_form',
  'cost_guaranteed',
  'cost_difference',
] as const;

type Column = (typeof CSV_COLUMNS)[number];

export type CsvRecord = Partial<Record<Column, string | number | boolean | null>>;

/** Money columns: written to the currency's minor unit (two decimals for USD, none for JPY, three for KWD). */
const MONEY_COLUMNS: ReadonlySet<Column> = new Set<Column>([
  'cost_avoided',
  'cost_uncertainty',
  'cost_guaranteed',
  'cost_difference',
]);

/**
 * Decimals of a currency's minor unit, from ISO 4217 as ICU carries it
 * (Intl); 2 for a code ICU does not know.
 */
export function minorUnitDigits(currency: string): number {
  let digits = minorUnitsByCurrency.get(currency);
  if (digits === undefined) {
    try {
      digits =
        new Intl.NumberFormat('en', { style: 'currency', currency }).resolvedOptions().maximumFractionDigits ?? 2;
    } catch {
      digits = 2;
    }
    minorUnitsByCurrency.set(currency, digits);
  }
  return digits;
}

/** Each currency's minor-unit decimals, looked up once: building an Intl formatter per money cell made a 10,000-meter CSV report several times slower. */
const minorUnitsByCurrency = new Map<string, number>();

/** An amount of money as plain decimal text at the currency's minor unit, halves away from zero, no "-0". */
export function csvMoney(value: number, currency: string): string {
  if (!Number.isFinite(value)) return '';
  const digits = minorUnitDigits(currency);
  const scale = 10 ** digits;
  // Round the six-decimal text first, so 2.675 (stored as 2.67499…) is a half and goes up, as a reader expects.
  const exact = Number(csvNumber(value));
  const rounded = (Math.sign(exact) * Math.round(Math.abs(exact) * scale)) / scale;
  return rounded === 0 ? (0).toFixed(digits) : rounded.toFixed(digits);
}

/** A number as plain decimal text: at most six decimals, no exponent, no "-0". */
export function csvNumber(value: number): string {
  if (!Number.isFinite(value)) return '';
  const rounded = Math.round(value * 1e6) / 1e6;
  if (rounded === 0) return '0';
  const text = rounded.toFixed(6).replace(/\.?0+$/, '');
  return text;
}

/** Quote where needed; a text cell that a spreadsheet would run as a formula is defused with a leading apostrophe. */
export function csvText(text: string): string {
  const safe = /^[=+\-@\t\r]/.test(text) ? `'${text}` : text;
  return /[",\r\n]/.test(safe) ? `"${safe.replace(/"/g, '""')}"` : safe;
}

function cell(value: string | number | boolean | null | undefined): string {
  if (value === null || value === undefined) return '';
  if (typeof value === 'number') return csvNumber(value);
  if (typeof value === 'boolean') return value ? 'true' : 'false';
  return csvText(value);
}

function totalRow(total: EnergyTotal): CsvRecord {
  return {
    unit: total.unit,
    actual: total.actual,
    model_baseline: total.modelBaseline,
    adjustment: total.adjustments,
    adjusted_baseline: total.adjustedBaseline,
    savings: total.savings,
    fraction_saved: total.fractionSaved,
    uncertainty: total.uncertainty,
  };
}

export function renderReportCsv(report: SavingsReport): string {
  const w = report.window;
  const rows: CsvRecord[] = [
    {
      record: 'report',
      start: w.from,
      end: w.to,
      note: `${w.label}; confidence ${report.confidence}; content hash ${report.contentHash}; audit head ${report.dataAsOf.auditSeq} ${report.dataAsOf.auditHash}`,
    },
    ...portfolioRows(report.portfolio, w),
  ];
  for (const facility of report.facilities) rows.push(...facilityRows(facility, w));
  rows.push(...closingRows(report.notices, report.caution));
  return `${CSV_HEADER}${rows.map(csvLine).join('')}`;
}

/** The header line, CRLF-terminated. */
export const CSV_HEADER = `${CSV_COLUMNS.join(',')}\r\n`;

/** One row as a CRLF-terminated line; money at its currency's minor unit. */
export function csvLine(row: CsvRecord): string {
  return `${CSV_COLUMNS.map((column) => {
    const value = row[column];
    if (MONEY_COLUMNS.has(column) && typeof value === 'number' && typeof row.currency === 'string')
      return csvMoney(value, row.currency);
    return cell(value);
  }).join(',')}\r\n`;
}

/** The portfolio's rows: totals in each common unit, then cost by currency. */
export function portfolioRows(
  portfolio: Pick<SavingsReport['portfolio'], 'totals' | 'cost'>,
  w: { from: string; to: string },
): CsvRecord[] {
  const rows: CsvRecord[] = [];
  for (const unit of ['MMBtu', 'GJ'] as const)
    rows.push({ record: 'portfolio', ...totalRow(portfolio.totals[unit]), start: w.from, end: w.to });
  for (const cost of portfolio.cost)
    rows.push({
      record: 'portfolio',
      start: w.from,
      end: w.to,
      currency: cost.currency,
      cost_avoided: cost.avoided,
      cost_uncertainty: cost.uncertainty,
    });
  return rows;
}

/** The notice rows and the caution that end the table. */
export function closingRows(notices: readonly string[], caution: string): CsvRecord[] {
  return [
    ...notices.map((notice): CsvRecord => ({ record: 'notice', note: notice })),
    { record: 'caution', note: caution },
  ];
}

/** One facility's rows: its totals, its guarantees, then each meter's rows. */
export function facilityRows(facility: FacilityReport, w: { from: string; to: string }): CsvRecord[] {
  const rows: CsvRecord[] = [];
  const f = { facility_id: facility.id, facility: facility.name };
  if (facility.metersWithData === 0 && facility.meters.length > 0)
    rows.push({
      record: 'facility',
      ...f,
      start: w.from,
      end: w.to,
      note: 'no data in this window (left out of the sums)',
    });
  else
    for (const unit of ['MMBtu', 'GJ'] as const)
      rows.push({ record: 'facility', ...f, ...totalRow(facility.totals[unit]), start: w.from, end: w.to });
  for (const cost of facility.cost)
    rows.push({
      record: 'facility',
      ...f,
      start: w.from,
      end: w.to,
      currency: cost.currency,
      cost_avoided: cost.avoided,
      cost_uncertainty: cost.uncertainty,
    });
  for (const g of facility.guarantees) {
    const note = `contract year ${g.contractYear}${g.complete ? '' : ', not complete'}`;
    if (g.metersWithData === 0) {
      // Nothing measured: no figures, so no shortfall is read off an empty sum.
      if (g.energy)
        rows.push({
          record: 'guarantee',
          ...f,
          unit: g.energy.unit,
          start: g.yearStart,
          end: g.measuredThrough,
          guaranteed: g.energy.guaranteed,
          note: `${note}; no data in this window`,
        });
      if (g.cost)
        rows.push({
          record: 'guarantee',
          ...f,
          currency: g.cost.currency,
          start: g.yearStart,
          end: g.measuredThrough,
          cost_guaranteed: g.cost.guaranteed,
          note: `${note}; no data in this window`,
        });
      continue;
    }
    if (g.energy) {
      rows.push({
        record: 'guarantee',
        ...f,
        unit: g.energy.unit,
        start: g.yearStart,
        end: g.measuredThrough,
        savings: g.energy.measured,
        uncertainty: g.energy.uncertainty,
        guaranteed: g.energy.guaranteed,
        difference: g.energy.difference,
        note,
      });
    }
    if (g.cost) {
      rows.push({
        record: 'guarantee',
        ...f,
        currency: g.cost.currency,
        start: g.yearStart,
        end: g.measuredThrough,
        cost_avoided: g.cost.measured,
        cost_uncertainty: g.cost.uncertainty,
        // Money in its own columns: guaranteed and difference hold energy only.
        cost_guaranteed: g.cost.guaranteed,
        cost_difference: g.cost.difference,
        note,
      });
    }
  }
  for (const meter of facility.meters) rows.push(...meterRows(f, meter, w));
  return rows;
}

/** The parts of a meter's combined ± when adjustments carry one of their own. */
function adjustmentsUncertaintyText(meter: MeterReport): string {
  const parts = meter.uncertaintyParts;
  if (parts === null || parts.adjustments === 0) return '';
  return `; uncertainty combines the model's ${csvNumber(parts.model)} and the adjustments' ${csvNumber(parts.adjustments)} in quadrature`;
}

/** A meter's baseline notes (overrides and their reasons, a short baseline) as one text, led by "; ". */
function notesText(meter: MeterReport): string {
  return meter.notes.map((note) => `; ${note}`).join('');
}

function meterRows(f: CsvRecord, meter: MeterReport, w: { from: string; to: string }): CsvRecord[] {
  const m = { ...f, meter_id: meter.id, meter: meter.name };
  const form = meter.baseline?.temperatureForm ?? null;
  if (meter.missing !== null || meter.energy === null) {
    return [
      {
        record: 'meter',
        ...m,
        unit: meter.unit,
        start: w.from,
        end: w.to,
        note: `no data in this window (left out of the sums): ${meter.missing}${notesText(meter)}`,
        temperature_form: form,
      },
    ];
  }
  const rows: CsvRecord[] = [
    {
      record: 'meter',
      ...m,
      ...totalRow(meter.energy),
      start: w.from,
      end: w.to,
      currency: meter.cost?.currency ?? null,
      cost_avoided: meter.cost?.avoided ?? null,
      cost_uncertainty: meter.cost?.uncertainty ?? null,
      note: `baseline ${meter.baseline?.id} v${meter.baseline?.version} ${meter.baseline?.model} ${meter.baseline?.contentHash}; extrapolation share ${csvNumber(meter.extrapolationShare)}${adjustmentsUncertaintyText(meter)}${notesText(meter)}`,
      temperature_form: form,
    },
  ];
  for (const p of meter.periods) {
    rows.push({
      record: 'period',
      ...m,
      unit: meter.unit,
      start: p.start,
      end: p.end,
      days: p.days,
      mean_temp: p.meanTemp,
      actual: p.actual,
      model_baseline: p.modelBaseline,
      adjustment: p.adjustment,
      adjusted_baseline: p.adjustedBaseline,
      savings: p.savings,
      currency: meter.cost?.currency ?? null,
      rate: p.rate,
      cost_avoided: p.costAvoided,
      outside_baseline_range: p.outsideBaselineRange,
      note: p.rate === null ? 'no contract rate for every day of the period' : null,
    });
  }
  for (const a of meter.adjustments) {
    const stated =
      a.uncertainty === null
        ? ''
        : ` (stated standard uncertainty of its total: ${csvNumber(a.uncertainty)} ${meter.unit})`;
    rows.push({
      record: 'adjustment',
      ...m,
      unit: meter.unit,
      start: a.start,
      end: a.end,
      adjustment: a.appliedInWindow,
      note: `${a.id}: ${a.reason}${stated}`,
    });
  }
  return rows;
}
