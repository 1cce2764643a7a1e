/**
 * Exact least-squares changepoints for the hinge shapes (3PC, 3PH, 4P, 5P).
 *
 * For a fixed split of the temperature-sorted points, a continuous
 * piecewise-linear fit is an ordinary least-squares problem, and its joins
 * either fall inside the split's gaps (then the segments can be fitted
 * separately and simply meet there) or the optimum has a join exactly at a
 * data point (Hudson, 1966, "Fitting segmented curves whose join points have
 * to be estimated", JASA 61:1097–1129). So the search visits every split and
 * every data point once, each in O(1) from running sums: O(n) for the
 * one-changepoint shapes after sorting, O(n²) for 5P. No grid, no step size.
 *
 * The model is written with hinge columns: h = (cH − x)₊ for heating and
 * q = (x − cC)₊ for cooling, so every shape is y = b0 + bh·h + bq·q with some
 * columns absent (4P uses cH = cC). Changepoints are restricted to where every
 * segment keeps at least `minPoints` points, counting a point that sits on a
 * changepoint in both segments it touches.
 */
import { segmentSums, type SortedSums } from './sorted-sums.js';

/** Changepoints (in the caller's temperature units) and the weighted SSE at them. */
export interface ChangepointOptimum {
  heatingChangepoint: number | null;
  coolingChangepoint: number | null;
  sse: number;
}

export type HingeShape = '3PC' | '3PH' | '4P' | '5P';

/** Least-squares straight line on each prefix or suffix, indexed by split position. */
interface LineFits {
  slope: Float64Array;
  intercept: Float64Array;
  sse: Float64Array;
}

const TINY = 1e-12;

function lineFit(W: number, X: number, XX: number, Y: number, XY: number, YY: number): [number, number, number] {
  const sxx = XX - (X * X) / W;
  if (!(W > 0) || !(sxx > TINY * (XX + TINY))) return [Number.NaN, Number.NaN, Number.POSITIVE_INFINITY];
  const sxy = XY - (X * Y) / W;
  const slope = sxy / sxx;
  const intercept = (Y - slope * X) / W;
  return [slope, intercept, YY - (Y * Y) / W - slope * sxy];
}

function prefixLines(s: SortedSums): LineFits {
  const fits = {
    slope: new Float64Array(s.n + 1),
    intercept: new Float64Array(s.n + 1),
    sse: new Float64Array(s.n + 1),
  };
  for (let k = 0; k <= s.n; k++) {
    const [slope, intercept, sse] = lineFit(s.W[k]!, s.X[k]!, s.XX[k]!, s.Y[k]!, s.XY[k]!, s.YY[k]!);
    fits.slope[k] = slope;
    fits.intercept[k] = intercept;
    fits.sse[k] = sse;
  }
  return fits;
}

function suffixLines(s: SortedSums): LineFits {
  const n = s.n;
  const fits = { slope: new Float64Array(n + 1), intercept: new Float64Array(n + 1), sse: new Float64Array(n + 1) };
  for (let k = 0; k <= n; k++) {
    const [slope, intercept, sse] = lineFit(
      s.W[n]! - s.W[k]!,
      s.X[n]! - s.X[k]!,
      s.XX[n]! - s.XX[k]!,
      s.Y[n]! - s.Y[k]!,
      s.XY[n]! - s.XY[k]!,
      s.YY[n]! - s.YY[k]!,
    );
    fits.slope[k] = slope;
    fits.intercept[k] = intercept;
    fits.sse[k] = sse;
  }
  return fits;
}

/**
 * A lower bound on the SSE of any 5P whose heating segment is the first
 * `heatingEnd` points, cooling segment the points from `coolingStart` on and
 * the rest flat: the three segments fitted apart, with no continuity (a
 * segment too narrow for a line gets its constant fit, which a line cannot
 * beat there). Used only to skip placements that cannot win.
 */
function separateFitBound(
  s: SortedSums,
  prefix: LineFits,
  suffix: LineFits,
  heatingEnd: number,
  coolingStart: number,
): number {
  return (
    boundOfLine(prefix.sse[heatingEnd]!, s, 0, heatingEnd) +
    constantSse(s, heatingEnd, coolingStart) +
    boundOfLine(suffix.sse[coolingStart]!, s, coolingStart, s.n)
  );
}

function constantSse(s: SortedSums, from: number, to: number): number {
  const W = s.W[to]! - s.W[from]!;
  if (!(W > 0)) return 0;
  const Y = s.Y[to]! - s.Y[from]!;
  return Math.max(0, s.YY[to]! - s.YY[from]! - (Y * Y) / W);
}

function boundOfLine(lineSse: number, s: SortedSums, from: number, to: number): number {
  return Number.isFinite(lineSse) ? Math.max(0, lineSse) : constantSse(s, from, to);
}

/**
 * Weighted SSE of y = b0 + bh·(cH − x)₊ + bq·(x − cC)₊ with the changepoints
 * held fixed. `heatingEnd` is the count of sorted points below cH, and
 * `coolingStart` the first sorted index above cC (points on a changepoint
 * have a zero hinge value, so either side may hold them). Pass null for an
 * absent column. All in centred coordinates.
 */
export function fixedHingeSse(
  s: SortedSums,
  cH: number | null,
  heatingEnd: number,
  cC: number | null,
  coolingStart: number,
): number {
  const n = s.n;
  const W = s.W[n]!;
  const Y = s.Y[n]!;
  const YY = s.YY[n]!;
  let b0Denominator = W;
  let b0Numerator = Y;
  let Sh = 0;
  let Shh = 1;
  let Shy = 0;
  let Sq = 0;
  let Sqq = 1;
  let Sqy = 0;
  if (cH !== null) {
    const wL = s.W[heatingEnd]!;
    const xL = s.X[heatingEnd]!;
    Sh = cH * wL - xL;
    Shh = cH * cH * wL - 2 * cH * xL + s.XX[heatingEnd]!;
    Shy = cH * s.Y[heatingEnd]! - s.XY[heatingEnd]!;
    if (!(Shh > TINY * (1 + Sh * Sh))) return Number.POSITIVE_INFINITY;
    b0Denominator -= (Sh * Sh) / Shh;
    b0Numerator -= (Sh * Shy) / Shh;
  }
  if (cC !== null) {
    const wR = W - s.W[coolingStart]!;
    const xR = s.X[n]! - s.X[coolingStart]!;
    Sq = xR - cC * wR;
    Sqq = s.XX[n]! - s.XX[coolingStart]! - 2 * cC * xR + cC * cC * wR;
    Sqy = s.XY[n]! - s.XY[coolingStart]! - cC * (Y - s.Y[coolingStart]!);
    if (!(Sqq > TINY * (1 + Sq * Sq))) return Number.POSITIVE_INFINITY;
    b0Denominator -= (Sq * Sq) / Sqq;
    b0Numerator -= (Sq * Sqy) / Sqq;
  }
  if (!(b0Denominator > TINY * W)) return Number.POSITIVE_INFINITY;
  const b0 = b0Numerator / b0Denominator;
  let explained = b0 * Y;
  if (cH !== null) explained += ((Shy - Sh * b0) / Shh) * Shy;
  if (cC !== null) explained += ((Sqy - Sq * b0) / Sqq) * Sqy;
  return YY - explained;
}

/** Tracks the lowest SSE seen. */
class Best {
  sse = Number.POSITIVE_INFINITY;
  heating: number | null = null;
  cooling: number | null = null;
  offer(sse: number, heating: number | null, cooling: number | null): void {
    if (sse < this.sse) {
      this.sse = sse;
      this.heating = heating;
      this.cooling = cooling;
    }
  }
}

function insideGap(s: SortedSums, split: number, c: number): boolean {
  return s.x[split - 1]! < c && c < s.x[split]!;
}

/**
 * Exact least-squares changepoint(s) of one hinge shape, or null when no
 * placement leaves `minPoints` points in every segment.
 */
export function searchChangepoints(s: SortedSums, shape: HingeShape, minPoints: number): ChangepointOptimum | null {
  const k = Math.max(1, minPoints);
  const best = shape === '5P' ? searchFivePoint(s, k) : searchOneChangepoint(s, shape, k);
  if (!Number.isFinite(best.sse)) return null;
  return {
    heatingChangepoint: best.heating === null ? null : toOriginalUnits(s, best.heating),
    coolingChangepoint: best.cooling === null ? null : toOriginalUnits(s, best.cooling),
    sse: Math.max(0, best.sse),
  };
}

/**
 * Undo the centring. A changepoint on a data point comes back as that exact
 * data value (adding the mean back can round it off by an ulp, which would
 * move the point out of a segment it belongs to).
 */
function toOriginalUnits(s: SortedSums, centred: number): number {
  let low = 0;
  let high = s.n - 1;
  while (low < high) {
    const mid = (low + high) >> 1;
    if (s.x[mid]! < centred) low = mid + 1;
    else high = mid;
  }
  return s.x[low] === centred ? s.xOriginal[low]! : centred + s.xShift;
}

function searchOneChangepoint(s: SortedSums, shape: '3PC' | '3PH' | '4P', k: number): Best {
  const n = s.n;
  const best = new Best();
  const prefix = prefixLines(s);
  const suffix = suffixLines(s);
  const label = (c: number): [number | null, number | null] =>
    shape === '3PC' ? [null, c] : shape === '3PH' ? [c, null] : [c, c];

  // Joins exactly at a data point.
  const groups = s.groupStarts;
  for (let g = 0; g + 1 < groups.length; g++) {
    const below = groups[g]!;
    const above = groups[g + 1]!;
    if (above < k || n - below < k) continue;
    const c = s.x[below]!;
    const sse =
      shape === '3PC'
        ? fixedHingeSse(s, null, 0, c, above)
        : shape === '3PH'
          ? fixedHingeSse(s, c, below, null, n)
          : fixedHingeSse(s, c, below, c, above);
    const [h, q] = label(c);
    best.offer(sse, h, q);
  }

  // Joins inside a gap: fit each side on its own and see where they meet.
  for (const split of s.splits) {
    if (split < k || n - split < k) continue;
    let c: number;
    let sse: number;
    if (shape === '3PC') {
      const left = segmentSums(s, 0, split);
      const level = left.Y / left.W;
      c = (level - suffix.intercept[split]!) / suffix.slope[split]!;
      sse = left.YY - (left.Y * left.Y) / left.W + suffix.sse[split]!;
    } else if (shape === '3PH') {
      const right = segmentSums(s, split, n);
      const level = right.Y / right.W;
      c = (level - prefix.intercept[split]!) / prefix.slope[split]!;
      sse = prefix.sse[split]! + right.YY - (right.Y * right.Y) / right.W;
    } else {
      c = (suffix.intercept[split]! - prefix.intercept[split]!) / (prefix.slope[split]! - suffix.slope[split]!);
      sse = prefix.sse[split]! + suffix.sse[split]!;
    }
    if (!insideGap(s, split, c)) continue;
    const [h, q] = label(c);
    best.offer(sse, h, q);
  }
  return best;
}

function searchFivePoint(s: SortedSums, k: number): Best {
  const n = s.n;
  const best = new Best();
  const prefix = prefixLines(s);
  const suffix = suffixLines(s);
  const splits = s.splits;
  const groups = s.groupStarts;
  const groupCount = groups.length - 1;

  // Both joins inside gaps: heating line, flat middle, cooling line fitted apart.
  for (let a = 0; a < splits.length; a++) {
    const s1 = splits[a]!;
    if (s1 < k) continue;
    const heatSlope = prefix.slope[s1]!;
    const heatIntercept = prefix.intercept[s1]!;
    const heatSse = prefix.sse[s1]!;
    const lowEdge = s.x[s1 - 1]!;
    const highEdge = s.x[s1]!;
    for (let b = a + 1; b < splits.length; b++) {
      const s2 = splits[b]!;
      if (s2 - s1 < k) continue;
      if (n - s2 < k) break;
      const wM = s.W[s2]! - s.W[s1]!;
      const yM = s.Y[s2]! - s.Y[s1]!;
      const level = yM / wM;
      const cH = (level - heatIntercept) / heatSlope;
      if (!(lowEdge < cH && cH < highEdge)) continue;
      const cC = (level - suffix.intercept[s2]!) / suffix.slope[s2]!;
      if (!insideGap(s, s2, cC)) continue;
      const sse = heatSse + (s.YY[s2]! - s.YY[s1]! - (yM * yM) / wM) + suffix.sse[s2]!;
      best.offer(sse, cH, cC);
    }
  }

  // Heating join on a data point, cooling join inside a gap.
  for (let g = 0; g < groupCount; g++) {
    const below = groups[g]!;
    const atOrBelow = groups[g + 1]!;
    if (atOrBelow < k || below === 0) continue;
    if (boundOfLine(prefix.sse[below]!, s, 0, below) >= best.sse) continue;
    const cH = s.x[below]!;
    const left = segmentSums(s, 0, below);
    const Sh = cH * left.W - left.X;
    const Shh = cH * cH * left.W - 2 * cH * left.X + left.XX;
    const Shy = cH * left.Y - left.XY;
    for (const s2 of splits) {
      if (s2 < atOrBelow || s2 - below < k) continue;
      if (n - s2 < k) break;
      if (separateFitBound(s, prefix, suffix, below, s2) >= best.sse) continue;
      const wLM = s.W[s2]!;
      const yLM = s.Y[s2]!;
      const det = wLM * Shh - Sh * Sh;
      if (!(det > TINY * wLM * Shh)) continue;
      const b0 = (Shh * yLM - Sh * Shy) / det;
      const bh = (wLM * Shy - Sh * yLM) / det;
      const cC = (b0 - suffix.intercept[s2]!) / suffix.slope[s2]!;
      if (!insideGap(s, s2, cC)) continue;
      best.offer(s.YY[s2]! - b0 * yLM - bh * Shy + suffix.sse[s2]!, cH, cC);
    }
  }

  // Cooling join on a data point, heating join inside a gap.
  for (let g = 0; g < groupCount; g++) {
    const below = groups[g]!;
    const atOrBelow = groups[g + 1]!;
    if (n - below < k || atOrBelow === n) continue;
    if (boundOfLine(suffix.sse[atOrBelow]!, s, atOrBelow, n) >= best.sse) continue;
    const cC = s.x[below]!;
    const right = segmentSums(s, atOrBelow, n);
    const Sq = right.X - cC * right.W;
    const Sqq = right.XX - 2 * cC * right.X + cC * cC * right.W;
    const Sqy = right.XY - cC * right.Y;
    for (const s1 of splits) {
      if (s1 > below) break;
      if (s1 < k || atOrBelow - s1 < k) continue;
      if (separateFitBound(s, prefix, suffix, s1, atOrBelow) >= best.sse) continue;
      const wMR = s.W[n]! - s.W[s1]!;
      const yMR = s.Y[n]! - s.Y[s1]!;
      const det = wMR * Sqq - Sq * Sq;
      if (!(det > TINY * wMR * Sqq)) continue;
      const b0 = (Sqq * yMR - Sq * Sqy) / det;
      const bq = (wMR * Sqy - Sq * yMR) / det;
      const cH = (b0 - prefix.intercept[s1]!) / prefix.slope[s1]!;
      if (!insideGap(s, s1, cH)) continue;
      best.offer(prefix.sse[s1]! + s.YY[n]! - s.YY[s1]! - b0 * yMR - bq * Sqy, cH, cC);
    }
  }

  // Both joins on data points.
  for (let g1 = 0; g1 < groupCount; g1++) {
    const below1 = groups[g1]!;
    if (groups[g1 + 1]! < k) continue;
    if (boundOfLine(prefix.sse[below1]!, s, 0, below1) >= best.sse) continue;
    const cH = s.x[below1]!;
    for (let g2 = g1; g2 < groupCount; g2++) {
      const below2 = groups[g2]!;
      const atOrBelow2 = groups[g2 + 1]!;
      if (n - below2 < k) break;
      if (atOrBelow2 - below1 < k) continue;
      if (separateFitBound(s, prefix, suffix, below1, atOrBelow2) >= best.sse) continue;
      best.offer(fixedHingeSse(s, cH, below1, s.x[below2]!, atOrBelow2), cH, s.x[below2]!);
    }
  }
  return best;
}
