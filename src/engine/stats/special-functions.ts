/**
 * The special functions behind the engine's four distribution functions
 * (distributions.ts): log-gamma, the regularised incomplete beta function
 * and its inverse, erf and the inverse of erfc. Ported operation for
 * operation from jstat 1.9.6 (dist/jstat.js), which the engine used to load
 * whole: its start-up (about 9 ms, every command-line run) built some forty
 * distributions to use four. The same operations in the same order give the
 * same doubles; test/engine/stats/special-functions.test.ts checks every
 * function against jstat itself. The algorithms are the classic ones
 * (Lanczos' log-gamma, the incomplete beta's continued fraction by Lentz's
 * method, Newton steps for the inverses).
 *
 * jstat is Copyright (c) 2013 jStat, under the MIT licence: permission is
 * granted to use, copy, modify and distribute it, provided the copyright
 * notice and the permission notice are included; the software is provided
 * "as is", without warranty of any kind.
 */

const LANCZOS = [
  76.18009172947146, -86.50532032941677, 24.01409824083091, -1.231739572450155, 0.1208650973866179e-2,
  -0.5395239384953e-5,
];

/** ln Γ(x) for x > 0. */
export function logGamma(x: number): number {
  let ser = 1.000000000190015;
  let y = x;
  let tmp = x + 5.5;
  tmp -= (x + 0.5) * Math.log(tmp);
  for (let j = 0; j < 6; j++) ser += LANCZOS[j]! / ++y;
  return Math.log((2.5066282746310005 * ser) / x) - tmp;
}

/** The continued fraction of the incomplete beta function (modified Lentz). */
function betaContinuedFraction(x: number, a: number, b: number): number {
  const fpmin = 1e-30;
  const qab = a + b;
  const qap = a + 1;
  const qam = a - 1;
  let c = 1;
  let d = 1 - (qab * x) / qap;
  if (Math.abs(d) < fpmin) d = fpmin;
  d = 1 / d;
  let h = d;
  for (let m = 1; m <= 100; m++) {
    const m2 = 2 * m;
    let aa = (m * (b - m) * x) / ((qam + m2) * (a + m2));
    // The even step of the recurrence.
    d = 1 + aa * d;
    if (Math.abs(d) < fpmin) d = fpmin;
    c = 1 + aa / c;
    if (Math.abs(c) < fpmin) c = fpmin;
    d = 1 / d;
    h *= d * c;
    aa = (-(a + m) * (qab + m) * x) / ((a + m2) * (qap + m2));
    // The odd step.
    d = 1 + aa * d;
    if (Math.abs(d) < fpmin) d = fpmin;
    c = 1 + aa / c;
    if (Math.abs(c) < fpmin) c = fpmin;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1.0) < 3e-7) break;
  }
  return h;
}

/** The regularised incomplete beta function I_x(a, b); 0 for x outside [0, 1] (where jstat answers false, 0 in arithmetic). */
export function incompleteBeta(x: number, a: number, b: number): number {
  const bt =
    x === 0 || x === 1
      ? 0
      : Math.exp(logGamma(a + b) - logGamma(a) - logGamma(b) + a * Math.log(x) + b * Math.log(1 - x));
  if (x < 0 || x > 1) return 0;
  if (x < (a + 1) / (a + b + 2)) return (bt * betaContinuedFraction(x, a, b)) / a;
  return 1 - (bt * betaContinuedFraction(1 - x, b, a)) / b;
}

/** The x with I_x(a, b) = p. */
export function inverseIncompleteBeta(p: number, a: number, b: number): number {
  const EPS = 1e-8;
  const a1 = a - 1;
  const b1 = b - 1;
  let t: number;
  let x: number;
  if (p <= 0) return 0;
  if (p >= 1) return 1;
  if (a >= 1 && b >= 1) {
    const pp = p < 0.5 ? p : 1 - p;
    t = Math.sqrt(-2 * Math.log(pp));
    x = (2.30753 + t * 0.27061) / (1 + t * (0.99229 + t * 0.04481)) - t;
    if (p < 0.5) x = -x;
    const al = (x * x - 3) / 6;
    const h = 2 / (1 / (2 * a - 1) + 1 / (2 * b - 1));
    const w = (x * Math.sqrt(al + h)) / h - (1 / (2 * b - 1) - 1 / (2 * a - 1)) * (al + 5 / 6 - 2 / (3 * h));
    x = a / (a + b * Math.exp(2 * w));
  } else {
    const lna = Math.log(a / (a + b));
    const lnb = Math.log(b / (a + b));
    t = Math.exp(a * lna) / a;
    const u = Math.exp(b * lnb) / b;
    const w = t + u;
    if (p < t / w) x = Math.pow(a * w * p, 1 / a);
    else x = 1 - Math.pow(b * w * (1 - p), 1 / b);
  }
  const afac = -logGamma(a) - logGamma(b) + logGamma(a + b);
  for (let j = 0; j < 10; j++) {
    if (x === 0 || x === 1) return x;
    const err = incompleteBeta(x, a, b) - p;
    t = Math.exp(a1 * Math.log(x) + b1 * Math.log(1 - x) + afac);
    const u = err / t;
    t = u / (1 - 0.5 * Math.min(1, u * (a1 / x - b1 / (1 - x))));
    x -= t;
    if (x <= 0) x = 0.5 * (x + t);
    if (x >= 1) x = 0.5 * (x + t + 1);
    if (Math.abs(t) < EPS * x && j > 0) break;
  }
  return x;
}

const ERF_CHEBYSHEV = [
  -1.3026537197817094, 6.4196979235649026e-1, 1.9476473204185836e-2, -9.561514786808631e-3, -9.46595344482036e-4,
  3.66839497852761e-4, 4.2523324806907e-5, -2.0278578112534e-5, -1.624290004647e-6, 1.30365583558e-6, 1.5626441722e-8,
  -8.5238095915e-8, 6.529054439e-9, 5.059343495e-9, -9.91364156e-10, -2.27365122e-10, 9.6467911e-11, 2.394038e-12,
  -6.886027e-12, 8.94487e-13, 3.13092e-13, -1.12708e-13, 3.81e-16, 7.106e-15, -1.523e-15, -9.4e-17, 1.21e-16, -2.8e-17,
];

/** The error function. */
export function erf(value: number): number {
  let x = value;
  let negative = false;
  if (x < 0) {
    x = -x;
    negative = true;
  }
  const t = 2 / (2 + x);
  const ty = 4 * t - 2;
  let d = 0;
  let dd = 0;
  for (let j = ERF_CHEBYSHEV.length - 1; j > 0; j--) {
    const tmp = d;
    d = ty * d - dd + ERF_CHEBYSHEV[j]!;
    dd = tmp;
  }
  const res = t * Math.exp(-x * x + 0.5 * (ERF_CHEBYSHEV[0]! + ty * d) - dd);
  return negative ? res - 1 : 1 - res;
}

/** The inverse of the complementary error function erfc = 1 − erf. */
export function inverseErfc(p: number): number {
  if (p >= 2) return -100;
  if (p <= 0) return 100;
  const pp = p < 1 ? p : 2 - p;
  const t = Math.sqrt(-2 * Math.log(pp / 2));
  let x = -0.70711 * ((2.30753 + t * 0.27061) / (1 + t * (0.99229 + t * 0.04481)) - t);
  for (let j = 0; j < 2; j++) {
    const err = 1 - erf(x) - pp;
    x += err / (1.12837916709551257 * Math.exp(-x * x) - x * err);
  }
  return p < 1 ? x : -x;
}
