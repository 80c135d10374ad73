/**
 * The dense eigenvalue solver against matrices with known spectra.
 */
import { test } from "node:test";
import assert from "node:assert/strict";
import { eigenvalues } from "@/sim/regimes";

const close = (a: number, b: number, tol = 1e-10) =>
  assert.ok(Math.abs(a - b) <= tol * Math.max(1, Math.abs(b)), `${a} vs ${b}`);

test("rotation generator [[0,1],[-1,0]] has eigenvalues +-i (closed form)", () => {
  const e = eigenvalues([0, 1, -1, 0], 2);
  close(e[0].re, 0);
  close(Math.abs(e[0].im), 1);
  close(e[0].im, -e[1].im);
});

test("circulant -I - g P has eigenvalues -1 - g w, w^3 = 1 (eigenvalues of a circulant matrix, Davis, Circulant Matrices, 1979)", () => {
  const g = 2.5;
  const e = eigenvalues([-1, 0, -g, -g, -1, 0, 0, -g, -1], 3);
  close(e[0].re, -1 + g / 2);
  close(Math.abs(e[0].im), (g * Math.sqrt(3)) / 2);
  close(e[2].re, -1 - g);
  close(e[2].im, 0);
});

test("a 6 x 6 matrix: eigenvalues sum to the trace and multiply to the determinant (invariants of the characteristic polynomial)", () => {
  // upper triangular T with known diagonal, conjugated by an invertible M: spectrum = diag(T)
  const n = 6;
  const diag = [3, -2, 0.5, -0.25, 7, 1e-3];
  const T = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = i; j < n; j++) T[i * n + j] = i === j ? diag[i] : ((i + 2 * j) % 5) - 2;
  // M = I + L (unit lower triangular), M^-1 by forward substitution
  const M = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j <= i; j++) M[i * n + j] = i === j ? 1 : ((3 * i + j) % 4) * 0.3;
  const Minv = new Float64Array(n * n);
  for (let c = 0; c < n; c++)
    for (let i = 0; i < n; i++) {
      let s = i === c ? 1 : 0;
      for (let j = 0; j < i; j++) s -= M[i * n + j] * Minv[j * n + c];
      Minv[i * n + c] = s;
    }
  const mul = (A: Float64Array, B: Float64Array) => {
    const C = new Float64Array(n * n);
    for (let i = 0; i < n; i++)
      for (let j = 0; j < n; j++) for (let k = 0; k < n; k++) C[i * n + j] += A[i * n + k] * B[k * n + j];
    return C;
  };
  const e = eigenvalues(mul(mul(M, T), Minv), n);
  const want = [...diag].sort((a, b) => b - a);
  e.forEach((x, i) => {
    close(x.re, want[i], 1e-8);
    close(x.im, 0, 1e-8);
  });
});
