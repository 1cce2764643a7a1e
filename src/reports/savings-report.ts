/**
 * The savings report as plain data: what the JSON format returns as is, and
 * what the CSV and HTML formats render. Built by assemble.ts from stored
 * rows and the engine; nothing here knows HTTP or SQL.
 *
 * Reproducibility: the document carries no clock time. It names the data it
 * rests on (the organisation's audit head, every frozen baseline's content
 * hash, the normal year's hash) and its own content hash, so the same
 * request on the same data gives the same bytes.
 */

import type {
  NormalisedResult,
  PeriodFills,
  ProjectionOverrides,
  ReportingExtrapolation,
  SavingsPeriod,
  TemperatureForm,
} from '../engine/index.js';

export const REPORT_FORMAT = 'mvledger-savings-report';
export const REPORT_VERSION = 1;

/** The two common energy units of the roll-up. */
export type CommonEnergyUnit = 'MMBtu' | 'GJ';

export interface ReportWindow {
  /** First day, inclusive. */
  from: string;
  /** Day after the last, exclusive. */
  to: string;
  kind: 'range' | 'quarter' | 'contract-year';
  /** "2026-Q3", "contract year 2 (2025-07-01..2026-07-01)", or "2026-01-01..2026-04-01". */
  label: string;
}

/** One reporting period of one meter, in the meter's unit: the engine's period with its contract rate and cost. */
export interface ReportPeriod extends SavingsPeriod {
  /** Day-weighted mean contract rate over the period (currency per unit); null where any day has no rate. */
  rate: number | null;
  /** savings × rate; null where the rate is missing. */
  costAvoided: number | null;
}

/** A total in one unit with its uncertainty (± at the report's confidence). */
export interface EnergyTotal {
  unit: string;
  actual: number;
  modelBaseline: number;
  adjustments: number;
  adjustedBaseline: number;
  savings: number;
  /** savings / adjustedBaseline; null when the adjusted baseline is 0. */
  fractionSaved: number | null;
  /** ± absolute, same unit, at the report's confidence. */
  uncertainty: number;
}

export interface CostTotal {
  currency: string;
  /** Sum of the periods' cost avoided that have a rate. */
  avoided: number;
  /** ± at the report's confidence: the energy uncertainty times the mean rate, combined in quadrature across meters. */
  uncertainty: number;
  /** Periods left out of the cost for want of a rate. */
  periodsWithoutRate: number;
}

export interface ReportAdjustment {
  id: string;
  start: string;
  end: string;
  /** As recorded: a total over [start, end) or a rate per day (one of the two). */
  quantity: number | null;
  perDay: number;
  reason: string;
  /** The engineer's standard uncertainty (one standard deviation) of its whole total, as recorded; null when none was stated. */
  uncertainty: number | null;
  /** The part of it that falls in this report's reporting periods. */
  appliedInWindow: number;
  recordedAt: string;
  recordedBy: string;
}

/** Both models over the station's normal year, or why not (see engine/normalised.ts). */
export type NormalisedSavings = NormalisedResult;

/** Points for the energy-signature chart, in the station's unit and the meter's unit per day. */
export interface SignatureData {
  temperatureUnit: 'F' | 'C';
  baseline: { temp: number; usePerDay: number; label: string }[];
  reporting: { temp: number; usePerDay: number; label: string }[];
  /** Vertices of the frozen model's line over the baseline's temperature range (a day-resolved model: over the daily temperatures it saw). */
  fittedLine: { temp: number; usePerDay: number }[];
  /** The frozen model's form: a day-resolved model's line is its daily response. */
  temperatureForm: TemperatureForm;
  /** Day-resolved models: each bill's expected use per day (the daily response averaged over its days), at its mean temperature; empty otherwise. */
  expected: { temp: number; usePerDay: number; label: string }[];
  /** The reporting points are actual use net of each period's non-routine adjustments, (actual − adjustment) / days; false when no period has one. */
  reportingNetOfAdjustments: boolean;
}

export interface MeterReport {
  id: string;
  name: string;
  fuel: string;
  unit: string;
  /** The station the meter is read against, and the unit of its temperatures (mean temperatures, ranges). */
  weatherStationId: string;
  /** The station's name as stored. */
  weatherStationName?: string;
  temperatureUnit: 'F' | 'C';
  baseline: {
    id: string;
    version: number;
    contentHash: string;
    model: string;
    /** The shape in words with its code, e.g. "three-parameter heating (3PH)". */
    modelName?: string;
    start: string;
    end: string;
    temperatureRange: { min: number; max: number };
    cvrmse: number;
    /** The frozen fit's NMBE (Guideline 14 definition). */
    nmbe?: number;
    /** The frozen model's coefficients (slopes as dy/dx, use per day per degree) with their standard errors. */
    coefficients?: { name: string; estimate: number; standardError: number }[];
    /** Its changepoints (station's unit) with their Gauss–Newton standard errors (null where singular). */
    changepoints?: { name: string; estimate: number; standardError: number | null }[];
    /** Guideline 14 CV(RMSE) and NMBE check for the reporting length; null when it cannot be judged. */
    meetsGuideline14: boolean | null;
    /** The form the baseline was frozen in, which its projections keep: 'daily' (day-resolved) or 'mean'. */
    temperatureForm: TemperatureForm;
    /** Whether it covers a full cycle of seasons, and if not why. */
    sufficiency: { sufficient: boolean; reasons: string[] };
    /** What was allowed when it was frozen, each with the reason given. */
    overrides: ProjectionOverrides;
    /** Baseline readings the engineer left out of the fit, each with its reason (absent in reports made before exclusions existed). */
    exclusions?: { start: string; end: string; reason: string }[];
  } | null;
  /** Why this meter has no figures in the window (no frozen baseline, no reporting readings); null when it has them. */
  missing: string | null;
  periods: ReportPeriod[];
  /** Reporting readings in the window left out (weather coverage), with the reason. */
  excluded: { start: string; end: string; reason: string }[];
  /** In the meter's unit; null when missing. */
  energy: EnergyTotal | null;
  /** The same totals converted; null when the meter's unit has no standard energy factor (then it stays out of the roll-up). */
  common: Record<CommonEnergyUnit, EnergyTotal> | null;
  /** Why `common` is null, e.g. "unit m3 has no standard energy factor". */
  commonNote: string | null;
  cost: CostTotal | null;
  /** Rate coverage problems: date ranges with no contract rate. */
  missingRates: { start: string; end: string }[];
  /** Share of the model baseline from periods outside the baseline's temperature range. */
  extrapolationShare: number;
  /** Share of the window's reporting days whose weather lies outside what the baseline saw, against its limit; null when there are no reporting periods. */
  extrapolation: ReportingExtrapolation | null;
  /** What a reader must know about the baseline this meter's figures rest on: overrides with their reasons, a short baseline. */
  notes: string[];
  /**
   * The parts of the meter's ± (energy.uncertainty, the combined one): the
   * model's larger ± and the non-routine adjustments' own ±, at the report's
   * confidence, in the meter's unit; null when missing.
   */
  uncertaintyParts: { model: number; adjustments: number } | null;
  /** Uncertainty below 50% of savings at 68% confidence (Guideline 14), by the more cautious formula. */
  significant: boolean;
  adjustments: ReportAdjustment[];
  normalised: NormalisedSavings;
  signature: SignatureData | null;
  /** Reporting periods whose weather includes days filled on record, with the counts by method in words ("3 of 31 days filled by interpolation"). */
  weatherFills: PeriodFills[];
}

export interface GuaranteeLine {
  guaranteed: number;
  /** Measured savings of the contract year up to `measuredThrough`. */
  measured: number;
  /** ± at the report's confidence. */
  uncertainty: number;
  /** measured − guaranteed: negative is a shortfall, positive a surplus. */
  difference: number;
}

export interface GuaranteeStatus {
  contractYear: number;
  yearStart: string;
  yearEnd: string;
  /** Exclusive end of the data counted (the earlier of the report's end and the year's end). */
  measuredThrough: string;
  /** The contract year is over and counted whole. */
  complete: boolean;
  energy: (GuaranteeLine & { unit: string }) | null;
  cost: (GuaranteeLine & { currency: string }) | null;
  /** Cumulative measured savings by period end across the contract year, for the chart. */
  cumulative: { end: string; energy: number; cost: number | null }[];
  /** What limits the comparison: meters left out of it, a guarantee that cannot be measured. */
  notes: string[];
  /**
   * Meters with reporting figures in the year to date; 0 means no data in
   * this window: `measured` and `difference` then stand for nothing and no
   * shortfall or surplus is stated.
   */
  metersWithData: number;
}

export interface ContractSummary {
  start: string;
  years: number;
  currency: string | null;
  energyUnit: string;
  guarantees: { year: number; energy: number | null; cost: number | null }[];
  /** The contract's identification, as set on the contract (null or empty when not given). */
  reference?: string | null;
  parties?: { role: string; name: string }[];
  mvPlanReference?: string | null;
  mvOption?: string | null;
  /** The confidence level the contract names for its reports. */
  confidence?: number;
}

export interface FacilityReport {
  id: string;
  name: string;
  address: string | null;
  contract: ContractSummary | null;
  meters: MeterReport[];
  /** Meter totals converted and summed; uncertainties in quadrature. */
  totals: Record<CommonEnergyUnit, EnergyTotal>;
  /** Cost by currency. */
  cost: CostTotal[];
  guarantees: GuaranteeStatus[];
  /**
   * Meters with reporting figures in the window; 0 means no data in this
   * window: the totals are empty sums, shown as "no data in this window",
   * and the facility adds nothing to the portfolio.
   */
  metersWithData: number;
}

export interface SavingsReport {
  format: typeof REPORT_FORMAT;
  version: typeof REPORT_VERSION;
  organisation: { id: string; name: string };
  window: ReportWindow;
  /** Two-sided confidence of every ± in the report. */
  confidence: number;
  /** Where the confidence comes from: the request, the contract(s), or the default of a report without a contract. */
  confidenceSource?: 'request' | 'contract' | 'default';
  /** The data the report rests on: the organisation's audit head when it was made. */
  dataAsOf: { auditSeq: number; auditHash: string };
  portfolio: {
    totals: Record<CommonEnergyUnit, EnergyTotal>;
    cost: CostTotal[];
    meters: number;
    metersInRollup: number;
  };
  facilities: FacilityReport[];
  /** Every frozen baseline used, with its content hash. */
  baselines: { meterId: string; baselineId: string; version: number; contentHash: string }[];
  /** Normal years used for normalised savings, by station. */
  normalYears: { stationId: string; contentHash: string; source: string }[];
  /**
   * How the meters' ± were combined: the pooled correlation of their baseline
   * residuals within a weather station and across stations (null where no
   * two meters share enough months; then 0), and the pairs behind each.
   */
  rollup: {
    withinStation: number | null;
    acrossStations: number | null;
    pairsWithinStation: number;
    pairsAcrossStations: number;
  };
  method: {
    summary: string;
    readingsInWindow: string;
    /** How each meter's baseline sees the weather: day-resolved or mean form, kept as frozen. */
    temperatureForm: string;
    /** The checks between a baseline and its projection: a full cycle of seasons, the extrapolation limit, overrides. */
    checks: string;
    adjustments: string;
    costs: string;
    uncertainty: string;
    independence: string;
    normalised: string;
    sources: string[];
  };
  unitFactors: { unit: string; btu: number; mmbtu: number; gj: number }[];
  unitFactorSource: string;
  /** Things a reader must know: missing rates, meters left out of the roll-up, partial contract years. */
  notices: string[];
  caution: string;
  /** SHA-256 of the canonical JSON of every other field. */
  contentHash: string;
}
