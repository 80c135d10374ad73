/**
 * Samplers built on a uniform source on [0, 1).
 * - Normal: Box-Muller transform (Box & Muller 1958, Ann Math Stat 29:610), one
 *   value per call (the second is discarded, keeping the stream simple).
 * - Gamma: Marsaglia & Tsang 2000, ACM TOMS 26:363 (shape < 1 via the boost
 *   x * U^(1/shape)).
 * - Lognormal with mean 1 and coefficient of variation cv:
 *   sigma^2 = ln(1 + cv^2), mu = -sigma^2 / 2.
 */
import type { UniformSource } from "./alea-stream";

export function sampleExponential(u: UniformSource, mean: number): number {
  return -Math.log(1 - u()) * mean;
}

export function sampleNormal(u: UniformSource): number {
  const r = Math.sqrt(-2 * Math.log(1 - u()));
  return r * Math.cos(2 * Math.PI * u());
}

export function sampleGamma(u: UniformSource, shape: number, scale: number): number {
  if (shape < 1) return sampleGamma(u, shape + 1, scale) * Math.pow(1 - u(), 1 / shape);
  const d = shape - 1 / 3;
  const c = 1 / Math.sqrt(9 * d);
  for (;;) {
    let x: number;
    let v: number;
    do {
      x = sampleNormal(u);
      v = 1 + c * x;
    } while (v <= 0);
    v = v * v * v;
    const w = 1 - u();
    if (w < 1 - 0.0331 * x * x * x * x) return d * v * scale;
    if (Math.log(w) < 0.5 * x * x + d * (1 - v + Math.log(v))) return d * v * scale;
  }
}

/** A lognormal factor with mean 1 and the given coefficient of variation (1 when cv = 0). */
export function sampleLognormalFactor(u: UniformSource, cv: number): number {
  if (cv <= 0) return 1;
  const s2 = Math.log(1 + cv * cv);
  return Math.exp(-s2 / 2 + Math.sqrt(s2) * sampleNormal(u));
}
