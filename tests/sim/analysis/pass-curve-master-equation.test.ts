/**
 * The monotone d50 and its 95% interval on the exact pass curve of a small
 * circuit, solved inside this test from its chemical master equation.
 *
 * Circuit: reporter Z made at k = 2 per minute while the input is ON, each
 * molecule removed at g = 0.1 per minute; threshold 8 molecules. Z starts each
 * pulse at 0 (the gaps between pulses are 15 lifetimes), and no Z is made after
 * the pulse ends, so a pulse of duration d passes exactly when Z reaches 8
 * before d: the first-passage probability P(d) of a birth-death chain from 0 to
 * 8. It is computed by uniformization of the master equation on states 0..7
 * with 8 absorbing (Jensen 1953, Skandinavisk Aktuarietidskrift 36:87; the
 * method as in Grassmann 1977, Comput Oper Res 4:47; both from memory), a
 * general-purpose method for finite Markov chains that shares no code with the
 * engine. The solver is checked against the pure-birth closed form (g = 0:
 * P(d) = P(Poisson(k d) >= 8)). The true d50 solves P(d50) = 1/2 (bisection).
 */
import { test, describe } from "node:test";
import assert from "node:assert/strict";
import { passCurveD50 } from "@/sim/analysis/pass-curve-d50";
import { simulateChunk, resolveThreshold } from "@/sim";
import { summarizeRun } from "@/sim/analysis";
import { RunSpecSchema } from "@/shared/schemas/run-spec";
import { assertCloseTo } from "@/tests/helpers/close-to";

const K = 2;
const G = 0.1;
const THETA = 8;

/** P(a birth-death chain from 0 reaches theta by time t), by uniformization of its master equation. */
function firstPassage(k: number, g: number, theta: number, t: number): number {
  const lambda = k + g * (theta - 1);
  // transient states 0..theta-1; uniformized jump matrix P = I + Q / lambda (absorption leaves the vector)
  let v = new Float64Array(theta);
  v[0] = 1;
  let poisson = Math.exp(-lambda * t);
  let cumulative = 0;
  let survive = 0;
  for (let m = 0; cumulative < 1 - 1e-14 && m < 100_000; m++) {
    let mass = 0;
    for (const x of v) mass += x;
    survive += poisson * mass;
    cumulative += poisson;
    const next = new Float64Array(theta);
    for (let n = 0; n < theta; n++) {
      const birth = k / lambda;
      const death = (g * n) / lambda;
      next[n] += v[n] * (1 - birth - death);
      if (n + 1 < theta) next[n + 1] += v[n] * birth; // n + 1 = theta is absorbed
      if (n > 0) next[n - 1] += v[n] * death;
    }
    v = next;
    poisson *= (lambda * t) / (m + 1);
  }
  return 1 - survive;
}

function trueD50(): number {
  let lo = 0.1;
  let hi = 100;
  for (let i = 0; i < 200; i++) {
    const mid = Math.sqrt(lo * hi);
    if (firstPassage(K, G, THETA, mid) < 0.5) lo = mid;
    else hi = mid;
  }
  return Math.sqrt(lo * hi);
}

const DURATIONS = [1.5, 2, 2.5, 3, 3.5, 4, 5, 6, 8, 11];

describe("d50 on a master-equation pass curve (birth-death reporter, threshold 8)", () => {
  test("uniformization agrees with the pure-birth closed form P(Poisson(k t) >= 8)", () => {
    for (const t of [0.5, 2, 4, 9]) {
      let below = 0;
      let term = Math.exp(-K * t);
      for (let n = 0; n < THETA; n++) {
        below += term;
        term *= (K * t) / (n + 1);
      }
      assertCloseTo(firstPassage(K, 0, THETA, t), 1 - below, { abs: 1e-12 });
    }
  });

  test("on the exact curve (very many pulses per duration) the estimate is the log-interpolated exact d50", () => {
    const d50 = trueD50();
    // sanity: the mean-field rise 20 (1 - e^{-0.1 t}) reaches 8 at t = 10 ln(5/3) = 5.11 min; noise makes passage earlier
    assert.ok(d50 > 3 && d50 < 5.11, String(d50));
    const n = 10_000_000;
    const r = passCurveD50(
      DURATIONS.map((duration) => ({
        duration,
        trials: n,
        passed: Math.round(n * firstPassage(K, G, THETA, duration)),
      })),
    );
    assert.equal(r.kind, "estimate", JSON.stringify(r));
    if (r.kind !== "estimate") return;
    // the interval ends are the tried durations straddling the true d50
    assert.ok(r.low <= d50 && d50 <= r.high, JSON.stringify({ r, d50 }));
    const below = Math.max(...DURATIONS.filter((d) => d <= d50));
    const above = Math.min(...DURATIONS.filter((d) => d > d50));
    assert.deepEqual([r.low, r.high], [below, above]);
    // interpolation on log duration between two tried durations 0.5 min apart: within 2% of the exact d50
    assertCloseTo(r.d50, d50, { rel: 0.02 });
  });

  test("from exact SSA runs of the circuit (200 replicates, fixed seed) the 95% interval covers the true d50", () => {
    const d50 = trueD50();
    let start = 10;
    const pulses = DURATIONS.map((duration) => {
      const p = { start, duration };
      start += duration + 150; // 15 lifetimes: Z is back at 0 (mean left 8 e^{-15} < 3 x 10^-6)
      return p;
    });
    const spec = RunSpecSchema.parse({
      circuit: {
        name: "Reporter birth-death",
        species: [{ name: "rptZ", initialCount: 0 }],
        signals: [{ name: "Q", offLevel: 0, onLevel: 1 }],
        reactions: [
          {
            name: "makeZ",
            products: [{ species: "rptZ", count: 1 }],
            rate: { kind: "constant", ratePerMinute: K },
            scaledBy: "Q",
          },
          { name: "degZ", reactants: [{ species: "rptZ", count: 1 }], rate: { kind: "massAction", ratePerMinute: G } },
        ],
        outputSpecies: "rptZ",
      },
      inputSignal: "Q",
      program: { kind: "pulses", pulses },
      endTimeMinutes: start,
      gridStepMinutes: 10,
      replicates: 200,
      seed: "master-equation-d50",
      threshold: { value: THETA },
    });
    const chunk = simulateChunk(spec, 0, spec.replicates);
    const summary = summarizeRun({
      pulses: chunk.pulses,
      replicates: chunk.replicates,
      threshold: resolveThreshold(spec),
      noiseDurationMinutes: 1,
      endTimeMinutes: spec.endTimeMinutes,
    });
    const r = summary.passCurveD50;
    assert.equal(r.kind, "estimate", JSON.stringify(r));
    if (r.kind !== "estimate") return;
    // seen with this seed: d50 4.65 min, 95% interval 4-5 min; true d50 4.52 min
    assert.ok(r.low <= d50 && d50 <= r.high, `95% interval ${r.low}-${r.high} min, true d50 ${d50} min`);
    // each duration's pass fraction within 4 binomial SEs of the master equation
    for (const d of DURATIONS) {
      const mine = chunk.pulses.filter((p) => p.durationBin === d && !p.excluded);
      assert.equal(mine.length, 200, `duration ${d}`);
      const p = firstPassage(K, G, THETA, d);
      const seen = mine.filter((x) => x.passed).length / mine.length;
      assert.ok(Math.abs(seen - p) < 4 * Math.sqrt((p * (1 - p)) / 200) + 1e-9, `duration ${d}: ${seen} vs ${p}`);
    }
  });
});
