/**
 * The 5P with extra fixed columns (independent variables, day-type
 * indicators): exact over every pair of breakpoint intervals, as in
 * five-point.ts, without its pruning.
 *
 * On the closed rectangle of heating interval i and cooling interval j the
 * minimum lies either inside, where the model b0 + bh·(τh·s − S) +
 * bq·(Q − τc·r) + Σβk·zk is the free fit on {1, z…, s, S, Q, r} with its
 * implied τh = −coef_s/coef_S and τc = −coef_r/coef_Q inside both intervals
 * (Hudson's argument: at an interior stationary point with bh, bq ≠ 0 the
 * residuals are orthogonal to every column of that fit), or on an edge,
 * where one changepoint sits on a breakpoint and the other is a one-hinge
 * problem. The edges are searched as one sweep per breakpoint (heating fixed
 * there, cooling moving; then the other way round), the interiors pair by
 * pair with the cross inner products kept current day by day along a row.
 * Cost O(B·D·f + B²·m³) for B breakpoints, D days, f fixed and m = f + 4
 * fitted columns: small for bills in the mean form (B ≤ n) and for daily
 * readings, larger for bills in the day-resolved form.
 */
import { gramLeastSquares } from '../gram.js';
import { enough, type BillDays } from './bill-days.js';
import { hingeColumn, sweepHinge } from './hinge-sweep.js';
import { movingHingeMask, type FivePointOptimum } from './five-point.js';

/** Exact 5P changepoints (centred) of a view that carries extra columns, or null when no placement is allowed. */
export function searchFivePointWithBasis(days: BillDays, k: number): FivePointOptimum | null {
  const { breakpoints, weightAtOrBelow, weightAtOrAbove } = days;
  const count = breakpoints.length;
  let best: FivePointOptimum | null = null;
  const offer = (heating: number, cooling: number, sse: number): void => {
    if (Number.isFinite(sse) && (best === null || sse < best.sse)) best = { heating, cooling, sse };
  };
  // Edges: heating on a breakpoint, cooling anywhere its segment rule allows; then the other way round.
  for (let i = 0; i < count; i++) {
    if (!enough(weightAtOrBelow[i]!, k)) continue;
    const heating = breakpoints[i]!;
    const mask = movingHingeMask(days, 'cooling', heating, heating, k);
    if (!mask.includes(1)) continue;
    const moved = sweepHinge(days, 'cooling', hingeColumn(days, 'heating', heating), mask);
    if (moved) offer(heating, moved.tau, moved.sse);
  }
  for (let j = 0; j < count; j++) {
    if (!enough(weightAtOrAbove[j]!, k)) continue;
    const cooling = breakpoints[j]!;
    const mask = movingHingeMask(days, 'heating', cooling, cooling, k);
    if (!mask.includes(1)) continue;
    const moved = sweepHinge(days, 'heating', hingeColumn(days, 'cooling', cooling), mask);
    if (moved) offer(moved.tau, cooling, moved.sse);
  }
  interiors(days, k, offer);
  return best;
}

/** Every open rectangle the segment rule admits: the free fit, taken when its implied changepoints fall inside. */
function interiors(days: BillDays, k: number, offer: (heating: number, cooling: number, sse: number) => void): void {
  const { n, w, y, mean, breakpoints, dayStart, dayBill, dayShare, dayTempShare, weightAtOrBelow, weightAtOrAbove } =
    days;
  const count = breakpoints.length;
  const fixed: Float64Array[] = [new Float64Array(n).fill(1), ...days.extras];
  const f = fixed.length;
  // Columns [F…, s, S, Q, r, y]: indices f, f+1, f+2, f+3, f+4.
  const m = f + 5;
  const iS = f,
    iSS = f + 1,
    iQ = f + 2,
    iR = f + 3,
    iY = f + 4;
  const gram = new Float64Array(m * m);
  const coefficients = new Float64Array(m - 1);
  const set = (a: number, c: number, value: number): void => {
    gram[a * m + c] = value;
    gram[c * m + a] = value;
  };
  // The fixed block and y.
  for (let a = 0; a < f; a++) {
    for (let c = 0; c <= a; c++) {
      let sum = 0;
      for (let b = 0; b < n; b++) sum += w[b]! * fixed[a]![b]! * fixed[c]![b]!;
      set(a, c, sum);
    }
    let sum = 0;
    for (let b = 0; b < n; b++) sum += w[b]! * fixed[a]![b]! * y[b]!;
    set(a, iY, sum);
  }
  set(iY, iY, days.totalSquares);

  const sI = new Float64Array(n);
  const SI = new Float64Array(n);
  const q = new Float64Array(n);
  const r = new Float64Array(n);
  for (let i = 0; i + 2 < count; i++) {
    for (let d = dayStart[i]!; d < dayStart[i + 1]!; d++) {
      const b = dayBill[d]!;
      sI[b] = sI[b]! + dayShare[d]!;
      SI[b] = SI[b]! + dayTempShare[d]!;
    }
    if (!enough(weightAtOrBelow[i]!, k)) continue;
    // The heating columns s, S of this row and the cooling columns at its start (Q = mean − S, r = 1 − s).
    const rowF = new Float64Array(4 * f);
    let gss = 0,
      gsS = 0,
      gSS = 0,
      gsy = 0,
      gSy = 0,
      gqq = 0,
      gqr = 0,
      grr = 0,
      gqy = 0,
      gry = 0,
      gsq = 0,
      gsr = 0,
      gSq = 0,
      gSr = 0;
    for (let b = 0; b < n; b++) {
      q[b] = mean[b]! - SI[b]!;
      r[b] = 1 - sI[b]!;
      const wb = w[b]!;
      const s = sI[b]!,
        S = SI[b]!,
        qb = q[b]!,
        rb = r[b]!;
      for (let c = 0; c < f; c++) {
        const value = wb * fixed[c]![b]!;
        rowF[c]! += value * s;
        rowF[f + c]! += value * S;
        rowF[2 * f + c]! += value * qb;
        rowF[3 * f + c]! += value * rb;
      }
      gss += wb * s * s;
      gsS += wb * s * S;
      gSS += wb * S * S;
      gsy += wb * s * y[b]!;
      gSy += wb * S * y[b]!;
      gqq += wb * qb * qb;
      gqr += wb * qb * rb;
      grr += wb * rb * rb;
      gqy += wb * qb * y[b]!;
      gry += wb * rb * y[b]!;
      gsq += wb * s * qb;
      gsr += wb * s * rb;
      gSq += wb * S * qb;
      gSr += wb * S * rb;
    }
    for (let c = 0; c < f; c++) {
      set(c, iS, rowF[c]!);
      set(c, iSS, rowF[f + c]!);
    }
    set(iS, iS, gss);
    set(iS, iSS, gsS);
    set(iSS, iSS, gSS);
    set(iS, iY, gsy);
    set(iSS, iY, gSy);
    const heatLow = breakpoints[i]!;
    const heatHigh = breakpoints[i + 1]!;
    for (let j = i + 1; j + 1 < count; j++) {
      for (let d = dayStart[j]!; d < dayStart[j + 1]!; d++) {
        const b = dayBill[d]!;
        const wb = w[b]!;
        const dq = -dayTempShare[d]!;
        const dr = -dayShare[d]!;
        const qOld = q[b]!,
          rOld = r[b]!;
        const qNew = qOld + dq,
          rNew = rOld + dr;
        q[b] = qNew;
        r[b] = rNew;
        for (let c = 0; c < f; c++) {
          const value = wb * fixed[c]![b]!;
          rowF[2 * f + c]! += value * dq;
          rowF[3 * f + c]! += value * dr;
        }
        gqq += wb * (qNew * qNew - qOld * qOld);
        gqr += wb * (qNew * rNew - qOld * rOld);
        grr += wb * (rNew * rNew - rOld * rOld);
        gqy += wb * y[b]! * dq;
        gry += wb * y[b]! * dr;
        gsq += wb * sI[b]! * dq;
        gsr += wb * sI[b]! * dr;
        gSq += wb * SI[b]! * dq;
        gSr += wb * SI[b]! * dr;
      }
      if (!enough(weightAtOrAbove[j + 1]!, k) || !enough(weightAtOrBelow[j]! - weightAtOrBelow[i]!, k)) continue;
      for (let c = 0; c < f; c++) {
        set(c, iQ, rowF[2 * f + c]!);
        set(c, iR, rowF[3 * f + c]!);
      }
      set(iQ, iQ, gqq);
      set(iQ, iR, gqr);
      set(iR, iR, grr);
      set(iQ, iY, gqy);
      set(iR, iY, gry);
      set(iS, iQ, gsq);
      set(iS, iR, gsr);
      set(iSS, iQ, gSq);
      set(iSS, iR, gSr);
      const sse = gramLeastSquares(gram, m, coefficients);
      if (sse === null) continue;
      const heating = -coefficients[iS]! / coefficients[iSS]!;
      const cooling = -coefficients[iR]! / coefficients[iQ]!;
      if (heating > heatLow && heating < heatHigh && cooling > breakpoints[j]! && cooling < breakpoints[j + 1]!)
        offer(heating, cooling, sse);
    }
  }
}
