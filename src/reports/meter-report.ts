/**
 * One meter's part of the report, from what the engine computed: periods
 * with their adjustment, rate and cost; totals in the meter's unit and in
 * the common units; the adjustments with the share that falls in the window.
 */
import {
  adjustmentOverlap,
  adjustmentPerDay,
  ENERGY_UNIT_JOULES,
  canonicalEnergyUnit,
  periodRate,
  type NonRoutineAdjustment,
  type RateEntry,
  type ReportingExtrapolation,
  type SavingsDocument,
} from '../engine/index.js';
import type { PeriodFills } from '../engine/index.js';
import type {
  CostTotal,
  MeterReport,
  NormalisedSavings,
  ReportAdjustment,
  ReportPeriod,
  SignatureData,
} from './savings-report.js';
import { COMMON_UNITS, convertTotal, energyTotal } from './totals.js';

export interface StoredAdjustment extends NonRoutineAdjustment {
  recordedAt: string;
  recordedBy: string;
}

export interface MeterReportInput {
  meter: { id: string; name: string; fuel: string; unit: string; weatherStationId: string; temperatureUnit: 'F' | 'C' };
  baseline: NonNullable<MeterReport['baseline']>;
  savings: SavingsDocument;
  rates: { currency: string | null; entries: readonly RateEntry[] };
  adjustments: readonly StoredAdjustment[];
  normalised: NormalisedSavings;
  signature: SignatureData | null;
  /** The window's reporting days against the weather the baseline saw. */
  extrapolation: ReportingExtrapolation;
  /** Reporting periods that rest on filled weather days (none when absent). */
  weatherFills?: PeriodFills[];
}

/** The more cautious of the model's two stated uncertainties (a formula that cannot be evaluated is passed over). */
export function cautiousUncertainty(savings: SavingsDocument): number {
  const values = [savings.totals.uncertainty.guideline14.absolute, savings.totals.uncertainty.exact.absolute].filter(
    Number.isFinite,
  );
  return values.length > 0 ? Math.max(...values) : Number.NaN;
}

/**
 * The meter's ±: the model's more cautious ± combined in quadrature with the
 * non-routine adjustments' own ± (the engine's combined uncertainty).
 */
export function meterUncertainty(savings: SavingsDocument): number {
  return savings.totals.uncertainty.combined.absolute;
}

/**
 * What a reader must know about the baseline a meter's figures rest on, in
 * words: each override with the reason given at freeze, and a baseline that
 * does not cover a full cycle of seasons.
 */
export function baselineNotes(
  baseline: MeterReport['baseline'],
  extrapolation: ReportingExtrapolation | null,
): string[] {
  if (baseline === null) return [];
  const notes: string[] = [];
  const { sufficiency, overrides } = baseline;
  const short = sufficiency.reasons.join('; ');
  if (overrides.shortBaseline !== null) {
    notes.push(
      `frozen with a short-baseline override, reason: “${overrides.shortBaseline.reason}”${sufficiency.sufficient ? '' : ` (the baseline does not cover a full cycle of seasons: ${short})`}`,
    );
  } else if (!sufficiency.sufficient) {
    notes.push(
      `the baseline does not cover a full cycle of seasons (${short}); it was frozen before that was enforced`,
    );
  }
  if (overrides.extrapolation !== null) {
    const here =
      extrapolation === null
        ? ''
        : extrapolation.exceedsLimit
          ? `; used in this window: ${extrapolation.summary}`
          : `; not needed in this window (${(extrapolation.share * 100).toFixed(1)}% of the reporting days outside what the baseline saw)`;
    notes.push(`frozen with an extrapolation override, reason: “${overrides.extrapolation.reason}”${here}`);
  }
  for (const exclusion of baseline.exclusions ?? []) {
    notes.push(
      `baseline reading ${exclusion.start}..${exclusion.end} left out of the fit by the engineer, reason: “${exclusion.reason}”`,
    );
  }
  return notes;
}

export function meterReport(input: MeterReportInput): MeterReport {
  const { meter, savings, rates } = input;
  const missingRates: { start: string; end: string }[] = [];
  const periods: ReportPeriod[] = savings.periods.map((p) => {
    const priced =
      rates.currency === null
        ? { rate: null, missing: [{ start: p.start, end: p.end }] }
        : periodRate(rates.entries, p.start, p.end);
    missingRates.push(...priced.missing);
    return { ...p, rate: priced.rate, costAvoided: priced.rate === null ? null : p.savings * priced.rate };
  });

  const t = savings.totals;
  const uncertainty = meterUncertainty(savings);
  const energy = energyTotal(meter.unit, {
    actual: t.actual,
    modelBaseline: t.modelBaseline,
    adjustments: t.adjustments,
    adjustedBaseline: t.adjustedBaseline,
    savings: t.savings,
    uncertainty,
  });
  const known = canonicalEnergyUnit(meter.unit);
  const common = known === undefined ? null : { MMBtu: convertTotal(energy, 'MMBtu'), GJ: convertTotal(energy, 'GJ') };

  return {
    ...meter,
    baseline: input.baseline,
    missing: null,
    periods,
    excluded: savings.excluded.reporting.map((e) => ({ start: e.start, end: e.end, reason: e.reason })),
    energy,
    common,
    commonNote:
      common === null
        ? `unit ${meter.unit} has no standard energy factor (known units: ${Object.keys(ENERGY_UNIT_JOULES).join(', ')}; others need a heating value, never assumed); this meter stays out of the ${COMMON_UNITS.join(' and ')} totals`
        : null,
    cost: rates.currency === null ? null : meterCost(rates.currency, periods, uncertainty),
    missingRates: mergeRanges(missingRates),
    extrapolationShare: t.outsideRangeShare,
    extrapolation: input.extrapolation,
    notes: baselineNotes(input.baseline, input.extrapolation),
    uncertaintyParts: { model: cautiousUncertainty(savings), adjustments: t.uncertainty.adjustments.absolute },
    significant: t.significant,
    adjustments: input.adjustments.map((a) => reportAdjustment(a, periods)),
    normalised: input.normalised,
    signature: input.signature,
    weatherFills: input.weatherFills ?? [],
  };
}

/** Cost avoided over the priced periods; its ± is the energy ± times the day-weighted mean rate. */
function meterCost(currency: string, periods: readonly ReportPeriod[], energyUncertainty: number): CostTotal {
  const priced = periods.filter((p) => p.rate !== null);
  const days = priced.reduce((acc, p) => acc + p.days, 0);
  const meanRate = days > 0 ? priced.reduce((acc, p) => acc + p.rate! * p.days, 0) / days : 0;
  return {
    currency,
    avoided: priced.reduce((acc, p) => acc + p.costAvoided!, 0),
    uncertainty: energyUncertainty * meanRate,
    periodsWithoutRate: periods.length - priced.length,
  };
}

function reportAdjustment(a: StoredAdjustment, periods: readonly ReportPeriod[]): ReportAdjustment {
  const perDay = adjustmentPerDay(a);
  return {
    id: a.id,
    start: a.start,
    end: a.end,
    quantity: a.quantity,
    perDay,
    reason: a.reason,
    uncertainty: a.uncertainty ?? null,
    appliedInWindow: periods.reduce((acc, p) => acc + perDay * adjustmentOverlap(a, p), 0),
    recordedAt: a.recordedAt,
    recordedBy: a.recordedBy,
  };
}

/** Adjacent or overlapping date ranges joined, in date order. */
export function mergeRanges(ranges: readonly { start: string; end: string }[]): { start: string; end: string }[] {
  const sorted = [...ranges].sort((a, b) => (a.start < b.start ? -1 : a.start > b.start ? 1 : 0));
  const out: { start: string; end: string }[] = [];
  for (const range of sorted) {
    const last = out.at(-1);
    if (last && range.start <= last.end) {
      if (range.end > last.end) last.end = range.end;
    } else out.push({ ...range });
  }
  return out;
}

/** A meter that has no figures in the window, and why. */
export function missingMeterReport(
  meter: MeterReportInput['meter'],
  baseline: MeterReport['baseline'],
  reason: string,
  adjustments: readonly StoredAdjustment[],
  extrapolation: ReportingExtrapolation | null = null,
): MeterReport {
  return {
    ...meter,
    baseline,
    missing: reason,
    periods: [],
    excluded: [],
    energy: null,
    common: null,
    commonNote: null,
    cost: null,
    missingRates: [],
    extrapolationShare: 0,
    extrapolation,
    notes: baselineNotes(baseline, extrapolation),
    uncertaintyParts: null,
    significant: false,
    adjustments: adjustments.map((a) => reportAdjustment(a, [])),
    normalised: { available: false, reason },
    signature: null,
    weatherFills: [],
  };
}
