/**
 * Goodness-of-fit statistics of a baseline model, by the ASHRAE Guideline 14
 * definitions. Residuals are in energy per period: eᵢ = quantityᵢ − daysᵢ·ŷᵢ.
 */
export interface GoodnessOfFit {
  /** R² of the weighted per-day fit: 1 − SSE_w / SST_w. */
  r2: number;
  /** R² adjusted for p parameters: 1 − (1 − R²)(n − 1)/(n − p). */
  adjustedR2: number;
  /** sqrt(Σe²/(n − p)), in the meter's unit per period. */
  rmse: number;
  /** RMSE / Ē with Ē the mean period quantity (a fraction). */
  cvrmse: number;
  /** Σe / ((n − p)·Ē) (a fraction). */
  nmbe: number;
}

export interface FitObservations {
  /** Period quantities, in time order. */
  quantity: readonly number[];
  days: readonly number[];
  /** Fitted use per day ŷ for each period. */
  fittedPerDay: readonly number[];
  /** Parameter count p, changepoints included. */
  p: number;
}

/**
 * Energy residuals eᵢ = quantityᵢ − daysᵢ·ŷᵢ, in the order given.
 * @example energyResiduals({ quantity: [10, 20], days: [1, 2], fittedPerDay: [9, 11], p: 1 }) // [1, -2] — 10 − 1·9 and 20 − 2·11 (source: by hand)
 */
export function energyResiduals(obs: FitObservations): number[] {
  return obs.quantity.map((q, i) => q - obs.days[i]! * obs.fittedPerDay[i]!);
}

/**
 * @example goodnessOfFit({ quantity: [2, 4, 6], days: [1, 1, 1], fittedPerDay: [4, 4, 4], p: 1 }).cvrmse // 0.5 — √((4 + 0 + 4)/(3 − 1))/4 (source: ASHRAE Guideline 14 definition of CV(RMSE), from memory)
 */
export function goodnessOfFit(obs: FitObservations): GoodnessOfFit {
  const n = obs.quantity.length;
  const residuals = energyResiduals(obs);
  let totalDays = 0;
  let totalUse = 0;
  for (let i = 0; i < n; i++) {
    totalDays += obs.days[i]!;
    totalUse += obs.quantity[i]!;
  }
  const meanPerDay = totalUse / totalDays;
  let sseWeighted = 0;
  let sstWeighted = 0;
  let sumSquares = 0;
  let sum = 0;
  for (let i = 0; i < n; i++) {
    const d = obs.days[i]!;
    const perDay = obs.quantity[i]! / d;
    sseWeighted += d * (perDay - obs.fittedPerDay[i]!) ** 2;
    sstWeighted += d * (perDay - meanPerDay) ** 2;
    sumSquares += residuals[i]! ** 2;
    sum += residuals[i]!;
  }
  const dof = n - obs.p;
  const meanQuantity = totalUse / n;
  const r2 = sstWeighted > 0 ? 1 - sseWeighted / sstWeighted : Number.NaN;
  const rmse = dof > 0 ? Math.sqrt(sumSquares / dof) : Number.NaN;
  return {
    r2,
    adjustedR2: dof > 0 ? 1 - ((1 - r2) * (n - 1)) / dof : Number.NaN,
    rmse,
    cvrmse: rmse / meanQuantity,
    nmbe: dof > 0 ? sum / (dof * meanQuantity) : Number.NaN,
  };
}
