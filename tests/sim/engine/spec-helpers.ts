/**
 * Helpers for the engine checks: small run specs, one sample per replicate at
 * the end time, and a chi-square goodness-of-fit test against an exact pmf.
 */
import assert from "node:assert/strict";
import { RunSpecSchema, type RunSpec, type RunSpecInput } from "@/shared/schemas/run-spec";
import type { CircuitInput } from "@/shared/schemas/circuit";
import { simulateChunk } from "@/sim";

/** A spec around a circuit; adds a dummy signal "S" when the circuit has none. */
export function makeSpec(circuit: CircuitInput, extra: Partial<RunSpecInput> = {}): RunSpec {
  const c = { ...circuit, signals: circuit.signals && circuit.signals.length > 0 ? circuit.signals : [{ name: "S" }] };
  return RunSpecSchema.parse({
    circuit: c,
    program: { kind: "pulses", pulses: [{ start: 1e9, duration: 1 }] },
    inputSignal: c.signals[0].name,
    endTimeMinutes: 10,
    gridStepMinutes: 10,
    replicates: 100,
    seed: "check",
    threshold: { value: 1, windowMinutes: 1 },
    ...extra,
  });
}

/** Value of each species at the last grid time, one sample per replicate: [species][replicate]. */
export function samplesAtEnd(spec: RunSpec): Float64Array[] {
  const r = simulateChunk(spec, 0, spec.replicates, { keepAllGrid: true });
  const nS = spec.circuit.species.length;
  const ng = r.gridCount.length;
  const out = Array.from({ length: nS }, () => new Float64Array(spec.replicates));
  r.trajectories.forEach((t, k) => {
    for (let i = 0; i < nS; i++) out[i][k] = t.values[i * ng + ng - 1];
  });
  return out;
}

export function poissonPmf(mean: number): (k: number) => number {
  return (k) => Math.exp(-mean + k * Math.log(mean) - lnFactorial(k));
}

export function binomialPmf(n: number, p: number): (k: number) => number {
  return (k) =>
    k < 0 || k > n
      ? 0
      : Math.exp(lnFactorial(n) - lnFactorial(k) - lnFactorial(n - k) + k * Math.log(p) + (n - k) * Math.log(1 - p));
}

function lnFactorial(k: number): number {
  let s = 0;
  for (let i = 2; i <= k; i++) s += Math.log(i);
  return s;
}

/**
 * Chi-square goodness of fit (Pearson 1900) of integer samples against a pmf on
 * 0..maxK: cells with expected count >= 5 (common practice), the tails pooled
 * into the neighbouring cells. Rejects at the 0.1% level; the critical value
 * from the Wilson-Hilferty approximation (Wilson & Hilferty 1931, PNAS 17:684),
 * z(0.999) = 3.0902.
 */
export function assertChiSquareFits(
  samples: ArrayLike<number>,
  pmf: (k: number) => number,
  maxK: number,
  label: string,
): void {
  const n = samples.length;
  const observed = new Float64Array(maxK + 1);
  for (let i = 0; i < n; i++) {
    const k = samples[i];
    assert.ok(Number.isInteger(k) && k >= 0, `${label}: sample ${k} is not a count`);
    observed[Math.min(k, maxK)]++;
  }
  const expected = new Float64Array(maxK + 1);
  let acc = 0;
  for (let k = 0; k < maxK; k++) {
    expected[k] = n * pmf(k);
    acc += pmf(k);
  }
  expected[maxK] = n * Math.max(0, 1 - acc);
  // merge cells until each has expected >= 5
  const cellsO: number[] = [];
  const cellsE: number[] = [];
  let o = 0;
  let e = 0;
  for (let k = 0; k <= maxK; k++) {
    o += observed[k];
    e += expected[k];
    if (e >= 5) {
      cellsO.push(o);
      cellsE.push(e);
      o = 0;
      e = 0;
    }
  }
  if (e > 0 || o > 0) {
    cellsO[cellsO.length - 1] += o;
    cellsE[cellsE.length - 1] += e;
  }
  let chi2 = 0;
  for (let i = 0; i < cellsO.length; i++) chi2 += (cellsO[i] - cellsE[i]) ** 2 / cellsE[i];
  const df = cellsO.length - 1;
  assert.ok(df >= 2, `${label}: too few cells (${cellsO.length})`);
  const z = 3.0902;
  const crit = df * (1 - 2 / (9 * df) + z * Math.sqrt(2 / (9 * df))) ** 3;
  assert.ok(chi2 < crit, `${label}: chi-square ${chi2.toFixed(2)} >= ${crit.toFixed(2)} (df ${df})`);
}

export function meanVar(xs: ArrayLike<number>): { mean: number; variance: number; m4: number } {
  const n = xs.length;
  let s = 0;
  for (let i = 0; i < n; i++) s += xs[i];
  const mean = s / n;
  let v = 0;
  let m4 = 0;
  for (let i = 0; i < n; i++) {
    const d = xs[i] - mean;
    v += d * d;
    m4 += d * d * d * d;
  }
  return { mean, variance: v / (n - 1), m4: m4 / n };
}
