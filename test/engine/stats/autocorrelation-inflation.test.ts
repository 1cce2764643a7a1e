import { describe, expect, it } from 'vitest';
import { ar1VarianceInflation } from '../../../src/engine/stats/autocorrelation-inflation.js';
import { invertMatrix } from '../../../src/engine/fit/matrix.js';
import { seededRandom } from '../../support/synthetic.js';

/** (XᵀWX)⁻¹ Xᵀ W^½ Ω W^½ X (XᵀWX)⁻¹ with Ω built element by element: the plain reference. */
function plainSandwich(design: number[][], weights: number[], rho: number): number[] {
  const n = design.length;
  const k = design[0]!.length;
  const bread = Array.from({ length: k }, (_, a) =>
    Array.from({ length: k }, (_, b) => design.reduce((s, row, t) => s + weights[t]! * row[a]! * row[b]!, 0)),
  );
  const meat = Array.from({ length: k }, (_, a) =>
    Array.from({ length: k }, (_, b) => {
      let sum = 0;
      for (let t = 0; t < n; t++)
        for (let s = 0; s < n; s++)
          sum += rho ** Math.abs(t - s) * Math.sqrt(weights[t]! * weights[s]!) * design[t]![a]! * design[s]![b]!;
      return sum;
    }),
  );
  const inverse = invertMatrix(bread)!;
  return Array.from({ length: k }, (_, j) => {
    let v = 0;
    for (let a = 0; a < k; a++) for (let b = 0; b < k; b++) v += inverse[a]![j]! * meat[a]![b]! * inverse[b]![j]!;
    return v / inverse[j]![j]!;
  });
}

describe('ar1VarianceInflation', () => {
  it('the mean of n AR(1) values: κ = 1 + 2Σ(1 − h/n)ρ^h (the variance of a mean of an AR(1) series; hand-worked)', () => {
    const n = 10;
    const rho = 0.6;
    let expected = 1;
    for (let h = 1; h < n; h++) expected += 2 * (1 - h / n) * rho ** h;
    const [kappa] = ar1VarianceInflation(
      Array.from({ length: n }, () => [1]),
      new Array(n).fill(1),
      rho,
    );
    expect(kappa).toBeCloseTo(expected, 12);
  });

  it('the example in its doc comment: two values, ρ = 0.5, κ = 1.5', () => {
    expect(ar1VarianceInflation([[1], [1]], [1, 1], 0.5)).toEqual([1.5]);
  });

  it('agrees with the sandwich built element by element, weighted rows and all (reference: the definition)', () => {
    const random = seededRandom(4);
    const design = Array.from({ length: 30 }, (_, t) => [
      1,
      40 + 20 * Math.sin(t / 5) + random.normal(),
      Math.max(0, 55 - (40 + t)),
    ]);
    const weights = Array.from({ length: 30 }, () => 28 + Math.floor(6 * random.uniform()));
    for (const rho of [0.2, 0.6, 0.9]) {
      const fast = ar1VarianceInflation(design, weights, rho);
      const plain = plainSandwich(design, weights, rho).map((v) => Math.max(1, v));
      fast.forEach((value, j) => expect(value).toBeCloseTo(plain[j]!, 9));
    }
  });

  it('never narrows: negative or undefined autocorrelation leaves every coefficient at 1', () => {
    const design = [
      [1, 1],
      [1, 2],
      [1, 3],
      [1, 5],
    ];
    expect(ar1VarianceInflation(design, [1, 1, 1, 1], -0.4)).toEqual([1, 1]);
    expect(ar1VarianceInflation(design, [1, 1, 1, 1], Number.NaN)).toEqual([1, 1]);
  });

  it('a persistent regressor with persistent errors inflates its slope about (1 + ρφ)/(1 − ρφ) (large-sample rule, from memory; simulation sets the regressor)', () => {
    const random = seededRandom(9);
    const phi = 0.8;
    let x = 0;
    const design: number[][] = [];
    for (let t = 0; t < 4000; t++) {
      x = phi * x + Math.sqrt(1 - phi * phi) * random.normal();
      design.push([1, x]);
    }
    const [, slope] = ar1VarianceInflation(design, new Array(4000).fill(1), 0.6);
    const expected = (1 + 0.6 * phi) / (1 - 0.6 * phi);
    expect(slope!).toBeGreaterThan(expected * 0.9);
    expect(slope!).toBeLessThan(expected * 1.1);
  });
});
