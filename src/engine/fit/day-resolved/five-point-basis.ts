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
import { enough, type BillDays } from './bill-days.js';
import { hingeColumn, sweepHinge } from './hinge-sweep.js';
import { movingHingeMask, type FivePointOptimum } from './five-point.js';

/**
 * Exact 5P changepoints (centred) of a view that carries extra columns, or
 * null when no placement is allowed. `pruneEdges: false` sweeps every edge
 * the segment rule admits (the tests' reference for the pruning).
 */
export function searchFivePointWithBasis(
  days: BillDays,
  k: number,
  { pruneEdges = true }: { pruneEdges?: boolean } = {},
): FivePointOptimum | null {
  const { breakpoints, weightAtOrBelow, weightAtOrAbove } = days;
  const count = breakpoints.length;
  let best: FivePointOptimum | null = null;
  const offer = (heating: number, cooling: number, sse: number): void => {
    if (Number.isFinite(sse) && (best === null || sse < best.sse)) best = { heating, cooling, sse };
  };
  // Interiors first. Each rectangle's free fit, held to one of its edges (a changepoint on that breakpoint), is a
  // lower bound for every placement on that edge, so an edge is swept only where that bound could still beat the
  // best placement found (with a margin for rounding). Lines no rectangle bounds are swept (bound −∞).
  const heatingLines = new Float64Array(count * count).fill(Number.NEGATIVE_INFINITY);
  const coolingLines = new Float64Array(count * count).fill(Number.NEGATIVE_INFINITY);
  interiors(days, k, offer, heatingLines, coolingLines);
  // The SSE an edge's bound must stay under to be swept.
  const limit = (): number =>
    best === null ? Number.POSITIVE_INFINITY : best.sse + EDGE_MARGIN * Math.abs(best.sse) + Number.MIN_VALUE;
  /** Clear the mask where the line's bound cannot beat the limit; false when nothing is left to sweep. */
  const prune = (mask: Uint8Array, bounds: Float64Array, row: number, under: number): boolean => {
    if (!pruneEdges) return mask.includes(1);
    let any = false;
    for (let c = 0; c < count; c++) {
      if (mask[c] === 1 && !(bounds[row + c]! < under)) mask[c] = 0;
      if (mask[c] === 1) any = true;
    }
    return any;
  };
  const anyUnder = (bounds: Float64Array, row: number, under: number): boolean => {
    if (!pruneEdges) return true;
    for (let c = 0; c < count; c++) if (bounds[row + c]! < under) return true;
    return false;
  };
  // Edges: heating on a breakpoint, cooling anywhere its segment rule allows; then the other way round.
  for (let i = 0; i < count; i++) {
    const under = limit();
    if (!enough(weightAtOrBelow[i]!, k) || !anyUnder(heatingLines, i * count, under)) continue;
    const heating = breakpoints[i]!;
    const mask = movingHingeMask(days, 'cooling', heating, heating, k);
    if (!prune(mask, heatingLines, i * count, under)) continue;
    const moved = sweepHinge(days, 'cooling', hingeColumn(days, 'heating', heating), mask);
    if (moved) offer(heating, moved.tau, moved.sse);
  }
  for (let j = 0; j < count; j++) {
    const under = limit();
    if (!enough(weightAtOrAbove[j]!, k) || !anyUnder(coolingLines, j * count, under)) continue;
    const cooling = breakpoints[j]!;
    const mask = movingHingeMask(days, 'heating', cooling, cooling, k);
    if (!prune(mask, coolingLines, j * count, under)) continue;
    const moved = sweepHinge(days, 'heating', hingeColumn(days, 'cooling', cooling), mask);
    if (moved) offer(moved.tau, cooling, moved.sse);
  }
  return best;
}

/** Relative pivot below which a column counts as a combination of the others (as gram.ts). */
const PIVOT = 1e-9;

/** An edge is still swept when its bound is within this share of the best SSE (rounding in the bound). */
const EDGE_MARGIN = 1e-9;

/**
 * Every open rectangle the segment rule admits: the free fit, taken when its
 * implied changepoints fall inside; its SSE is kept in `bound` either way.
 *
 * The free fit is a Cholesky factorisation of the Gram matrix of
 * [F…, s, S, Q, r | y] (F the intercept and the extras). Only the last rows
 * change from rectangle to rectangle, so the factor is built in parts: the F
 * block once; each reading's w·F column solved against it once (g below), so
 * a column's F part L_F⁻¹⟨F, x⟩ = Σ x_b·g_b is kept current day by day like
 * any inner product; the s and S rows once per row of rectangles; and per
 * rectangle only the Q, r and y rows and the four coefficients the implied
 * changepoints need. The same factorisation gram.ts performs, in that order.
 */
function interiors(
  days: BillDays,
  k: number,
  offer: (heating: number, cooling: number, sse: number) => void,
  heatingLines: Float64Array,
  coolingLines: Float64Array,
): void {
  const { n, w, y, mean, breakpoints, dayStart, dayBill, dayShare, dayTempShare, weightAtOrBelow, weightAtOrAbove } =
    days;
  const count = breakpoints.length;
  const fixed: Float64Array[] = [new Float64Array(n).fill(1), ...days.extras];
  const f = fixed.length;
  // The F block, factored once: L_F (row-major f×f).
  const lF = new Float64Array(f * f);
  for (let a = 0; a < f; a++) {
    for (let c = 0; c <= a; c++) {
      let gram = 0;
      for (let b = 0; b < n; b++) gram += w[b]! * fixed[a]![b]! * fixed[c]![b]!;
      let sum = gram;
      for (let e = 0; e < c; e++) sum -= lF[a * f + e]! * lF[c * f + e]!;
      if (a === c) {
        if (!(sum > PIVOT * gram)) return; // the extras are collinear with the intercept: no free fit anywhere
        lF[a * f + a] = Math.sqrt(sum);
      } else {
        lF[a * f + c] = sum / lF[c * f + c]!;
      }
    }
  }
  // g_b = L_F⁻¹ (w_b·F_b), reading by reading (row-major n×f).
  const g = new Float64Array(n * f);
  for (let b = 0; b < n; b++) {
    for (let a = 0; a < f; a++) {
      let sum = w[b]! * fixed[a]![b]!;
      for (let c = 0; c < a; c++) sum -= lF[a * f + c]! * g[b * f + c]!;
      g[b * f + a] = sum / lF[a * f + a]!;
    }
  }
  // y's F part and what F explains of it.
  const zYF = new Float64Array(f);
  for (let b = 0; b < n; b++) for (let a = 0; a < f; a++) zYF[a]! += y[b]! * g[b * f + a]!;
  let explainedF = 0;
  for (let a = 0; a < f; a++) explainedF += zYF[a]! * zYF[a]!;
  const gyy = days.totalSquares;

  const sI = new Float64Array(n);
  const SI = new Float64Array(n);
  const q = new Float64Array(n);
  const r = new Float64Array(n);
  // F parts of the four columns: L_F⁻¹⟨F, s⟩, … (kept current like the inner products).
  const lsF = new Float64Array(f);
  const lSF = new Float64Array(f);
  const lqF = new Float64Array(f);
  const lrF = new Float64Array(f);
  for (let i = 0; i + 2 < count; i++) {
    for (let d = dayStart[i]!; d < dayStart[i + 1]!; d++) {
      const b = dayBill[d]!;
      sI[b] = sI[b]! + dayShare[d]!;
      SI[b] = SI[b]! + dayTempShare[d]!;
    }
    if (!enough(weightAtOrBelow[i]!, k)) continue;
    // The heating columns s, S of this row and the cooling columns at its start (Q = mean − S, r = 1 − s).
    lsF.fill(0);
    lSF.fill(0);
    lqF.fill(0);
    lrF.fill(0);
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
        const value = g[b * f + c]!;
        lsF[c]! += value * s;
        lSF[c]! += value * S;
        lqF[c]! += value * qb;
        lrF[c]! += value * rb;
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
    // The s and S rows of the factor, and y's entries there: fixed along the row.
    let sumSs = gss,
      sumSS = gSS,
      crossSS = gsS,
      zs = gsy,
      zS = gSy;
    for (let c = 0; c < f; c++) {
      sumSs -= lsF[c]! * lsF[c]!;
      crossSS -= lSF[c]! * lsF[c]!;
      zs -= lsF[c]! * zYF[c]!;
    }
    if (!(sumSs > PIVOT * gss)) continue;
    const lss = Math.sqrt(sumSs);
    const lSs = crossSS / lss;
    for (let c = 0; c < f; c++) sumSS -= lSF[c]! * lSF[c]!;
    sumSS -= lSs * lSs;
    if (!(sumSS > PIVOT * gSS)) continue;
    const lSS = Math.sqrt(sumSS);
    zs /= lss;
    for (let c = 0; c < f; c++) zS -= lSF[c]! * zYF[c]!;
    zS = (zS - lSs * zs) / lSS;
    const explainedRow = explainedF + zs * zs + zS * zS;

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
          const value = g[b * f + c]!;
          lqF[c]! += value * dq;
          lrF[c]! += value * dr;
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
      // The Q row.
      let qs = gsq,
        qS = gSq,
        qq = gqq,
        qy = gqy;
      let rs = gsr,
        rS = gSr,
        rq = gqr,
        rr = grr,
        ry = gry;
      for (let c = 0; c < f; c++) {
        const lq = lqF[c]!;
        const lr = lrF[c]!;
        qs -= lq * lsF[c]!;
        qS -= lq * lSF[c]!;
        qq -= lq * lq;
        qy -= lq * zYF[c]!;
        rs -= lr * lsF[c]!;
        rS -= lr * lSF[c]!;
        rq -= lr * lq;
        rr -= lr * lr;
        ry -= lr * zYF[c]!;
      }
      const lQs = qs / lss;
      const lQS = (qS - lQs * lSs) / lSS;
      qq -= lQs * lQs + lQS * lQS;
      if (!(qq > PIVOT * gqq)) continue;
      const lQQ = Math.sqrt(qq);
      const lrs = rs / lss;
      const lrS = (rS - lrs * lSs) / lSS;
      const lrQ = (rq - lrs * lQs - lrS * lQS) / lQQ;
      rr -= lrs * lrs + lrS * lrS + lrQ * lrQ;
      if (!(rr > PIVOT * grr)) continue;
      const lrr = Math.sqrt(rr);
      const zQ = (qy - lQs * zs - lQS * zS) / lQQ;
      const zr = (ry - lrs * zs - lrS * zS - lrQ * zQ) / lrr;
      const sse = Math.max(0, gyy - (explainedRow + zQ * zQ + zr * zr));
      // The four hinge coefficients (back substitution from the last row; F's are not needed).
      const cr = zr / lrr;
      const cq = (zQ - lrQ * cr) / lQQ;
      const cS = (zS - lQS * cq - lrS * cr) / lSS;
      const cs = (zs - lSs * cS - lQs * cq - lrs * cr) / lss;
      // Edge bounds: the free fit with the constraint a·β = 0 that puts a changepoint on a breakpoint (heating on
      // τ: c_s + τ·c_S = 0; cooling on τ: c_r + τ·c_Q = 0) has SSE sse + (a·β)² / |L⁻¹a|².
      // Heating on τ (rows s, S): L⁻¹a for a = e_s + τ·e_S; its s part is 1/l_ss for both ends.
      const xs = 1 / lss;
      for (let end = 0; end < 2; end++) {
        const tau = end === 0 ? heatLow : heatHigh;
        const xS = (tau - lSs * xs) / lSS;
        const xQ = -(lQs * xs + lQS * xS) / lQQ;
        const xr = -(lrs * xs + lrS * xS + lrQ * xQ) / lrr;
        const constraint = cs + tau * cS;
        const edge = sse + (constraint * constraint) / (xs * xs + xS * xS + xQ * xQ + xr * xr);
        const at = (i + end) * count + j;
        if (edge > heatingLines[at]!) heatingLines[at] = edge;
      }
      // Cooling on τ (rows Q, r): L⁻¹a for a = τ·e_Q + e_r.
      for (let end = 0; end < 2; end++) {
        const tau = breakpoints[j + end]!;
        const xQ = tau / lQQ;
        const xr = (1 - lrQ * xQ) / lrr;
        const constraint = cr + tau * cq;
        const edge = sse + (constraint * constraint) / (xQ * xQ + xr * xr);
        const at = (j + end) * count + i;
        if (edge > coolingLines[at]!) coolingLines[at] = edge;
      }
      const heating = -cs / cS;
      const cooling = -cr / cq;
      if (heating > heatLow && heating < heatHigh && cooling > breakpoints[j]! && cooling < breakpoints[j + 1]!)
        offer(heating, cooling, sse);
    }
  }
}
