/**
 * Upper tail of the chi-square distribution, P(X >= x) for X ~ chi-square(df),
 * as the regularized upper incomplete gamma function Q(df/2, x/2): series for
 * x < a + 1, Lentz continued fraction otherwise (Press et al., Numerical
 * Recipes, 3rd ed., section 6.2), with ln Gamma by the Lanczos approximation
 * (g = 7, nine coefficients; Numerical Recipes 6.1).
 *
 * @example chiSquareUpperTail(3.841458820694124, 1) // 0.05
 */
const LANCZOS = [
  0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059,
  12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7,
];

function logGamma(x: number): number {
  if (x < 0.5) return Math.log(Math.PI / Math.sin(Math.PI * x)) - logGamma(1 - x);
  const z = x - 1;
  let a = LANCZOS[0];
  const t = z + 7.5;
  for (let i = 1; i < 9; i++) a += LANCZOS[i] / (z + i);
  return 0.5 * Math.log(2 * Math.PI) + (z + 0.5) * Math.log(t) - t + Math.log(a);
}

export function chiSquareUpperTail(x: number, df: number): number {
  if (!(df > 0)) throw new RangeError("chiSquareUpperTail: df must be > 0");
  if (!(x > 0)) return 1;
  const a = df / 2;
  const s = x / 2;
  const lnPre = -s + a * Math.log(s) - logGamma(a);
  if (s < a + 1) {
    // series for the lower regularized gamma P(a, s)
    let term = 1 / a;
    let sum = term;
    for (let n = 1; n < 1000; n++) {
      term *= s / (a + n);
      sum += term;
      if (Math.abs(term) < Math.abs(sum) * 1e-15) break;
    }
    return Math.max(0, 1 - sum * Math.exp(lnPre));
  }
  // continued fraction for Q(a, s) (modified Lentz)
  const tiny = 1e-300;
  let b = s + 1 - a;
  let c = 1 / tiny;
  let d = 1 / b;
  let h = d;
  for (let i = 1; i < 1000; i++) {
    const an = -i * (i - a);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < tiny) d = tiny;
    c = b + an / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1) < 1e-15) break;
  }
  return Math.min(1, Math.exp(lnPre) * h);
}
