/**
 * Running weighted sums over points sorted by temperature. Any contiguous run
 * of sorted points (a segment of a piecewise fit) then has its sums in O(1),
 * which is what makes the exact changepoint search cheap.
 *
 * x and y are centred on their weighted means before summing, which keeps the
 * "sum of squares minus fitted part" formulas well conditioned.
 */
export interface SortedSums {
  n: number;
  /** Centred temperatures, ascending. */
  x: Float64Array;
  /** The same temperatures as given (not centred), ascending. */
  xOriginal: Float64Array;
  /** Centred use per day, in the same order. */
  y: Float64Array;
  w: Float64Array;
  /** Prefix sums: entry k covers points [0, k). */
  W: Float64Array;
  X: Float64Array;
  XX: Float64Array;
  Y: Float64Array;
  XY: Float64Array;
  YY: Float64Array;
  /** Weighted means removed from x and y. */
  xShift: number;
  yShift: number;
  /** Original order index of each sorted point. */
  order: Int32Array;
  /** Sorted indices k (0 < k < n) where x[k − 1] < x[k]: the gaps between distinct temperatures. */
  splits: Int32Array;
  /** Start index of each run of equal temperatures, plus n at the end. */
  groupStarts: Int32Array;
}

/** Sums of one contiguous segment [from, to). */
export interface SegmentSums {
  W: number;
  X: number;
  XX: number;
  Y: number;
  XY: number;
  YY: number;
}

export function buildSortedSums(x: readonly number[], y: readonly number[], w: readonly number[]): SortedSums {
  const n = x.length;
  const order = Int32Array.from({ length: n }, (_, i) => i).sort((a, b) => x[a]! - x[b]! || a - b);
  let totalW = 0;
  let sumX = 0;
  let sumY = 0;
  for (let i = 0; i < n; i++) {
    totalW += w[i]!;
    sumX += w[i]! * x[i]!;
    sumY += w[i]! * y[i]!;
  }
  const xShift = totalW > 0 ? sumX / totalW : 0;
  const yShift = totalW > 0 ? sumY / totalW : 0;
  const xs = new Float64Array(n);
  const xOriginal = new Float64Array(n);
  const ys = new Float64Array(n);
  const ws = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    const i = order[k]!;
    xs[k] = x[i]! - xShift;
    xOriginal[k] = x[i]!;
    ys[k] = y[i]! - yShift;
    ws[k] = w[i]!;
  }
  const W = new Float64Array(n + 1);
  const X = new Float64Array(n + 1);
  const XX = new Float64Array(n + 1);
  const Y = new Float64Array(n + 1);
  const XY = new Float64Array(n + 1);
  const YY = new Float64Array(n + 1);
  for (let k = 0; k < n; k++) {
    const wk = ws[k]!;
    const xk = xs[k]!;
    const yk = ys[k]!;
    W[k + 1] = W[k]! + wk;
    X[k + 1] = X[k]! + wk * xk;
    XX[k + 1] = XX[k]! + wk * xk * xk;
    Y[k + 1] = Y[k]! + wk * yk;
    XY[k + 1] = XY[k]! + wk * xk * yk;
    YY[k + 1] = YY[k]! + wk * yk * yk;
  }
  const splitList: number[] = [];
  const groupList: number[] = [0];
  for (let k = 1; k < n; k++) {
    if (xs[k - 1]! < xs[k]!) {
      splitList.push(k);
      groupList.push(k);
    }
  }
  groupList.push(n);
  return {
    n,
    x: xs,
    xOriginal,
    y: ys,
    w: ws,
    W,
    X,
    XX,
    Y,
    XY,
    YY,
    xShift,
    yShift,
    order,
    splits: Int32Array.from(splitList),
    groupStarts: Int32Array.from(groupList),
  };
}

/** Sums over sorted points [from, to). */
export function segmentSums(s: SortedSums, from: number, to: number): SegmentSums {
  return {
    W: s.W[to]! - s.W[from]!,
    X: s.X[to]! - s.X[from]!,
    XX: s.XX[to]! - s.XX[from]!,
    Y: s.Y[to]! - s.Y[from]!,
    XY: s.XY[to]! - s.XY[from]!,
    YY: s.YY[to]! - s.YY[from]!,
  };
}
