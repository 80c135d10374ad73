/**
 * LU factorisation with partial pivoting of a small dense matrix, in place,
 * and the matching solve (Golub & Van Loan, Matrix Computations, 4th ed.,
 * algorithms 3.4.1 and 3.4.2). Factor once, solve several right-hand sides:
 * what a Rosenbrock step needs (three solves with one matrix).
 *
 * Example: a = [2, 1, 4, 3]; luFactor(a, 2, piv); b = [3, 7]; luSolve(a, 2, piv, b) leaves b = [1, 1].
 */

/** Factors row-major a (n x n) in place; piv receives the row swaps. False when a is singular. */
export function luFactor(a: Float64Array, n: number, piv: Int32Array): boolean {
  for (let k = 0; k < n; k++) {
    let p = k;
    let best = Math.abs(a[k * n + k]);
    for (let i = k + 1; i < n; i++) {
      const v = Math.abs(a[i * n + k]);
      if (v > best) {
        best = v;
        p = i;
      }
    }
    piv[k] = p;
    if (!(best > 0) || !Number.isFinite(best)) return false;
    if (p !== k)
      for (let j = 0; j < n; j++) {
        const tmp = a[k * n + j];
        a[k * n + j] = a[p * n + j];
        a[p * n + j] = tmp;
      }
    const inv = 1 / a[k * n + k];
    for (let i = k + 1; i < n; i++) {
      const f = (a[i * n + k] *= inv);
      if (f === 0) continue;
      for (let j = k + 1; j < n; j++) a[i * n + j] -= f * a[k * n + j];
    }
  }
  return true;
}

/** Solves (LU) x = b in place (b becomes x), with the factors and pivots from luFactor. */
export function luSolve(lu: Float64Array, n: number, piv: Int32Array, b: Float64Array): void {
  for (let k = 0; k < n; k++) {
    const p = piv[k];
    if (p !== k) {
      const tmp = b[k];
      b[k] = b[p];
      b[p] = tmp;
    }
  }
  for (let i = 1; i < n; i++) {
    let s = b[i];
    for (let j = 0; j < i; j++) s -= lu[i * n + j] * b[j];
    b[i] = s;
  }
  for (let i = n - 1; i >= 0; i--) {
    let s = b[i];
    for (let j = i + 1; j < n; j++) s -= lu[i * n + j] * b[j];
    b[i] = s / lu[i * n + i];
  }
}
