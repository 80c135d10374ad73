/**
 * Eigenvalues of a small dense real matrix: reduction to upper Hessenberg form
 * by Householder reflections, then the shifted QR algorithm in complex
 * arithmetic with Givens rotations, Wilkinson shifts and deflation at small
 * subdiagonal entries (Golub & Van Loan, Matrix Computations, 4th ed.,
 * sections 7.4-7.5; Wilkinson shift as in section 8.3). Meant for Jacobians of
 * circuits (up to 50 species); O(n^3) per sweep.
 *
 * Example: eigenvalues([[0, 1], [-1, 0]], 2) gives 0 +- 1i.
 */
export interface Eigenvalue {
  re: number;
  im: number;
}

/** a: row-major n x n. Returned sorted by real part, largest first (then by |im|). */
export function eigenvalues(a: ArrayLike<number>, n: number): Eigenvalue[] {
  if (n === 0) return [];
  const hr = new Float64Array(n * n);
  const hi = new Float64Array(n * n);
  for (let i = 0; i < n * n; i++) hr[i] = a[i];
  let norm = 0;
  for (let i = 0; i < n * n; i++) norm = Math.max(norm, Math.abs(hr[i]));
  if (!Number.isFinite(norm)) throw new Error("eigenvalues: the matrix has a non-finite entry");
  householderHessenberg(hr, n);
  const out: Eigenvalue[] = [];
  let end = n - 1;
  let iter = 0;
  const eps = 2.220446049250313e-16;
  while (end >= 0) {
    if (end === 0) {
      out.push({ re: hr[0], im: hi[0] });
      break;
    }
    // find the start of the unreduced block ending at `end`
    let l = end;
    while (l > 0) {
      const sub = Math.hypot(hr[l * n + l - 1], hi[l * n + l - 1]);
      const diag =
        Math.hypot(hr[l * n + l], hi[l * n + l]) + Math.hypot(hr[(l - 1) * n + l - 1], hi[(l - 1) * n + l - 1]);
      if (sub <= eps * (diag > 0 ? diag : norm)) {
        hr[l * n + l - 1] = 0;
        hi[l * n + l - 1] = 0;
        break;
      }
      l--;
    }
    if (l === end) {
      out.push({ re: hr[end * n + end], im: hi[end * n + end] });
      end--;
      iter = 0;
      continue;
    }
    if (++iter > 60 * n) throw new Error("eigenvalues: QR iteration did not converge");
    // Wilkinson shift: eigenvalue of the trailing 2 x 2 block closer to its last entry
    const k = end - 1;
    const [ar, ai] = [hr[k * n + k], hi[k * n + k]];
    const [br, bi] = [hr[k * n + end], hi[k * n + end]];
    const [cr, ci] = [hr[end * n + k], hi[end * n + k]];
    const [dr, di] = [hr[end * n + end], hi[end * n + end]];
    let mur: number, mui: number;
    if (iter % 11 === 10) {
      // exceptional shift to break cycles
      mur = dr + Math.abs(hr[end * n + k]) * 0.75;
      mui = di;
    } else {
      // mu = (a+d)/2 +- sqrt(((a-d)/2)^2 + b c)
      const hr2 = (ar - dr) / 2,
        hi2 = (ai - di) / 2;
      const qr = hr2 * hr2 - hi2 * hi2 + (br * cr - bi * ci);
      const qi = 2 * hr2 * hi2 + (br * ci + bi * cr);
      const [sr, si] = csqrt(qr, qi);
      const m1r = (ar + dr) / 2 + sr,
        m1i = (ai + di) / 2 + si;
      const m2r = (ar + dr) / 2 - sr,
        m2i = (ai + di) / 2 - si;
      if (Math.hypot(m1r - dr, m1i - di) <= Math.hypot(m2r - dr, m2i - di)) [mur, mui] = [m1r, m1i];
      else [mur, mui] = [m2r, m2i];
    }
    qrStep(hr, hi, n, l, end, mur, mui);
  }
  const scale = Math.max(norm, 1e-300);
  for (const e of out) if (Math.abs(e.im) <= 1e-12 * scale) e.im = 0;
  return out.sort((x, y) => y.re - x.re || Math.abs(y.im) - Math.abs(x.im) || y.im - x.im);
}

function csqrt(re: number, im: number): [number, number] {
  const r = Math.hypot(re, im);
  if (r === 0) return [0, 0];
  const sr = Math.sqrt((r + re) / 2);
  const si = Math.sqrt(Math.max(0, (r - re) / 2));
  return [sr, im < 0 ? -si : si];
}

/** In place: a = Q^T a Q with a upper Hessenberg (real). */
function householderHessenberg(a: Float64Array, n: number): void {
  const v = new Float64Array(n);
  for (let k = 0; k < n - 2; k++) {
    let alpha = 0;
    for (let i = k + 1; i < n; i++) alpha += a[i * n + k] ** 2;
    alpha = Math.sqrt(alpha);
    if (alpha === 0) continue;
    const x0 = a[(k + 1) * n + k];
    if (x0 > 0) alpha = -alpha;
    for (let i = 0; i < n; i++) v[i] = 0;
    v[k + 1] = x0 - alpha;
    for (let i = k + 2; i < n; i++) v[i] = a[i * n + k];
    let vv = 0;
    for (let i = k + 1; i < n; i++) vv += v[i] * v[i];
    if (vv === 0) continue;
    // a = (I - 2vv^T/vv) a
    for (let j = 0; j < n; j++) {
      let s = 0;
      for (let i = k + 1; i < n; i++) s += v[i] * a[i * n + j];
      s = (2 * s) / vv;
      for (let i = k + 1; i < n; i++) a[i * n + j] -= s * v[i];
    }
    // a = a (I - 2vv^T/vv)
    for (let i = 0; i < n; i++) {
      let s = 0;
      for (let j = k + 1; j < n; j++) s += a[i * n + j] * v[j];
      s = (2 * s) / vv;
      for (let j = k + 1; j < n; j++) a[i * n + j] -= s * v[j];
    }
    for (let i = k + 2; i < n; i++) a[i * n + k] = 0;
  }
}

/** One shifted QR step on the block l..e of a complex Hessenberg matrix: H - mu I = QR, H <- RQ + mu I. */
function qrStep(hr: Float64Array, hi: Float64Array, n: number, l: number, e: number, mur: number, mui: number): void {
  for (let i = l; i <= e; i++) {
    hr[i * n + i] -= mur;
    hi[i * n + i] -= mui;
  }
  const m = e - l;
  const cs = new Float64Array(m);
  const sR = new Float64Array(m);
  const sI = new Float64Array(m);
  for (let k = l; k < e; k++) {
    const xr = hr[k * n + k],
      xi = hi[k * n + k];
    const yr = hr[(k + 1) * n + k],
      yi = hi[(k + 1) * n + k];
    const ax = Math.hypot(xr, xi);
    const r = Math.hypot(ax, Math.hypot(yr, yi));
    let c: number, sr: number, si: number;
    if (r === 0) {
      c = 1;
      sr = 0;
      si = 0;
    } else if (ax === 0) {
      c = 0;
      // s = conj(y)/|y|
      const ay = Math.hypot(yr, yi);
      sr = yr / ay;
      si = -yi / ay;
    } else {
      c = ax / r;
      // s = (x/|x|) conj(y) / r
      const ur = xr / ax,
        ui = xi / ax;
      sr = (ur * yr + ui * yi) / r;
      si = (ui * yr - ur * yi) / r;
    }
    cs[k - l] = c;
    sR[k - l] = sr;
    sI[k - l] = si;
    // rows k, k+1: [p; q] <- [c p + s q; -conj(s) p + c q]
    for (let j = k; j <= e; j++) {
      const pr = hr[k * n + j],
        pi = hi[k * n + j];
      const qr = hr[(k + 1) * n + j],
        qi = hi[(k + 1) * n + j];
      hr[k * n + j] = c * pr + (sr * qr - si * qi);
      hi[k * n + j] = c * pi + (sr * qi + si * qr);
      hr[(k + 1) * n + j] = -(sr * pr + si * pi) + c * qr;
      hi[(k + 1) * n + j] = -(sr * pi - si * pr) + c * qi;
    }
  }
  for (let k = l; k < e; k++) {
    const c = cs[k - l],
      sr = sR[k - l],
      si = sI[k - l];
    // columns k, k+1: [p, q] <- [c p + conj(s) q, -s p + c q]
    for (let i = l; i <= Math.min(k + 1, e); i++) {
      const pr = hr[i * n + k],
        pi = hi[i * n + k];
      const qr = hr[i * n + k + 1],
        qi = hi[i * n + k + 1];
      hr[i * n + k] = c * pr + (sr * qr + si * qi);
      hi[i * n + k] = c * pi + (sr * qi - si * qr);
      hr[i * n + k + 1] = -(sr * pr - si * pi) + c * qr;
      hi[i * n + k + 1] = -(sr * pi + si * pr) + c * qi;
    }
  }
  for (let i = l; i <= e; i++) {
    hr[i * n + i] += mur;
    hi[i * n + i] += mui;
  }
}
