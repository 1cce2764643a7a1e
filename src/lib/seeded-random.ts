/**
 * A small seeded random source (mulberry32, with Box–Muller normals) for
 * invented data: the demo, the example files, synthetic tests and the
 * benchmarks all see the same numbers on every run. Repeatability matters
 * here, not cryptographic quality.
 */
export interface Random {
  /** Uniform on [0, 1). */
  uniform(): number;
  /** Standard normal (mean 0, standard deviation 1). */
  normal(): number;
  /** Whole number in [min, max]. */
  integer(min: number, max: number): number;
}

export function seededRandom(seed: number): Random {
  let state = seed >>> 0;
  const uniform = (): number => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  const normal = (): number => {
    const u = 1 - uniform(); // (0, 1]: keeps the logarithm finite
    const v = uniform();
    return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
  };
  return { uniform, normal, integer: (min, max) => min + Math.floor(uniform() * (max - min + 1)) };
}
