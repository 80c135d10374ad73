/**
 * Solves A x = b for a small dense matrix by Gaussian elimination with partial
 * pivoting (Golub & Van Loan, Matrix Computations, section 3.4). Returns null
 * when A is singular to working precision. A is row-major n x n; neither input
 * is changed.
 *
 * Example: linearSolve([2, 0, 0, 4], [2, 8], 2) gives [1, 2].
 */
export function linearSolve(a: ArrayLike<number>, b: ArrayLike<number>, n: number): Float64Array | null {
  const m = Float64Array.from(a as ArrayLike<number>);
  const x = Float64Array.from(b as ArrayLike<number>);
  let norm = 0;
  for (let i = 0; i < n * n; i++) norm = Math.max(norm, Math.abs(m[i]));
  for (let k = 0; k < n; k++) {
    let p = k;
    for (let i = k + 1; i < n; i++) if (Math.abs(m[i * n + k]) > Math.abs(m[p * n + k])) p = i;
    if (!(Math.abs(m[p * n + k]) > 1e-14 * norm)) return null;
    if (p !== k) {
      for (let j = 0; j < n; j++) [m[k * n + j], m[p * n + j]] = [m[p * n + j], m[k * n + j]];
      [x[k], x[p]] = [x[p], x[k]];
    }
    for (let i = k + 1; i < n; i++) {
      const f = m[i * n + k] / m[k * n + k];
      if (f === 0) continue;
      for (let j = k; j < n; j++) m[i * n + j] -= f * m[k * n + j];
      x[i] -= f * x[k];
    }
  }
  for (let k = n - 1; k >= 0; k--) {
    let s = x[k];
    for (let j = k + 1; j < n; j++) s -= m[k * n + j] * x[j];
    x[k] = s / m[k * n + k];
  }
  return x;
}
