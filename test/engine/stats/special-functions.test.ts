/**
 * The special functions ported from jstat give jstat's own doubles, bit for
 * bit (reference: the jstat 1.9.6 package itself, loaded here), over the
 * arguments the engine asks for and well beyond: degrees of freedom from
 * 0.5 to a million, tails down to 1e-300, the edges 0 and 1.
 */
import { createRequire } from 'node:module';
import type jstatModule from 'jstat';
import { describe, expect, it } from 'vitest';
import {
  erf,
  incompleteBeta,
  inverseErfc,
  inverseIncompleteBeta,
  logGamma,
} from '../../../src/engine/stats/special-functions.js';
import {
  chiSquareOneForTail,
  fCritical,
  fPValue,
  twoSidedNormalQuantile,
  twoSidedTCritical,
} from '../../../src/engine/stats/distributions.js';

interface JstatSpecial {
  gammaln(x: number): number;
  ibeta(x: number, a: number, b: number): number | false;
  ibetainv(p: number, a: number, b: number): number;
  erf(x: number): number;
  erfcinv(p: number): number;
}
const loaded = createRequire(import.meta.url)('jstat') as typeof jstatModule & { jStat?: typeof jstatModule };
const jStat = (loaded.jStat ?? loaded) as typeof jstatModule & JstatSpecial;

const SHAPES = [0.5, 1, 1.5, 2, 2.5, 3, 5, 7.5, 12, 16.5, 30, 33, 100, 517, 1e4, 1e6];
const PROBABILITIES = [
  1e-300, 1e-30, 1e-12, 1e-6, 1e-3, 0.0125, 0.025, 0.05, 0.1, 0.3, 0.5, 0.7, 0.9, 0.95, 0.975, 0.999,
];
const POINTS = [0, 1e-12, 1e-4, 0.01, 0.1, 0.25, 0.5, 0.75, 0.9, 0.99, 0.9999, 1 - 1e-12, 1];

/** Arguments where the port and jstat differ, with both answers (Object.is: −0, NaN and infinities count too). */
function differences<A extends unknown[]>(
  cases: A[],
  ours: (...args: A) => number,
  theirs: (...args: A) => number,
): string[] {
  return cases.flatMap((args) => {
    const a = ours(...args);
    const b = theirs(...args);
    return Object.is(a, b) ? [] : [`${JSON.stringify(args)}: ${a} vs ${b}`];
  });
}

describe("special functions ported from jstat: jstat's doubles exactly (reference: jstat 1.9.6)", () => {
  it('log-gamma', () => {
    const xs = [1e-8, 0.1, 0.5, 1, 1.5, 2, 3.7, 10, 171.3, 1e6, ...SHAPES];
    expect(
      differences(
        xs.map((x) => [x] as [number]),
        logGamma,
        jStat.gammaln,
      ),
    ).toEqual([]);
  });

  it('incomplete beta and its inverse', () => {
    const points = SHAPES.flatMap((a) =>
      SHAPES.flatMap((b) => POINTS.map((x) => [x, a, b] as [number, number, number])),
    );
    expect(differences(points, incompleteBeta, (x, a, b) => Number(jStat.ibeta(x, a, b)))).toEqual([]);
    const probabilities = SHAPES.flatMap((a) =>
      SHAPES.flatMap((b) => [0, ...PROBABILITIES, 1].map((p) => [p, a, b] as [number, number, number])),
    );
    expect(differences(probabilities, inverseIncompleteBeta, jStat.ibetainv)).toEqual([]);
  });

  it('erf and the inverse of erfc', () => {
    const xs = [-6, -2.5, -1, -0.3, -0, 0, 1e-9, 0.3, 1, 1.96, 2.5, 6, 30].map((x) => [x] as [number]);
    expect(differences(xs, erf, jStat.erf)).toEqual([]);
    const ps = [-1, 0, ...PROBABILITIES, 1, 1.5, 1.95, 2 - 1e-12, 2, 3].map((p) => [p] as [number]);
    expect(differences(ps, inverseErfc, jStat.erfcinv)).toEqual([]);
  });

  it('the engine distribution functions built on them', () => {
    const confidences = [0.5, 0.68, 0.8, 0.9, 0.95, 0.99, 0.999];
    const dofs = [0.5, 1, 2, 3, 7, 10, 29.5, 33, 100, 1e4];
    expect(
      differences(
        confidences.flatMap((c) => dofs.map((d) => [c, d] as [number, number])),
        twoSidedTCritical,
        (c, d) => jStat.studentt.inv((1 + c) / 2, d),
      ),
    ).toEqual([]);
    const fCases = [0.001, 0.01, 0.05, 0.1].flatMap((level) =>
      [1, 2, 3].flatMap((df1) => [1, 5, 10, 31, 33, 1000].map((df2) => [level, df1, df2] as [number, number, number])),
    );
    expect(differences(fCases, fCritical, (level, df1, df2) => jStat.centralF.inv(1 - level, df1, df2))).toEqual([]);
    const fValues = [0, 1e-6, 0.5, 1, 3.052, 4.9646, 93.32, 387.1, 1e4].flatMap((f) =>
      [1, 2].flatMap((df1) => [2, 31, 32, 1093].map((df2) => [f, df1, df2] as [number, number, number])),
    );
    expect(differences(fValues, fPValue, (f, df1, df2) => 1 - jStat.centralF.cdf(f, df1, df2))).toEqual([]);
    expect(
      differences(
        confidences.map((c) => [c] as [number]),
        twoSidedNormalQuantile,
        (c) => jStat.normal.inv((1 + c) / 2, 0, 1),
      ),
    ).toEqual([]);
    expect(
      differences(
        [1e-14, 1e-9, 1e-4, 0.01, 0.05, 0.5, 0.99].map((p) => [p] as [number]),
        chiSquareOneForTail,
        (p) => jStat.normal.inv(1 - p / 2, 0, 1) ** 2,
      ),
    ).toEqual([]);
  });
});
