/**
 * Small dense linear algebra for the engine's normal equations (at most 6×6).
 * Plain arrays on purpose: the systems are tiny and readability wins.
 */

/** A square matrix as rows. */
export type Matrix = number[][];

/**
 * Inverse of a symmetric positive-definite matrix by Gauss–Jordan elimination
 * with partial pivoting. Returns null when the matrix is singular to working
 * precision (a pivot below `relativeTolerance` × the largest diagonal entry).
 * @example invertMatrix([[2, 0], [0, 4]]) // [[0.5, 0], [0, 0.25]] — a diagonal matrix inverts entry by entry (source: by hand)
 */
export function invertMatrix(matrix: Matrix, relativeTolerance = 1e-12): Matrix | null {
  const size = matrix.length;
  const work = matrix.map((row, i) => [...row, ...Array.from({ length: size }, (_, j) => (i === j ? 1 : 0))]);
  const scale = Math.max(...matrix.map((row, i) => Math.abs(row[i] ?? 0)), Number.MIN_VALUE);
  for (let col = 0; col < size; col++) {
    let pivotRow = col;
    for (let r = col + 1; r < size; r++) {
      if (Math.abs(work[r]![col]!) > Math.abs(work[pivotRow]![col]!)) pivotRow = r;
    }
    const pivot = work[pivotRow]![col]!;
    if (!Number.isFinite(pivot) || Math.abs(pivot) <= relativeTolerance * scale) return null;
    [work[col], work[pivotRow]] = [work[pivotRow]!, work[col]!];
    const pivotLine = work[col]!;
    for (let j = 0; j < 2 * size; j++) pivotLine[j] = pivotLine[j]! / pivot;
    for (let r = 0; r < size; r++) {
      if (r === col) continue;
      const line = work[r]!;
      const factor = line[col]!;
      if (factor === 0) continue;
      for (let j = 0; j < 2 * size; j++) line[j] = line[j]! - factor * pivotLine[j]!;
    }
  }
  return work.map((row) => row.slice(size));
}

/**
 * Matrix–vector product.
 * @example multiplyMatrixVector([[1, 2], [3, 4]], [1, 1]) // [3, 7] — the row sums (source: by hand)
 */
export function multiplyMatrixVector(matrix: Matrix, vector: readonly number[]): number[] {
  return matrix.map((row) => row.reduce((sum, value, j) => sum + value * vector[j]!, 0));
}

/**
 * The quadratic form vᵀ·M·v.
 * @example quadraticForm([[2, 0], [0, 3]], [1, 2]) // 14 — 2·1² + 3·2² (source: by hand)
 */
export function quadraticForm(matrix: Matrix, vector: readonly number[]): number {
  return multiplyMatrixVector(matrix, vector).reduce((sum, value, i) => sum + value * vector[i]!, 0);
}
