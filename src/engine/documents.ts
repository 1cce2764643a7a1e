/**
 * The stable JSON documents other programs depend on: the CLI's --json output
 * and the service's responses use exactly these shapes. Add keys freely;
 * never rename or remove one.
 */
import type { BaselineChoice, Candidate, VariableDecision } from './choose.js';
import type { AppliedExclusion } from './exclusions.js';
import type { ExcludedPeriod, ModelName, TemperatureForm } from './types.js';
import type { SavingsResult } from './savings.js';
import type { FitStatistics } from './fit/fit-shape.js';

export interface CandidateDocument {
  model: ModelName;
  verdict: Candidate['verdict'];
  accepted: boolean;
  reasons: string[];
  /** Every parameter by name (slopes as dy/dx, use per day per degree). */
  parameters: Record<string, number>;
  coefficients: { name: string; estimate: number; standardError: number; tStat: number; tStatAdjusted: number }[];
  changepoints: { name: string; estimate: number; standardError: number | null }[];
  segmentCounts: Record<string, number>;
  temperatureRange: { min: number; max: number } | null;
  sse: number | null;
  n: number;
  p: number;
  aicc: number | null;
  /** Out-of-sample CV(RMSE) far above the in-sample one (see choose.ts). */
  overFitted: boolean;
  stats: {
    r2: number;
    adjustedR2: number;
    rmse: number;
    cvrmse: number;
    nmbe: number;
    autocorrelation: number;
    durbinWatson: number;
    outOfSample?: FitStatistics['outOfSample'];
  } | null;
  guideline14: Candidate['guideline14'];
}

export interface FitDocument {
  selected: ModelName;
  /** How each reading's weather entered the fit: 'daily' (day-resolved) or 'mean'. */
  temperatureForm: TemperatureForm;
  candidates: CandidateDocument[];
  periods: { used: number; excluded: ExcludedPeriod[] };
  settings: BaselineChoice['settings'] & { minCoverage: number };
  /** Readings the engineer left out, each with its reason (apart from periods.excluded, which the weather's coverage left out). Absent when none. */
  exclusions?: AppliedExclusion[];
  /** The independent variables in the selected model (absent for a weather-only choice). */
  variables?: string[];
  /** Every candidate variable's decision with its reasons (absent when none was offered). */
  variableDecisions?: VariableDecision[];
}

export function candidateDocument(candidate: Candidate): CandidateDocument {
  const fit = candidate.fit;
  return {
    model: candidate.model,
    verdict: candidate.verdict,
    accepted: candidate.accepted,
    reasons: candidate.reasons,
    parameters: fit ? { ...fit.parameters } : {},
    coefficients: fit ? fit.coefficients.map((c) => ({ ...c })) : [],
    changepoints: fit ? fit.changepointEstimates.map((c) => ({ ...c })) : [],
    segmentCounts: fit ? { ...fit.segmentCounts } : {},
    temperatureRange: fit ? { ...fit.temperatureRange } : null,
    sse: fit ? fit.sse : null,
    n: candidate.n,
    p: candidate.p,
    aicc: candidate.aicc,
    overFitted: candidate.overFitted,
    stats: fit ? { ...fit.stats } : null,
    guideline14: candidate.guideline14,
  };
}

export function fitDocument(
  choice: BaselineChoice,
  periodsUsed: number,
  excluded: readonly ExcludedPeriod[],
  minCoverage: number,
  exclusions: readonly AppliedExclusion[] = [],
): FitDocument {
  return {
    selected: choice.selected,
    temperatureForm: choice.settings.temperatureForm,
    candidates: choice.candidates.map(candidateDocument),
    periods: { used: periodsUsed, excluded: [...excluded] },
    settings: { ...choice.settings, minCoverage },
    ...(exclusions.length > 0 ? { exclusions: exclusions.map((e) => ({ ...e })) } : {}),
    ...(choice.variables !== undefined ? { variables: [...choice.variables] } : {}),
    ...(choice.variableDecisions !== undefined
      ? { variableDecisions: choice.variableDecisions.map((d) => ({ ...d, reasons: [...d.reasons] })) }
      : {}),
  };
}

export interface SavingsDocument extends SavingsResult {
  baseline: {
    selected: ModelName;
    temperatureForm: TemperatureForm;
    reportingMonths: number;
    guideline14: Candidate['guideline14'];
  };
  excluded: { baseline: ExcludedPeriod[]; reporting: ExcludedPeriod[] };
}
