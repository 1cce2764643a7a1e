/**
 * The 5P of the day-resolved form: two changepoints, searched exactly over
 * pairs of breakpoint intervals.
 *
 * On a pair (heating interval, cooling interval) the model
 * b0 + bh·(τh·s − S) + bq·(Q − τc·r) is linear in (b0, bh·τh, bh, bq, bq·τc),
 * so the free five-column fit on {1, s, S, Q, r} bounds the pair from below
 * and is its exact optimum when its implied τh and τc fall inside the
 * intervals (Hudson's argument, carried over); otherwise the optimum lies on
 * an edge, where one changepoint is fixed and the other is a one-hinge
 * problem (gram.ts). Pairs are visited from a coordinate-descent incumbent
 * and skipped when a lower bound cannot beat it.
 */
import { searchChangepoints } from '../changepoint-search.js';
import { buildSortedSums } from '../sorted-sums.js';
import { bestHingeOnInterval, type HingeOptimum } from '../gram.js';
import {
  enough,
  weightAtOrAboveTemperature,
  weightAtOrBelowTemperature,
  weightBetween,
  type BillDays,
} from './bill-days.js';
import { bothSidesFeasible, fixedColumnsSse, hingeColumn, sweepHinge, type Side } from './hinge-sweep.js';

/** Relative slack when comparing a lower bound with the incumbent: rounding must never prune the optimum. */
const BOUND_SLACK = 1e-10;

/** Relative pivot below which a column counts as a combination of the others. */
const PIVOT = 1e-9;

/** Rounds of coordinate descent for the starting incumbent (it only has to be good, not optimal). */
const DESCENT_ROUNDS = 2;

export interface FivePointOptimum {
  heating: number;
  cooling: number;
  sse: number;
}

/** SSE of the 5P with both changepoints fixed (centred units). */
export function fixedFivePointSse(days: BillDays, heating: number, cooling: number): number {
  return fixedColumnsSse(days, [hingeColumn(days, 'heating', heating), hingeColumn(days, 'cooling', cooling)]);
}

/** Is the 5P with these (centred) changepoints allowed by the segment rule? */
function fivePointFeasible(days: BillDays, heating: number, cooling: number, k: number): boolean {
  return (
    heating <= cooling &&
    enough(weightAtOrBelowTemperature(days, heating), k) &&
    enough(weightBetween(days, heating, cooling), k) &&
    enough(weightAtOrAboveTemperature(days, cooling), k)
  );
}

/**
 * A good feasible 5P to start from: from the one-changepoint optima and from
 * the mean-form 5P, alternate exact one-hinge sweeps (heating with cooling
 * fixed, then cooling with heating fixed) for a few rounds. Only the pruning
 * depends on it; the pair search below finds the optimum from any start.
 */
function coordinateDescent(days: BillDays, k: number): FivePointOptimum | null {
  const starts: [number, number][] = [];
  const allowed = bothSidesFeasible(days, k);
  const heatingOnly = sweepHinge(days, 'heating', null, allowed);
  const coolingOnly = sweepHinge(days, 'cooling', null, allowed);
  if (heatingOnly && coolingOnly && heatingOnly.tau <= coolingOnly.tau) starts.push([heatingOnly.tau, coolingOnly.tau]);
  const meanForm = searchChangepoints(
    buildSortedSums(Array.from(days.mean), Array.from(days.y), Array.from(days.w)),
    '5P',
    k,
  );
  if (meanForm) starts.push([meanForm.heatingChangepoint!, meanForm.coolingChangepoint!]);
  let start: FivePointOptimum | null = null;
  for (const [heating, cooling] of starts) {
    const sse = fivePointFeasible(days, heating, cooling, k)
      ? fixedFivePointSse(days, heating, cooling)
      : Number.POSITIVE_INFINITY;
    if (start === null || sse < start.sse) start = { heating, cooling, sse };
  }
  if (start === null) return null;
  let { heating, cooling, sse } = start;
  for (let round = 0; round < DESCENT_ROUNDS; round++) {
    const movedHeating = moveOneHinge(days, 'heating', heating, cooling, k);
    if (movedHeating && movedHeating.sse < sse) ({ tau: heating, sse } = movedHeating);
    const movedCooling = moveOneHinge(days, 'cooling', heating, cooling, k);
    if (movedCooling && movedCooling.sse < sse) ({ tau: cooling, sse } = movedCooling);
  }
  return Number.isFinite(sse) ? { heating, cooling, sse } : null;
}

/**
 * The intervals where one changepoint of a 5P may sit while the other is
 * held at `heating` or `cooling` (centred): the moving one on its side of the
 * fixed one, and every segment keeping k readings.
 */
export function movingHingeMask(days: BillDays, side: Side, heating: number, cooling: number, k: number): Uint8Array {
  const { n, weightAtOrBelow, weightAtOrAbove, breakpoints } = days;
  const allowed = new Uint8Array(breakpoints.length);
  if (side === 'heating') {
    const atOrBelowCooling = weightAtOrBelowTemperature(days, cooling);
    const coolWeight = weightAtOrAboveTemperature(days, cooling);
    for (let j = 0; j + 1 < breakpoints.length; j++) {
      const flat = atOrBelowCooling - (n - weightAtOrAbove[j + 1]!);
      allowed[j] =
        breakpoints[j + 1]! <= cooling && enough(weightAtOrBelow[j]!, k) && enough(flat, k) && enough(coolWeight, k)
          ? 1
          : 0;
    }
  } else {
    const heatWeight = weightAtOrBelowTemperature(days, heating);
    const belowHeating = n - weightAtOrAboveTemperature(days, heating);
    for (let j = 0; j + 1 < breakpoints.length; j++) {
      const flat = weightAtOrBelow[j]! - belowHeating;
      allowed[j] =
        breakpoints[j]! >= heating && enough(weightAtOrAbove[j + 1]!, k) && enough(flat, k) && enough(heatWeight, k)
          ? 1
          : 0;
    }
  }
  return allowed;
}

/** The best position of one changepoint of a 5P with the other held where it is. */
export function moveOneHinge(
  days: BillDays,
  side: Side,
  heating: number,
  cooling: number,
  k: number,
): HingeOptimum | null {
  const allowed = movingHingeMask(days, side, heating, cooling, k);
  const fixed = side === 'heating' ? hingeColumn(days, 'cooling', cooling) : hingeColumn(days, 'heating', heating);
  return sweepHinge(days, side, fixed, allowed);
}

/** Sums over readings of the cooling columns Q and r, and with y, at every breakpoint interval. */
interface CoolingSums {
  q: Float64Array;
  r: Float64Array;
  qq: Float64Array;
  qr: Float64Array;
  rr: Float64Array;
  qy: Float64Array;
  ry: Float64Array;
}

function coolingSumsByInterval(days: BillDays): CoolingSums {
  const { n, w, y, mean, breakpoints, dayStart, dayBill, dayShare, dayTempShare } = days;
  const count = breakpoints.length;
  const sums: CoolingSums = {
    q: new Float64Array(count),
    r: new Float64Array(count),
    qq: new Float64Array(count),
    qr: new Float64Array(count),
    rr: new Float64Array(count),
    qy: new Float64Array(count),
    ry: new Float64Array(count),
  };
  const q = Float64Array.from(mean);
  const r = new Float64Array(n).fill(1);
  let sq = 0,
    sr = 0,
    sqq = 0,
    sqr = 0,
    srr = 0,
    sqy = 0,
    sry = 0;
  for (let b = 0; b < n; b++) {
    sq += w[b]! * q[b]!;
    sr += w[b]! * r[b]!;
    sqq += w[b]! * q[b]! * q[b]!;
    sqr += w[b]! * q[b]! * r[b]!;
    srr += w[b]! * r[b]! * r[b]!;
    sqy += w[b]! * q[b]! * y[b]!;
    sry += w[b]! * r[b]! * y[b]!;
  }
  for (let j = 0; j < count; j++) {
    for (let d = dayStart[j]!; d < dayStart[j + 1]!; d++) {
      const b = dayBill[d]!;
      const qNew = q[b]! - dayTempShare[d]!;
      const rNew = r[b]! - dayShare[d]!;
      const wb = w[b]!;
      sq += wb * (qNew - q[b]!);
      sr += wb * (rNew - r[b]!);
      sqq += wb * (qNew * qNew - q[b]! * q[b]!);
      sqr += wb * (qNew * rNew - q[b]! * r[b]!);
      srr += wb * (rNew * rNew - r[b]! * r[b]!);
      sqy += wb * y[b]! * (qNew - q[b]!);
      sry += wb * y[b]! * (rNew - r[b]!);
      q[b] = qNew;
      r[b] = rNew;
    }
    sums.q[j] = sq;
    sums.r[j] = sr;
    sums.qq[j] = sqq;
    sums.qr[j] = sqr;
    sums.rr[j] = srr;
    sums.qy[j] = sqy;
    sums.ry[j] = sry;
  }
  return sums;
}

/**
 * The Gram matrix of one pair of intervals over the basis [1, s, S, Q, r, y]
 * (its upper triangle, by name: c = constant, s, S, q = Q, r, y): the
 * five-column relaxation's data, and every edge problem's by linear
 * combination. Fields rather than a 6×6 array: a pair that needs its edges
 * sets each once, and the edges read the ones they combine.
 */
class PairGram {
  cc = 0;
  cs = 0;
  cS = 0;
  cq = 0;
  cr = 0;
  ss = 0;
  sS = 0;
  sq = 0;
  sr = 0;
  sy = 0;
  SS = 0;
  Sq = 0;
  Sr = 0;
  Sy = 0;
  qq = 0;
  qr = 0;
  qy = 0;
  rr = 0;
  ry = 0;
  yy = 0;
  /** The edge problem's Gram matrix, [1, fixed hinge, u, v, y]. */
  private readonly edge = new Float64Array(25);
  private readonly edgeResult: HingeOptimum = { tau: Number.NaN, sse: Number.POSITIVE_INFINITY };

  private setEdge(a: number, c: number, value: number): void {
    this.edge[a * 5 + c] = value;
    this.edge[c * 5 + a] = value;
  }

  /**
   * The edge τh = t: the heating hinge h = t·s − S is fixed and the cooling
   * hinge Q − τ·r moves over [low, high] (u = Q, v = −r).
   */
  heatingEdge(t: number, low: number, high: number): HingeOptimum | null {
    this.setEdge(0, 0, this.cc);
    this.setEdge(0, 1, t * this.cs - this.cS);
    this.setEdge(1, 1, t * t * this.ss - 2 * t * this.sS + this.SS);
    this.setEdge(0, 2, this.cq);
    this.setEdge(0, 3, -this.cr);
    this.setEdge(1, 2, t * this.sq - this.Sq);
    this.setEdge(1, 3, -(t * this.sr - this.Sr));
    this.setEdge(2, 2, this.qq);
    this.setEdge(2, 3, -this.qr);
    this.setEdge(3, 3, this.rr);
    this.setEdge(0, 4, 0); // Σw·y = 0: y is centred
    this.setEdge(1, 4, t * this.sy - this.Sy);
    this.setEdge(2, 4, this.qy);
    this.setEdge(3, 4, -this.ry);
    this.setEdge(4, 4, this.yy);
    return bestHingeOnInterval(this.edge, 2, low, high, this.edgeResult) ? this.edgeResult : null;
  }

  /** The edge τc = t: the cooling hinge Q − t·r is fixed and the heating hinge −S + τ·s moves over [low, high]. */
  coolingEdge(t: number, low: number, high: number): HingeOptimum | null {
    this.setEdge(0, 0, this.cc);
    this.setEdge(0, 1, this.cq - t * this.cr);
    this.setEdge(1, 1, this.qq - 2 * t * this.qr + t * t * this.rr);
    this.setEdge(0, 2, -this.cS);
    this.setEdge(0, 3, this.cs);
    this.setEdge(1, 2, -(this.Sq - t * this.Sr));
    this.setEdge(1, 3, this.sq - t * this.sr);
    this.setEdge(2, 2, this.SS);
    this.setEdge(2, 3, -this.sS);
    this.setEdge(3, 3, this.ss);
    this.setEdge(0, 4, 0);
    this.setEdge(1, 4, this.qy - t * this.ry);
    this.setEdge(2, 4, -this.Sy);
    this.setEdge(3, 4, this.sy);
    this.setEdge(4, 4, this.yy);
    return bestHingeOnInterval(this.edge, 2, low, high, this.edgeResult) ? this.edgeResult : null;
  }
}

/**
 * Lower bounds of a pair's four edges (heating low, heating high, cooling
 * low, cooling high), from its free five-column fit: an edge fixes one
 * changepoint, the linear constraint a·β = 0 on the fit's coefficients
 * (β₁ + τh·β₂ = 0, or τc·β₃ + β₄ = 0), and the least-squares fit under one
 * such constraint has SSE relaxed + (a·β)²/|L⁻¹a|² (L the Cholesky factor of
 * the pair's Gram matrix), which no point of the edge can beat.
 */
class EdgeBounds {
  readonly bound = new Float64Array(4);

  /**
   * L's heating block (l10, l20, l21 and reciprocal diagonals i11, i22),
   * the cooling rows' projections (zq1, zq2, zr1, zr2) and the Schur
   * complement [a11 a12; a12 a22] with determinant det.
   */
  set(
    relaxed: number,
    coefficients: Float64Array,
    l21: number,
    i11: number,
    i22: number,
    zq1: number,
    zq2: number,
    zr1: number,
    zr2: number,
    a11: number,
    a12: number,
    det: number,
    heat: readonly [number, number],
    cool: readonly [number, number],
  ): void {
    const m11 = Math.sqrt(a11);
    const m21 = a12 / m11;
    const m22 = Math.sqrt(det / a11);
    for (let e = 0; e < 2; e++) {
      // a = (0, 1, t, 0, 0): forward substitution through L.
      const t = heat[e]!;
      const z1 = i11;
      const z2 = (t - l21 * z1) * i22;
      const z3 = -(zq1 * z1 + zq2 * z2) / m11;
      const z4 = -(zr1 * z1 + zr2 * z2 + m21 * z3) / m22;
      const ab = coefficients[1]! + t * coefficients[2]!;
      this.bound[e] = relaxed + (ab * ab) / (z1 * z1 + z2 * z2 + z3 * z3 + z4 * z4);
    }
    for (let e = 0; e < 2; e++) {
      // a = (0, 0, 0, t, 1).
      const t = cool[e]!;
      const z3 = t / m11;
      const z4 = (1 - m21 * z3) / m22;
      const ab = t * coefficients[3]! + coefficients[4]!;
      this.bound[2 + e] = relaxed + (ab * ab) / (z3 * z3 + z4 * z4);
    }
  }

  /** Could some edge reach `limit`? */
  anyAtOrBelow(limit: number): boolean {
    const b = this.bound;
    return b[0]! <= limit || b[1]! <= limit || b[2]! <= limit || b[3]! <= limit;
  }
}

/** Do the free fit's implied changepoints fall inside the pair's intervals (then the free fit is the pair's optimum)? */
function relaxationInside(
  coefficients: Float64Array,
  heat: readonly [number, number],
  cool: readonly [number, number],
): boolean {
  const bh = -coefficients[2]!;
  const bq = coefficients[3]!;
  if (bh === 0 || bq === 0) return false;
  const heating = coefficients[1]! / bh;
  const cooling = -coefficients[4]! / bq;
  return heating >= heat[0] && heating <= heat[1] && cooling >= cool[0] && cooling <= cool[1];
}

/**
 * The exact optimum over one pair of intervals, given its Gram matrix and
 * its free five-column fit: that fit if its changepoints fall inside the
 * intervals, else the best of the four edges (a convex quadratic minimised
 * over a closed set that excludes its unconstrained minimum attains the
 * minimum on the set's boundary). With `bounds`, an edge whose lower bound
 * cannot beat `incumbent` (+ slack) is not swept: it cannot hold the optimum.
 */
function solvePair(
  pair: PairGram,
  heat: readonly [number, number],
  cool: readonly [number, number],
  relaxedSse: number,
  coefficients: Float64Array,
  bounds: EdgeBounds | null,
  incumbent: number,
): FivePointOptimum | null {
  if (relaxationInside(coefficients, heat, cool)) {
    return {
      heating: coefficients[1]! / -coefficients[2]!,
      cooling: -coefficients[4]! / coefficients[3]!,
      sse: relaxedSse,
    };
  }
  const [heatLow, heatHigh] = heat;
  const [coolLow, coolHigh] = cool;
  let best: FivePointOptimum | null = null;
  for (let e = 0; e < 4; e++) {
    if (bounds !== null && bounds.bound[e]! > incumbent) continue;
    const fixed = e === 0 ? heatLow : e === 1 ? heatHigh : e === 2 ? coolLow : coolHigh;
    const edge = e < 2 ? pair.heatingEdge(fixed, coolLow, coolHigh) : pair.coolingEdge(fixed, heatLow, heatHigh);
    if (edge && (best === null || edge.sse < best.sse)) {
      best =
        e < 2
          ? { heating: fixed, cooling: edge.tau, sse: edge.sse }
          : { heating: edge.tau, cooling: fixed, sse: edge.sse };
    }
  }
  return best;
}

/**
 * The heating relaxation [1, s, S] fitted to a growing set of readings: its
 * SSE only grows as readings are added, so once it exceeds the incumbent the
 * rest of the row cannot win. Its 3×3 least squares is written out (a
 * Cholesky factor by hand): it is solved every time a reading joins.
 */
class RowBound {
  private w = 0;
  private s = 0;
  private S = 0;
  private y = 0;
  private ss = 0;
  private sS = 0;
  private sy = 0;
  private SS = 0;
  private Sy = 0;
  private yy = 0;
  private count = 0;
  private cached = 0;
  private stale = false;

  reset(): void {
    this.w = this.s = this.S = this.y = this.ss = this.sS = this.sy = this.SS = this.Sy = this.yy = 0;
    this.count = 0;
    this.cached = 0;
    this.stale = false;
  }

  add(weight: number, s: number, S: number, y: number): void {
    this.w += weight;
    this.s += weight * s;
    this.S += weight * S;
    this.y += weight * y;
    this.ss += weight * s * s;
    this.sS += weight * s * S;
    this.sy += weight * s * y;
    this.SS += weight * S * S;
    this.Sy += weight * S * y;
    this.yy += weight * y * y;
    this.count++;
    this.stale = true;
  }

  sse(): number {
    if (this.stale) {
      this.stale = false;
      this.cached = this.count > 3 ? this.solve() : 0;
    }
    return this.cached;
  }

  /** yy − bᵀG⁻¹b through G's Cholesky factor; a collinear set bounds nothing (0), as gramLeastSquares would say (null). */
  private solve(): number {
    const l00 = Math.sqrt(this.w);
    if (!(this.w > 0)) return 0;
    const l10 = this.s / l00;
    const l20 = this.S / l00;
    const d11 = this.ss - l10 * l10;
    if (!(d11 > PIVOT * this.ss)) return 0;
    const l11 = Math.sqrt(d11);
    const l21 = (this.sS - l20 * l10) / l11;
    const d22 = this.SS - l20 * l20 - l21 * l21;
    if (!(d22 > PIVOT * this.SS)) return 0;
    const l22 = Math.sqrt(d22);
    const z0 = this.y / l00;
    const z1 = (this.sy - l10 * z0) / l11;
    const z2 = (this.Sy - l20 * z0 - l21 * z1) / l22;
    return Math.max(0, this.yy - (z0 * z0 + z1 * z1 + z2 * z2));
  }
}

/**
 * Every pair of heating interval i and cooling interval j > i whose interior
 * the segment rule admits. Along a row (fixed i) the inner products of the
 * cooling columns with the heating columns are kept current day by day; the
 * heating block's Cholesky factor is computed once per row, so a pair's
 * free five-column fit costs a 2×2 Schur complement.
 */
export function searchFivePoint(
  days: BillDays,
  k: number,
  options: { pruneEdges?: boolean } = {},
): FivePointOptimum | null {
  const {
    n,
    w,
    y,
    mean,
    breakpoints,
    dayStart,
    dayBill,
    dayShare,
    dayTempShare,
    weightAtOrBelow,
    weightAtOrAbove,
    totalSquares,
  } = days;
  const count = breakpoints.length;
  let best = coordinateDescent(days, k);
  let bestSse = best?.sse ?? Number.POSITIVE_INFINITY;
  const slack = BOUND_SLACK * totalSquares;
  const cooling = coolingSumsByInterval(days);
  const byMax = Int32Array.from({ length: n }, (_, b) => b).sort((p, q) => days.maxTemp[p]! - days.maxTemp[q]!);
  // Readings whose every day is at or below breakpoint j (they see no cooling while τc is in interval j).
  const belowCount = new Int32Array(count);
  for (let j = 0, c = 0; j < count; j++) {
    while (c < n && days.maxTemp[byMax[c]!]! <= breakpoints[j]!) c++;
    belowCount[j] = c;
  }
  // What one day adds to the cross sums, weighted: w·T/m for Q and w/m for r.
  const dayWeightedTemp = new Float64Array(dayBill.length);
  const dayWeightedShare = new Float64Array(dayBill.length);
  for (let d = 0; d < dayBill.length; d++) {
    dayWeightedTemp[d] = w[dayBill[d]!]! * dayTempShare[d]!;
    dayWeightedShare[d] = w[dayBill[d]!]! * dayShare[d]!;
  }
  const { q: coolQ, r: coolR, qq: coolQQ, qr: coolQR, rr: coolRR, qy: coolQY, ry: coolRY } = cooling;

  // The first cooling interval with too little weight above it: no row goes beyond it.
  let endJ = 0;
  while (endJ + 1 < count && enough(weightAtOrAbove[endJ + 1]!, k)) endJ++;

  // Heating state: share and summed temperature of each reading's days at or below breakpoint i.
  const sI = new Float64Array(n);
  const SI = new Float64Array(n);
  const pair = new PairGram();
  const coefficients = new Float64Array(5);
  const bound = new RowBound();
  const edgeBounds = options.pruneEdges === false ? null : new EdgeBounds();
  const heatEnds: [number, number] = [0, 0];
  const coolEnds: [number, number] = [0, 0];
  let totalWeight = 0;
  for (let b = 0; b < n; b++) totalWeight += w[b]!;
  let ss = 0,
    sS = 0,
    sss = 0,
    ssS = 0,
    sSS = 0,
    ssy = 0,
    sSy = 0;

  for (let i = 0; i + 2 < count; i++) {
    for (let d = dayStart[i]!; d < dayStart[i + 1]!; d++) {
      const b = dayBill[d]!;
      const sOld = sI[b]!;
      const SOld = SI[b]!;
      const sNew = sOld + dayShare[d]!;
      const SNew = SOld + dayTempShare[d]!;
      const wb = w[b]!;
      ss += wb * (sNew - sOld);
      sS += wb * (SNew - SOld);
      sss += wb * (sNew * sNew - sOld * sOld);
      ssS += wb * (sNew * SNew - sOld * SOld);
      sSS += wb * (SNew * SNew - SOld * SOld);
      ssy += wb * y[b]! * (sNew - sOld);
      sSy += wb * y[b]! * (SNew - SOld);
      sI[b] = sNew;
      SI[b] = SNew;
    }
    if (!enough(weightAtOrBelow[i]!, k)) continue;
    const heatLow = breakpoints[i]!;
    const heatHigh = breakpoints[i + 1]!;
    const weightBelowRow = n - weightAtOrAbove[i + 1]!;

    // Cholesky factor of the heating block [1, s, S], and y projected on it (Σw·y = 0: y is centred).
    const l00 = Math.sqrt(totalWeight);
    const l10 = ss / l00;
    const l20 = sS / l00;
    const d11 = sss - l10 * l10;
    if (!(d11 > PIVOT * sss)) continue;
    const l11 = Math.sqrt(d11);
    const l21 = (ssS - l20 * l10) / l11;
    const d22 = sSS - l20 * l20 - l21 * l21;
    if (!(d22 > PIVOT * sSS)) continue;
    const l22 = Math.sqrt(d22);
    // Reciprocals: the pair loop below multiplies instead of dividing.
    const i00 = 1 / l00;
    const i11 = 1 / l11;
    const i22 = 1 / l22;
    const zy1 = ssy * i11;
    const zy2 = (sSy - l21 * zy1) * i22;
    const rowSst = totalSquares - zy1 * zy1 - zy2 * zy2;

    // The row's cooling state starts at the heating interval; its first cooling interval is i + 1.
    let xsQ = 0,
      xsR = 0,
      xSQ = 0,
      xSR = 0;
    for (let b = 0; b < n; b++) {
      const ws = w[b]! * sI[b]!;
      const wS = w[b]! * SI[b]!;
      const q = mean[b]! - SI[b]!;
      const r = 1 - sI[b]!;
      xsQ += ws * q;
      xsR += ws * r;
      xSQ += wS * q;
      xSR += wS * r;
    }
    bound.reset();
    let included = 0;

    // The cooling intervals the segment rule admits with this heating interval: the weight between the
    // changepoints grows with j and the weight above shrinks, so they are one run [firstJ, endJ).
    let firstJ = i + 1;
    while (firstJ < endJ && !enough(weightAtOrBelow[firstJ]! - weightBelowRow, k)) firstJ++;
    for (let j = i + 1; j < endJ; j++) {
      for (let d = dayStart[j]!, end = dayStart[j + 1]!; d < end; d++) {
        const b = dayBill[d]!;
        const wq = dayWeightedTemp[d]!;
        const wr = dayWeightedShare[d]!;
        const sb = sI[b]!;
        const Sb = SI[b]!;
        xsQ -= sb * wq;
        xsR -= sb * wr;
        xSQ -= Sb * wq;
        xSR -= Sb * wr;
      }
      if (j < firstJ) continue;

      // Row bound: readings whose every day is at or below the cooling interval see only the heating hinge.
      if (best !== null) {
        if (included < belowCount[j]!) {
          while (included < belowCount[j]!) {
            const b = byMax[included]!;
            bound.add(w[b]!, sI[b]!, SI[b]!, y[b]!);
            included++;
          }
          if (bound.sse() > bestSse + slack) break;
        }
      }

      // The free five-column fit on [1, s, S, Q, r] through the Schur complement of the heating block.
      const qq = coolQQ[j]!;
      const rr = coolRR[j]!;
      const zq0 = coolQ[j]! * i00;
      const zq1 = (xsQ - l10 * zq0) * i11;
      const zq2 = (xSQ - l20 * zq0 - l21 * zq1) * i22;
      const zr0 = coolR[j]! * i00;
      const zr1 = (xsR - l10 * zr0) * i11;
      const zr2 = (xSR - l20 * zr0 - l21 * zr1) * i22;
      const a11 = qq - zq0 * zq0 - zq1 * zq1 - zq2 * zq2;
      const a12 = coolQR[j]! - zq0 * zr0 - zq1 * zr1 - zq2 * zr2;
      const a22 = rr - zr0 * zr0 - zr1 * zr1 - zr2 * zr2;
      const b1 = coolQY[j]! - zq1 * zy1 - zq2 * zy2;
      const b2 = coolRY[j]! - zr1 * zy1 - zr2 * zy2;
      const det = a11 * a22 - a12 * a12;
      if (!(det > PIVOT * qq * rr)) continue;
      // relaxed = rowSst − bᵀA⁻¹b > incumbent ⇔ (rowSst − incumbent)·det > bᵀ adj(A) b (det > 0): no division on the way out.
      const explained = a22 * b1 * b1 - 2 * a12 * b1 * b2 + a11 * b2 * b2;
      if ((rowSst - bestSse - slack) * det > explained) continue;
      const relaxed = Math.max(0, rowSst - explained / det);

      // Coefficients of the relaxation: the cooling pair from the Schur system, the heating block by back-substitution.
      const betaQ = (a22 * b1 - a12 * b2) / det;
      const betaR = (a11 * b2 - a12 * b1) / det;
      coefficients[2] = (zy2 - zq2 * betaQ - zr2 * betaR) * i22;
      coefficients[1] = (zy1 - zq1 * betaQ - zr1 * betaR - l21 * coefficients[2]!) * i11;
      coefficients[0] = (-zq0 * betaQ - zr0 * betaR - l10 * coefficients[1]! - l20 * coefficients[2]!) * i00;
      coefficients[3] = betaQ;
      coefficients[4] = betaR;
      heatEnds[0] = heatLow;
      heatEnds[1] = heatHigh;
      coolEnds[0] = breakpoints[j]!;
      coolEnds[1] = breakpoints[j + 1]!;
      if (edgeBounds) {
        edgeBounds.set(relaxed, coefficients, l21, i11, i22, zq1, zq2, zr1, zr2, a11, a12, det, heatEnds, coolEnds);
        // No edge can win and the free fit's changepoints are outside: the pair's Gram matrix is not even needed.
        if (!edgeBounds.anyAtOrBelow(bestSse + slack) && !relaxationInside(coefficients, heatEnds, coolEnds)) continue;
      }
      pair.cc = totalWeight;
      pair.cs = ss;
      pair.cS = sS;
      pair.cq = coolQ[j]!;
      pair.cr = coolR[j]!;
      pair.ss = sss;
      pair.sS = ssS;
      pair.sq = xsQ;
      pair.sr = xsR;
      pair.sy = ssy;
      pair.SS = sSS;
      pair.Sq = xSQ;
      pair.Sr = xSR;
      pair.Sy = sSy;
      pair.qq = qq;
      pair.qr = coolQR[j]!;
      pair.qy = coolQY[j]!;
      pair.rr = rr;
      pair.ry = coolRY[j]!;
      pair.yy = totalSquares;
      const solved = solvePair(pair, heatEnds, coolEnds, relaxed, coefficients, edgeBounds, bestSse + slack);
      if (solved && solved.sse < bestSse) {
        best = solved;
        bestSse = solved.sse;
      }
    }
  }
  return best;
}
