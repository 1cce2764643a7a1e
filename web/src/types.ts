/** The shapes of the API answers the screens read (a subset of openapi/openapi.json). */

export type Role = 'admin' | 'engineer' | 'analyst' | 'integration';

export interface Caller {
  key: { id: string; name: string; role: Role };
  permissions: string[];
  organisation: { id: string; name: string };
}

export interface Facility {
  id: string;
  name: string;
  address: string | null;
  floorArea: number | null;
}

export interface Meter {
  id: string;
  facilityId: string;
  name: string;
  fuel: string;
  unit: string;
  weatherStationId: string;
}

export interface Reading {
  id?: string;
  start: string;
  end: string;
  days: number;
  quantity: number;
  estimated: boolean;
  cost: number | null;
}

export interface Observation {
  date: string;
  temp: number;
}

export type ModelName = '1P' | '2P' | '3PC' | '3PH' | '4P' | '5P';

export interface Candidate {
  model: ModelName;
  verdict: 'selected' | 'accepted' | 'rejected' | 'not-fitted';
  accepted: boolean;
  reasons: string[];
  parameters: Record<string, number | null>;
  coefficients: { name: string; estimate: number | null; standardError: number | null; tStat: number | null }[];
  changepoints: { name: string; estimate: number | null; standardError: number | null }[];
  n: number;
  p: number;
  overFitted?: boolean;
  stats: {
    r2: number | null;
    adjustedR2: number | null;
    rmse: number | null;
    cvrmse: number | null;
    nmbe: number | null;
    autocorrelation: number | null;
    outOfSample?: { cvrmse: number | null; nmbe: number | null; method: string } | undefined;
  } | null;
  guideline14: {
    pass: boolean;
    cvrmse: { value: number | null; limit: number | null; pass: boolean };
    nmbe: { value: number | null; limit: number | null; pass: boolean };
  } | null;
}

/** An engineer's exclusion of a reading from the fit. */
/** A bill the engineer leaves out of a fit, named by its id when the API gives readings one, else by its period. */
export interface Exclusion {
  readingId?: string;
  reason: string;
  start?: string;
  end?: string;
}

export interface Baseline {
  id: string;
  meterId: string;
  version: number;
  status: 'draft' | 'frozen' | 'superseded';
  start: string;
  end: string;
  temperatureForm: 'daily' | 'mean';
  selected: ModelName;
  chosen: ModelName;
  choiceReason: string | null;
  warnings: string[];
  contentHash: string | null;
  note: string | null;
  frozenAt: string | null;
  sufficiency: { sufficient: boolean; reasons: string[] } | null;
  exclusions?: Exclusion[];
  fit?: {
    selected: ModelName;
    candidates: Candidate[];
    periods: { used: number; excluded: { start: string; end: string; reason: string }[] };
    exclusions?: Exclusion[];
  };
}

export interface BaselinePoints {
  baselineId: string;
  useUnit: string;
  temperatureUnit: 'F' | 'C';
  temperatureForm: 'daily' | 'mean';
  chosen: ModelName;
  selected: ModelName;
  periods: {
    start: string;
    end: string;
    days: number;
    quantity: number;
    usePerDay: number;
    meanTemp: number;
    coverage: number;
    estimated: boolean;
  }[];
  candidates: {
    model: ModelName;
    line: { temp: number; usePerDay: number }[];
    expectedPerDay: (number | null)[];
    residuals: (number | null)[];
  }[];
}

export interface Uncertainty {
  fractional: number | null;
  absolute: number | null;
}

export interface Savings {
  model: ModelName;
  periods: {
    start: string;
    end: string;
    days: number;
    meanTemp: number | null;
    actual: number | null;
    modelBaseline: number | null;
    adjustment: number | null;
    adjustedBaseline: number | null;
    savings: number | null;
    outsideBaselineRange: boolean;
  }[];
  totals: {
    actual: number | null;
    adjustedBaseline: number | null;
    savings: number | null;
    fractionSaved: number | null;
    confidence: number;
    uncertainty: { guideline14: Uncertainty; exact: Uncertainty; combined: Uncertainty };
    significant: boolean;
    outsideRangeShare: number | null;
  };
  significance: { rule: string };
  baselineTemperatureRange: { min: number | null; max: number | null };
  extrapolation: {
    share: number | null;
    outsideDays: number;
    days: number;
    limit: number;
    exceedsLimit: boolean;
    summary: string;
  };
  adjustments: { reason: string; start: string; end: string }[];
  baselineVersion: number;
  baselineContentHash: string;
}

export interface Statement {
  id: string;
  status: 'prepared' | 'approved' | 'rejected' | 'voided';
  window?: unknown;
  facilityId?: string | null;
  note?: string | null;
  preparedBy?: string;
  preparedAt?: string;
  approvedBy?: string | null;
  approvedAt?: string | null;
  [more: string]: unknown;
}
