/**
 * Golden-section search: the minimum of a function on an interval, for the
 * plain references that polish a grid's best point. Finds a local minimum
 * only; the references use it within one grid step of the grid's best.
 */
export function goldenMinimum(
  f: (x: number) => number,
  low: number,
  high: number,
  iterations: number,
): { x: number; value: number } {
  const ratio = (Math.sqrt(5) - 1) / 2;
  let a = low;
  let b = high;
  let c = b - ratio * (b - a);
  let d = a + ratio * (b - a);
  let fc = f(c);
  let fd = f(d);
  for (let i = 0; i < iterations; i++) {
    if (fc < fd) {
      b = d;
      d = c;
      fd = fc;
      c = b - ratio * (b - a);
      fc = f(c);
    } else {
      a = c;
      c = d;
      fc = fd;
      d = a + ratio * (b - a);
      fd = f(d);
    }
  }
  return fc < fd ? { x: c, value: fc } : { x: d, value: fd };
}
