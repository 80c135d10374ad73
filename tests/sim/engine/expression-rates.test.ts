/**
 * Expression rates and named parameters in the engines: the direct-method
 * kernel, tau-leaping and the ODE, with time-dependent piecewise rates, the
 * run-time errors, and param(P) in sweeps and cell-to-cell variation.
 */
import { describe, test } from "node:test";
import assert from "node:assert/strict";
import { makeSpec } from "./spec-helpers";
import { simulateChunk, solveOde, listParameters, setParameter, runSpecErrors } from "@/sim";
import type { CircuitInput } from "@/shared/schemas/circuit";

const N = 2000;

/** Mean and sample variance of species 0 at each grid time. */
function gridMoments(r: ReturnType<typeof simulateChunk>) {
  const ng = r.gridCount.length;
  const mean: number[] = [];
  const variance: number[] = [];
  for (let g = 0; g < ng; g++) {
    const n = r.gridCount[g];
    const m = r.gridSum[g] / n;
    mean.push(m);
    variance.push((r.gridSumSq[g] - n * m * m) / (n - 1));
  }
  return { mean, variance };
}

const birthDeath = (make: CircuitInput["reactions"][number], deg: CircuitInput["reactions"][number]): CircuitInput => ({
  name: "vat reporter",
  species: [{ name: "X", initialCount: 0 }],
  parameters: [
    { name: "k", value: 10 },
    { name: "g", value: 0.1 },
  ],
  reactions: [make, deg],
  outputSpecies: "X",
});

describe("expression rates in the direct method", () => {
  test("expressions equal to the fixed kinds give bit-identical results (same draws, same propensities)", () => {
    const fixed = birthDeath(
      {
        name: "make",
        products: [{ species: "X" }],
        rate: { kind: "constant", ratePerMinute: 10, use: { ratePerMinute: "k" } },
      },
      { name: "deg", reactants: [{ species: "X" }], rate: { kind: "massAction", ratePerMinute: 0.1 } },
    );
    const expr = birthDeath(
      { name: "make", products: [{ species: "X" }], rate: { kind: "expression", formula: "k" } },
      { name: "deg", reactants: [{ species: "X" }], rate: { kind: "expression", formula: "0.1 * X" } },
    );
    const opts = { endTimeMinutes: 30, gridStepMinutes: 1, replicates: 200, seed: "same" };
    const a = simulateChunk(makeSpec(fixed, opts), 0, 200);
    const b = simulateChunk(makeSpec(expr, opts), 0, 200);
    assert.equal(b.events, a.events);
    assert.deepEqual(Array.from(b.gridSum), Array.from(a.gridSum));
    assert.deepEqual(Array.from(b.gridSumSq), Array.from(a.gridSumSq));
  });

  test("piecewise-in-time production: mean and variance follow the Poisson law of the time-dependent immigration-death process (Jahnke & Huisinga 2007, J Math Biol 54:1)", () => {
    // X(t) ~ Poisson(m(t)) with m' = k 1[10 <= t < 25] - g m, m(0) = 0
    const circuit = birthDeath(
      {
        name: "make",
        products: [{ species: "X" }],
        rate: { kind: "expression", formula: "piecewise(k, time >= 10 and time < 25, 0)" },
      },
      { name: "deg", reactants: [{ species: "X" }], rate: { kind: "expression", formula: "g * X" } },
    );
    const spec = makeSpec(circuit, { endTimeMinutes: 40, gridStepMinutes: 5, replicates: N, seed: "pulse-in-time" });
    const m = (t: number) =>
      t < 10
        ? 0
        : t <= 25
          ? 100 * (1 - Math.exp(-0.1 * (t - 10)))
          : 100 * (1 - Math.exp(-1.5)) * Math.exp(-0.1 * (t - 25));
    const { mean, variance } = gridMoments(simulateChunk(spec, 0, N));
    for (let g = 0; g < mean.length; g++) {
      const t = g * 5;
      const mu = m(t);
      if (mu === 0) {
        assert.equal(mean[g], 0, `nothing is made before t = 10 (t = ${t})`);
        continue;
      }
      // 4.5 standard errors: sd of a Poisson mean is sqrt(mu/N), of its sample variance about mu sqrt(2/N) (for mu >> 1)
      assert.ok(Math.abs(mean[g] - mu) < 4.5 * Math.sqrt(mu / N), `mean at t = ${t}: ${mean[g]} vs ${mu}`);
      const sdVar = Math.sqrt((mu + 2 * mu * mu) / N);
      assert.ok(Math.abs(variance[g] - mu) < 4.5 * sdVar, `variance at t = ${t}: ${variance[g]} vs ${mu}`);
    }
    // the ODE stops at the clock stops: exact linear solution to integration accuracy
    const ode = solveOde(spec);
    for (let g = 0; g < ode.times.length; g++)
      assert.ok(Math.abs(ode.values[g] - m(ode.times[g])) < 1e-7 * 100, `ODE at t = ${ode.times[g]}`);
  });

  test("tau-leaping stops at clock stops too (approximate method: mean within 3% of the exact law)", () => {
    const circuit = birthDeath(
      {
        name: "make",
        products: [{ species: "X" }],
        rate: { kind: "expression", formula: "piecewise(k, time < 20, 0)" },
      },
      { name: "deg", reactants: [{ species: "X" }], rate: { kind: "massAction", ratePerMinute: 0.1 } },
    );
    const spec = makeSpec(circuit, {
      endTimeMinutes: 30,
      gridStepMinutes: 10,
      replicates: 1000,
      seed: "leap",
      method: "tauLeap",
    });
    const { mean } = gridMoments(simulateChunk(spec, 0, 1000));
    const exact = [0, 100 * (1 - Math.exp(-1)), 100 * (1 - Math.exp(-2)), 100 * (1 - Math.exp(-2)) * Math.exp(-1)];
    exact.forEach((mu, g) =>
      assert.ok(Math.abs(mean[g] - mu) <= 0.03 * mu + 1e-9, `t = ${g * 10}: ${mean[g]} vs ${mu}`),
    );
  });
});

describe("run-time errors of expression rates", () => {
  test("a negative rate stops the replicate with the reaction, value and time (never clamped)", () => {
    const circuit = birthDeath(
      { name: "make", products: [{ species: "X" }], rate: { kind: "expression", formula: "5 - 2*X" } },
      { name: "deg", reactants: [{ species: "X" }], rate: { kind: "massAction", ratePerMinute: 0.001 } },
    );
    const spec = makeSpec(circuit, { endTimeMinutes: 100, gridStepMinutes: 10, replicates: 4 });
    assert.throws(
      () => simulateChunk(spec, 0, 4),
      /replicate 0: reaction "make": the rate is negative \(-1\) at t = [0-9.]+ min; a rate must be a finite number, not negative/,
    );
    assert.throws(
      () => simulateChunk({ ...spec, method: "tauLeap" }, 0, 4),
      /replicate 0: reaction "make": the rate is negative/,
    );
    // the rate equation approaches X = 2.5 from below and never turns negative; from X = 8 it starts negative
    assert.doesNotThrow(() => solveOde(spec));
    const above = { ...circuit, species: [{ name: "X", initialCount: 8 }] };
    assert.throws(() => solveOde(makeSpec(above)), /reaction "make": the rate is negative \(-11\)/);
  });

  test("a rate that is not finite, and a firing that would make a count negative, stop it too", () => {
    const lnRate = birthDeath(
      { name: "make", products: [{ species: "X" }], rate: { kind: "expression", formula: "ln(X)" } },
      { name: "deg", reactants: [{ species: "X" }], rate: { kind: "massAction", ratePerMinute: 0.1 } },
    );
    assert.throws(() => simulateChunk(makeSpec(lnRate), 0, 1), /reaction "make": the rate is infinite at t = 0 min/);
    const leaky = birthDeath(
      { name: "make", products: [{ species: "X" }], rate: { kind: "constant", ratePerMinute: 0.01 } },
      { name: "deg", reactants: [{ species: "X" }], rate: { kind: "expression", formula: "1" } },
    );
    assert.throws(
      () => simulateChunk(makeSpec(leaky, { endTimeMinutes: 50 }), 0, 1),
      /replicate 0: reaction "deg" fired with too few molecules of "X" .*must be 0 when a reactant runs out/,
    );
  });

  test("expression rates need system size 1", () => {
    const circuit = birthDeath(
      { name: "make", products: [{ species: "X" }], rate: { kind: "expression", formula: "k" } },
      { name: "deg", reactants: [{ species: "X" }], rate: { kind: "massAction", ratePerMinute: 0.1 } },
    );
    const errs = runSpecErrors(makeSpec(circuit, { systemSize: 10 }));
    assert.match(errs.map((e) => e.message).join(";"), /expression rates.*system size must be 1/);
  });
});

describe("named parameters", () => {
  const circuit = birthDeath(
    { name: "make", products: [{ species: "X" }], rate: { kind: "expression", formula: "k" } },
    {
      name: "deg",
      reactants: [{ species: "X" }],
      rate: { kind: "massAction", ratePerMinute: 0.1, use: { ratePerMinute: "g" } },
    },
  );
  const spec = makeSpec(circuit, { endTimeMinutes: 60, gridStepMinutes: 60, replicates: N, seed: "params" });

  test("param(P) is listed, a field that follows it is not; setting it moves every follower", () => {
    const refs = listParameters(spec.circuit).map((p) => p.ref);
    assert.ok(refs.includes("param(k)") && refs.includes("param(g)"));
    assert.ok(!refs.includes("rate(deg)"), "rate(deg) follows param(g)");
    const c = setParameter(spec.circuit, "param(g)", 0.2);
    const deg = c.reactions[1].rate;
    assert.equal(deg.kind === "massAction" ? deg.ratePerMinute : NaN, 0.2);
    assert.throws(() => setParameter(spec.circuit, "rate(deg)", 0.3), /follows param\(g\): change param\(g\)/);
    assert.throws(() => setParameter(spec.circuit, "param(g)", -1), /param\(g\)" = -1: .*not be negative/);
    assert.throws(() => setParameter(spec.circuit, "param(zz)", 1), /no circuit parameter "zz"/);
  });

  test("a swept parameter reaches both the expression and the follower: stationary mean k/g (Poisson, Jahnke & Huisinga 2007)", () => {
    const c = setParameter(setParameter(spec.circuit, "param(k)", 20), "param(g)", 0.5);
    const { mean } = gridMoments(simulateChunk({ ...spec, circuit: c }, 0, N));
    // 60 min = 30 lifetimes: stationary Poisson(40)
    assert.ok(Math.abs(mean[1] - 40) < 4.5 * Math.sqrt(40 / N), `mean ${mean[1]}`);
  });

  test("cell-to-cell variation of param(g) reaches the follower (the mean rises above k/g: E[1/F] > 1 for a lognormal F)", () => {
    const varied = { ...spec, extrinsic: [{ parameter: "param(g)", cv: 0.5 }] };
    const r = simulateChunk(varied, 0, N);
    const fs = r.replicates.map((x) => x.factors["param(g)"]);
    assert.ok(new Set(fs).size > N / 2, "a factor per replicate");
    // E[k/(g F)] = (k/g) E[1/F] = 100 (1 + cv^2) for a lognormal with mean 1 (common practice: lognormal moments)
    const { mean } = gridMoments(r);
    const expected = 100 * 1.25;
    const sd = Math.sqrt(expected + 100 * 100 * (Math.pow(1.25, 3) - 1.25 * 1.25)) / Math.sqrt(N);
    assert.ok(Math.abs(mean[1] - expected) < 4.5 * sd, `mean ${mean[1]} vs ${expected} (sd ${sd})`);
  });
});
