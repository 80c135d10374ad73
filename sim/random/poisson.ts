/**
 * Poisson variates: multiplication (inversion) for mean < 10, otherwise the
 * transformed rejection method PTRS of Hormann 1993, Insurance: Mathematics and
 * Economics 12:39. lnGamma by the Lanczos approximation (g = 7, 9 terms;
 * Numerical Recipes 3rd ed., section 6.1).
 */
import type { UniformSource } from "./alea-stream";

const LANCZOS = [
  0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059,
  12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7,
];

export function lnGamma(z: number): number {
  if (z < 0.5) return Math.log(Math.PI / Math.sin(Math.PI * z)) - lnGamma(1 - z);
  z -= 1;
  let a = LANCZOS[0];
  const t = z + 7.5;
  for (let i = 1; i < 9; i++) a += LANCZOS[i] / (z + i);
  return 0.5 * Math.log(2 * Math.PI) + (z + 0.5) * Math.log(t) - t + Math.log(a);
}

export function samplePoisson(u: UniformSource, mean: number): number {
  if (!(mean > 0)) return 0;
  if (mean < 10) {
    const l = Math.exp(-mean);
    let k = 0;
    let prod = 1 - u();
    while (prod > l) {
      k++;
      prod *= 1 - u();
    }
    return k;
  }
  const slam = Math.sqrt(mean);
  const loglam = Math.log(mean);
  const b = 0.931 + 2.53 * slam;
  const a = -0.059 + 0.02483 * b;
  const invalpha = 1.1239 + 1.1328 / (b - 3.4);
  const vr = 0.9277 - 3.6224 / (b - 2);
  for (;;) {
    const U = u() - 0.5;
    const V = 1 - u();
    const us = 0.5 - Math.abs(U);
    const k = Math.floor(((2 * a) / us + b) * U + mean + 0.43);
    if (us >= 0.07 && V <= vr) return k;
    if (k < 0 || (us < 0.013 && V > us)) continue;
    if (Math.log(V) + Math.log(invalpha) - Math.log(a / (us * us) + b) <= -mean + k * loglam - lnGamma(k + 1)) return k;
  }
}
