/** What the baseline service takes and answers: fit options, freeze input, the stored inputs, the views. */
import type {
  AppliedExclusion,
  BaselineSufficiency,
  DailyTemperature,
  FitDocument,
  ModelName,
  PeriodFills,
  ProjectionOverrides,
  Reading,
  TemperatureForm,
  TemperatureUnit,
  VariableSeries,
} from '../../engine/index.js';
import type { BaselineStatus } from '../../store/schema.js';

export interface BaselineFitOptions {
  minCoverage?: number;
  significanceLevel?: number;
  minPointsPerSegment?: number;
  allowSameSignFourPoint?: boolean;
  /** How each reading's weather enters the fit; default: day-resolved wherever daily weather covers the readings. */
  temperature?: TemperatureForm;
  /** Stored variables (by name: the meter's own, else its facility's) the fit may carry; each must earn its place. */
  variables?: string[];
  /** The engineer's decisions on variables: forced in or out, each with its reason on record. */
  variableOverrides?: { name: string; include: boolean; reason: string }[];
  /** Offer the facility calendar's day types as indicator variables (day-type intercepts; a bill's share of days of each type). */
  dayTypes?: boolean;
}

/** What was allowed when the baseline was frozen, each with the reason given; null where nothing was. */
export type BaselineOverrides = ProjectionOverrides;

export interface FreezeInput {
  note: string;
  supersedeReason?: string;
  overrides?: { shortBaseline?: { reason: string }; extrapolation?: { reason: string } };
}

/** Exactly what the fit saw: kept with the baseline so it can be re-run and checked. */
export interface BaselineInputs {
  readings: Reading[];
  weather: DailyTemperature[];
  temperatureUnit: TemperatureUnit;
  /** The stored variables the fit was offered, with their values in the window (absent for a weather-only fit). */
  variables?: StoredVariableSeries[];
}

/** A stored variable's values as a fit saw them: its id and unit beside the engine's series. */
export interface StoredVariableSeries extends VariableSeries {
  /** The stored variable's id; for a day-type indicator, the facility whose calendar it comes from. */
  id: string;
  unit: string;
  /** 'calendar' for a day-type indicator of the facility calendar; absent for a stored variable. */
  source?: 'calendar';
}

export interface BaselineSummary {
  id: string;
  meterId: string;
  version: number;
  status: BaselineStatus;
  start: string;
  end: string;
  options: BaselineFitOptions;
  /** The form the baseline was fitted in, which its projections keep: 'daily' (day-resolved) or 'mean'. */
  temperatureForm: TemperatureForm;
  /** Whether it covers a full cycle of seasons (null for a row without its inputs). */
  sufficiency: BaselineSufficiency | null;
  overrides: BaselineOverrides;
  selected: ModelName;
  chosen: ModelName;
  choiceReason: string | null;
  warnings: string[];
  contentHash: string | null;
  note: string | null;
  frozenAt: string | null;
  frozenBy: string | null;
  supersedes: string | null;
  supersedeReason: string | null;
  createdAt: string;
  createdBy: string;
  /** Readings the engineer left out, each with its reason (from the fit document, so frozen with it). */
  exclusions: AppliedExclusion[];
}

/** An exclusion as the API takes it: the reading by id or by its period, and the reason. */
export interface ExclusionRequest {
  readingId?: string;
  start?: string;
  end?: string;
  reason: string;
}

export interface Baseline extends BaselineSummary {
  /** The engine's fit document, non-finite numbers as null. */
  fit: FitDocument;
  /** The baseline's periods whose weather includes days filled on record, by method (none: empty). */
  weatherFills: PeriodFills[];
}
