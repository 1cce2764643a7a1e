/**
 * A small seeded random source so every benchmark run sees the same invented
 * data. Quality only needs to be "looks like noise"; speed and repeatability
 * matter more.
 */
export interface SeededRandom {
  /** Uniform on [0, 1). */
  uniform(): number;
  /** Standard normal (mean 0, standard deviation 1). */
  normal(): number;
  /** Whole number in [low, high]. */
  integer(low: number, high: number): number;
}

export function seededRandom(seed: number): SeededRandom {
  // 32-bit state stepped by an odd constant and scrambled by multiply–xorshift.
  let state = seed >>> 0;
  const uniform = (): number => {
    state = (state + 0x9e3779b9) >>> 0;
    let z = state;
    z = Math.imul(z ^ (z >>> 16), 0x85ebca6b);
    z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35);
    return ((z ^ (z >>> 16)) >>> 0) / 4294967296;
  };
  let spare: number | null = null;
  const normal = (): number => {
    if (spare !== null) {
      const value = spare;
      spare = null;
      return value;
    }
    // Box–Muller: two uniforms give two independent normals.
    const u = 1 - uniform();
    const v = uniform();
    const radius = Math.sqrt(-2 * Math.log(u));
    spare = radius * Math.sin(2 * Math.PI * v);
    return radius * Math.cos(2 * Math.PI * v);
  };
  const integer = (low: number, high: number): number => low + Math.floor(uniform() * (high - low + 1));
  return { uniform, normal, integer };
}
