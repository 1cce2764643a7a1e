/**
 * One moving hinge beside any number of fixed columns: the sweep of
 * hinge-sweep.ts for a model that also carries independent variables (or
 * day-type indicators), which the view holds as `extras`.
 *
 * The fixed columns F (the intercept, the extras and the caller's own, such
 * as the 4P's mean temperature or a 5P's other hinge) do not move with the
 * changepoint, so their Gram matrix is factored once (Cholesky, G_F = LLᵀ).
 * A reading's hinge is u + τ·v on each breakpoint interval; the sweep keeps
 * ⟨F, u⟩, ⟨F, v⟩, ⟨u, u⟩, ⟨u, v⟩, ⟨v, v⟩, ⟨u, y⟩, ⟨v, y⟩ current one day at a
 * time (O(|F|) per day) and, with F partialled out (⟨x̃, z̃⟩ = ⟨x, z⟩ −
 * (L⁻¹r_x)·(L⁻¹r_z)), the SSE on the interval is SST − (a + bτ)²/(A + 2Bτ + Cτ²),
 * minimised exactly at an end or its one stationary point (gram.ts). For a
 * fixed changepoint the model is linear in all its coefficients, so this is
 * the exact search of the weather-only model with the extra columns carried.
 */
import type { HingeOptimum } from '../gram.js';
import type { BillDays } from './bill-days.js';

/** Relative pivot below which a column counts as a combination of the others (as gram.ts). */
const PIVOT = 1e-9;

type Side = 'heating' | 'cooling';

/** A factored set of fixed columns: L (row-major f×f), the columns, and y projected on them. */
interface FixedBasis {
  f: number;
  /** Column c's value for reading b at columns[c][b]. */
  columns: readonly Float64Array[];
  l: Float64Array;
  zY: Float64Array;
  /** Σw·y² − |L⁻¹r_y|²: the SSE of the fixed columns alone. */
  sst: number;
}

/** The intercept and the view's extras, with their weighted inner products (the part every sweep shares). */
interface BaseColumns {
  columns: Float64Array[];
  /** Row-major Gram of `columns`. */
  gram: Float64Array;
  /** ⟨column, y⟩ per column. */
  rY: Float64Array;
}

/** Base columns per view: a 5P search sweeps once per breakpoint, all beside the same intercept and extras. */
const baseColumnsOf = new WeakMap<BillDays, BaseColumns>();

function weightedDot(w: Float64Array, a: Float64Array, b: Float64Array): number {
  let sum = 0;
  for (let i = 0; i < w.length; i++) sum += w[i]! * a[i]! * b[i]!;
  return sum;
}

function baseColumns(days: BillDays): BaseColumns {
  const cached = baseColumnsOf.get(days);
  if (cached) return cached;
  const { n, w, y } = days;
  const columns: Float64Array[] = [new Float64Array(n).fill(1), ...days.extras];
  const f = columns.length;
  const gram = new Float64Array(f * f);
  const rY = new Float64Array(f);
  for (let a = 0; a < f; a++) {
    for (let c = 0; c <= a; c++) gram[a * f + c] = gram[c * f + a] = weightedDot(w, columns[a]!, columns[c]!);
    rY[a] = weightedDot(w, columns[a]!, y);
  }
  const base = { columns, gram, rY };
  baseColumnsOf.set(days, base);
  return base;
}

/** Factor the intercept, the view's extras and `more` (null when they are collinear). */
export function factorBasis(days: BillDays, more: readonly Float64Array[]): FixedBasis | null {
  const { w, y } = days;
  const base = baseColumns(days);
  const columns = more.length === 0 ? base.columns : [...base.columns, ...more];
  const f0 = base.columns.length;
  const f = columns.length;
  // The base block's inner products are shared; only those of `more` are computed here.
  const gram = new Float64Array(f * f);
  const rY = new Float64Array(f);
  for (let a = 0; a < f; a++) {
    for (let c = 0; c <= a; c++)
      gram[a * f + c] = gram[c * f + a] = a < f0 ? base.gram[a * f0 + c]! : weightedDot(w, columns[a]!, columns[c]!);
    rY[a] = a < f0 ? base.rY[a]! : weightedDot(w, columns[a]!, y);
  }
  const l = new Float64Array(f * f);
  for (let a = 0; a < f; a++) {
    for (let c = 0; c <= a; c++) {
      let sum = gram[a * f + c]!;
      for (let e = 0; e < c; e++) sum -= l[a * f + e]! * l[c * f + e]!;
      if (a === c) {
        if (!(sum > PIVOT * gram[a * f + a]!)) return null;
        l[a * f + a] = Math.sqrt(sum);
      } else {
        l[a * f + c] = sum / l[c * f + c]!;
      }
    }
  }
  const zY = new Float64Array(f);
  forward(l, f, rY, zY);
  let explained = 0;
  for (let a = 0; a < f; a++) explained += zY[a]! * zY[a]!;
  return { f, columns, l, zY, sst: days.totalSquares - explained };
}

/** Solve L·z = r (forward substitution). */
function forward(l: Float64Array, f: number, r: Float64Array, z: Float64Array): void {
  for (let a = 0; a < f; a++) {
    let sum = r[a]!;
    for (let c = 0; c < a; c++) sum -= l[a * f + c]! * z[c]!;
    z[a] = sum / l[a * f + a]!;
  }
}

/**
 * The best position of one hinge beside the intercept, the view's extras and
 * `more`, over every breakpoint interval j with `allowed[j]` (ends and the
 * stationary point; the same semantics as sweepHinge). `onPoint` sees every
 * point evaluated, in increasing τ.
 */
export function sweepHingeWithBasis(
  days: BillDays,
  side: Side,
  more: readonly Float64Array[],
  allowed: Uint8Array,
  onPoint?: (tau: number, sse: number) => void,
): HingeOptimum | null {
  const basis = factorBasis(days, more);
  if (!basis) return null;
  const { n, w, y, mean, breakpoints, dayStart, dayBill, dayShare, dayTempShare } = days;
  const { f, columns, l, zY, sst } = basis;
  // The sweep runs from the first interval whatever the mask, so every evaluated point has the same inner products
  // (to the last bit) whichever intervals are allowed; it stops after the last allowed one.
  let last = breakpoints.length - 2;
  while (last >= 0 && allowed[last] === 0) last--;
  const us = new Float64Array(n);
  const vs = new Float64Array(n);
  const rU = new Float64Array(f);
  const rV = new Float64Array(f);
  const zU = new Float64Array(f);
  const zV = new Float64Array(f);
  let guu = 0,
    guv = 0,
    gvv = 0,
    guy = 0,
    gvy = 0;
  for (let b = 0; b < n; b++) {
    const u = side === 'heating' ? 0 : mean[b]!;
    const v = side === 'heating' ? 0 : -1;
    us[b] = u;
    vs[b] = v;
    const wb = w[b]!;
    for (let c = 0; c < f; c++) {
      const value = columns[c]![b]!;
      rU[c]! += wb * value * u;
      rV[c]! += wb * value * v;
    }
    guu += wb * u * u;
    guv += wb * u * v;
    gvv += wb * v * v;
    guy += wb * u * y[b]!;
    gvy += wb * v * y[b]!;
  }

  let found = false;
  const best: HingeOptimum = { tau: Number.NaN, sse: Number.POSITIVE_INFINITY };
  for (let j = 0; j <= last; j++) {
    for (let d = dayStart[j]!; d < dayStart[j + 1]!; d++) {
      const b = dayBill[d]!;
      const uOld = us[b]!;
      const vOld = vs[b]!;
      const uNew = uOld - dayTempShare[d]!;
      const vNew = vOld + dayShare[d]!;
      us[b] = uNew;
      vs[b] = vNew;
      const wb = w[b]!;
      const du = wb * (uNew - uOld);
      const dv = wb * (vNew - vOld);
      for (let c = 0; c < f; c++) {
        const value = columns[c]![b]!;
        rU[c]! += value * du;
        rV[c]! += value * dv;
      }
      guu += wb * (uNew * uNew - uOld * uOld);
      guv += wb * (uNew * vNew - uOld * vOld);
      gvv += wb * (vNew * vNew - vOld * vOld);
      guy += y[b]! * du;
      gvy += y[b]! * dv;
    }
    if (allowed[j] === 0) continue;
    forward(l, f, rU, zU);
    forward(l, f, rV, zV);
    let a = guy,
      bb = gvy,
      A = guu,
      B = guv,
      C = gvv;
    for (let c = 0; c < f; c++) {
      a -= zU[c]! * zY[c]!;
      bb -= zV[c]! * zY[c]!;
      A -= zU[c]! * zU[c]!;
      B -= zU[c]! * zV[c]!;
      C -= zV[c]! * zV[c]!;
    }
    const low = breakpoints[j]!;
    const high = breakpoints[j + 1]!;
    const slopeDenominator = bb * B - a * C;
    const stationary = slopeDenominator !== 0 ? (a * B - bb * A) / slopeDenominator : Number.NaN;
    const inside = stationary > low && stationary < high;
    for (let c = 0; c < 3; c++) {
      if ((c === 1 && !inside) || (c === 2 && high === low)) continue;
      const tau = c === 0 ? low : c === 1 ? stationary : high;
      const denominator = A + 2 * B * tau + C * tau * tau;
      const raw = guu + 2 * tau * guv + tau * tau * gvv;
      if (!(denominator > PIVOT * raw)) continue;
      const numerator = a + bb * tau;
      const sse = Math.max(0, sst - (numerator * numerator) / denominator);
      if (onPoint) onPoint(tau, sse);
      if (sse < best.sse) {
        best.tau = tau;
        best.sse = sse;
        found = true;
      }
    }
  }
  return found ? best : null;
}
