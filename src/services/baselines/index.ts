/**
 * Baselines: the engine fits a meter's baseline window and the result is
 * kept as a draft; an engineer may choose another fitted shape; freezing
 * seals it under a content hash, so savings always project with exactly the
 * model that was agreed. A frozen baseline is never changed again: a new
 * version supersedes it and the history keeps both.
 */
export type {
  Baseline,
  BaselineFitOptions,
  BaselineInputs,
  BaselineOverrides,
  BaselineSummary,
  FreezeInput,
} from './types.js';
export { overridesOf, storedBaselinePeriods, toBaselineSummary } from './views.js';
export { getBaseline, getBaselineRow, listBaselines } from './reads.js';
export { createBaseline } from './create.js';
export { chooseModel } from './choose.js';
export { freezeBaseline } from './freeze.js';
export { baselineSignatureData } from './signature.js';
export { baselinePoints, type BaselinePoints, type CandidatePoints } from './points.js';
export { getNewestBaseline, newestBaselinePoints } from './newest.js';
