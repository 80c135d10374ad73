/**
 * The stiff path of the mean-field solver: the analytic Jacobian, the
 * Rosenbrock method (Shampine & Reichelt 1997), the switch from Dormand-Prince
 * when it detects stiffness, and the budget of a whole call.
 */
import { test, describe } from "node:test";
import assert from "node:assert/strict";
import { compileModel } from "@/sim/circuit/compile-model";
import { CircuitSchema, type CircuitInput } from "@/shared/schemas/circuit";
import { templates } from "@/sim/circuit/templates";
import { meanFieldRhs } from "@/sim/ode/mean-field";
import { meanFieldJacobian } from "@/sim/ode/mean-field-jacobian";
import { jacobian as finiteDifferenceJacobian } from "@/sim/regimes/jacobian";
import { RosenbrockIntegrator } from "@/sim/ode/rosenbrock";
import { DopriIntegrator, type OdeRhs } from "@/sim/ode/dormand-prince";
import { AutoOdeIntegrator } from "@/sim/ode/auto-integrator";
import { OdeBudget, OdeBudgetError, withOdeBudget } from "@/sim/ode/ode-budget";
import { solveOde, estimateEvents } from "@/sim";
import { makeSpec } from "@/tests/sim/engine/spec-helpers";
import { assertCloseTo } from "@/tests/helpers/close-to";

/**
 * A made at b per minute, converted to B at k1 (fast), B removed at k2. (A
 * fast decay with nothing to balance it is not stiff here: the rate equations
 * clamp counts at 0, so an explicit step overshooting below 0 stops there.)
 */
function cascade(k1: number, k2: number, b: number): CircuitInput {
  return {
    name: "fast-cascade",
    species: [
      { name: "A", initialCount: 0 },
      { name: "B", initialCount: 0 },
    ],
    signals: [{ name: "Q", offLevel: 0, onLevel: 1 }],
    reactions: [
      { name: "makeA", products: [{ species: "A" }], rate: { kind: "constant", ratePerMinute: b } },
      {
        name: "convertA",
        reactants: [{ species: "A" }],
        products: [{ species: "B" }],
        rate: { kind: "massAction", ratePerMinute: k1 },
      },
      { name: "degB", reactants: [{ species: "B" }], rate: { kind: "massAction", ratePerMinute: k2 } },
    ],
    outputSpecies: "B",
  };
}

describe("analytic Jacobian of the rate equations", () => {
  test("equals central differences of the rate equations on every template and on dimerisation (definition of the derivative)", () => {
    const circuits = [
      ...Object.values(templates).map((t) => t.circuit),
      CircuitSchema.parse({
        name: "dimer-or",
        species: [
          { name: "M", initialCount: 30 },
          { name: "D", initialCount: 5 },
          { name: "R", initialCount: 7 },
        ],
        signals: [{ name: "Q", offLevel: 0.2, onLevel: 1 }],
        reactions: [
          {
            name: "dimerise",
            reactants: [{ species: "M", count: 2 }],
            products: [{ species: "D" }],
            rate: { kind: "massAction", ratePerMinute: 0.01 },
          },
          {
            name: "bind",
            reactants: [{ species: "M" }, { species: "D" }],
            products: [{ species: "R" }],
            rate: { kind: "massAction", ratePerMinute: 0.002 },
            scaledBy: "Q",
          },
          {
            name: "makeR",
            products: [{ species: "R" }],
            rate: {
              kind: "regulated",
              maxRatePerMinute: 8,
              logic: "or",
              leakFraction: 0.05,
              regulators: [
                { source: "M", effect: "represses", halfMax: 20, hill: 0.7 },
                { source: "D", effect: "activates", halfMax: 4, hill: 3 },
                { source: "Q", effect: "activates", halfMax: 0.5, hill: 2 },
              ],
            },
          },
          { name: "degR", reactants: [{ species: "R" }], rate: { kind: "massAction", ratePerMinute: 0.3 } },
        ],
        outputSpecies: "R",
      }),
    ];
    for (const circuit of circuits) {
      const model = compileModel(circuit, 1);
      const n = model.nSpecies;
      const sig = Float64Array.from(model.signalOn);
      const rhs = meanFieldRhs(model, model.baseParams, sig, false);
      const J = new Float64Array(n * n);
      meanFieldJacobian(model, model.baseParams, sig)(
        0,
        Float64Array.from({ length: n }, (_, i) => 13 + 17 * i),
        J,
      );
      const y = Float64Array.from({ length: n }, (_, i) => 13 + 17 * i);
      const fd = finiteDifferenceJacobian(rhs, y, 1);
      for (let i = 0; i < n * n; i++)
        assertCloseTo(J[i], fd[i], { rel: 1e-5, abs: 1e-8 }, `${circuit.name} J[${Math.floor(i / n)},${i % n}]`);
    }
  });
});

describe("Rosenbrock method (Shampine & Reichelt 1997, SIAM J Sci Comput 18:1)", () => {
  test("Robertson's chemical kinetics at t = 40 (reference values of Hairer & Wanner, Solving ODEs II, section IV.1; from memory)", () => {
    // y1' = -0.04 y1 + 1e4 y2 y3, y2' = 0.04 y1 - 1e4 y2 y3 - 3e7 y2^2, y3' = 3e7 y2^2
    const f: OdeRhs = (_t, y, dy) => {
      dy[0] = -0.04 * y[0] + 1e4 * y[1] * y[2];
      dy[2] = 3e7 * y[1] * y[1];
      dy[1] = -dy[0] - dy[2];
    };
    const jac = (_t: number, y: Float64Array, J: Float64Array) => {
      J.set([-0.04, 1e4 * y[2], 1e4 * y[1], 0.04, -1e4 * y[2] - 6e7 * y[1], -1e4 * y[1], 0, 6e7 * y[1], 0]);
    };
    const y = Float64Array.from([1, 0, 0]);
    const ode = new RosenbrockIntegrator(3, f, jac, { relTol: 1e-7, absTol: 1e-12 });
    ode.integrate(y, 0, 40);
    assertCloseTo(y[0], 0.7158270687, { rel: 1e-4 }, "y1(40)");
    assertCloseTo(y[1], 9.185534764e-6, { rel: 1e-3 }, "y2(40)");
    assertCloseTo(y[2], 0.2841637457, { rel: 1e-4 }, "y3(40)");
    assertCloseTo(y[0] + y[1] + y[2], 1, { abs: 1e-9 }, "mass is conserved (the three rates sum to 0)");
    // L-stable: the step grows with the slow dynamics instead of staying at 1/3e7
    assert.ok(ode.steps < 5000, `${ode.steps} steps`);
  });

  test("a reaction at 1e4/min: A = b/k1 (1 - e^{-k1 t}), B = b/k2 (1 - e^{-k2 t}) + b/(k2 - k1) (e^{-k2 t} - e^{-k1 t}) (closed form of the linear ODEs), in few steps", () => {
    const k1 = 1e4,
      k2 = 0.1,
      b = 1000;
    const model = compileModel(CircuitSchema.parse(cascade(k1, k2, b)), 1);
    const sig = Float64Array.from(model.signalOff);
    const ode = new AutoOdeIntegrator(
      2,
      meanFieldRhs(model, model.baseParams, sig),
      meanFieldJacobian(model, model.baseParams, sig),
      {
        relTol: 1e-10,
        absTol: 1e-10,
      },
    );
    const y = Float64Array.from(model.init);
    let t = 0;
    for (const tg of [1e-4, 1e-3, 1, 10, 100, 1000]) {
      ode.integrate(y, t, tg);
      t = tg;
      const e1 = Math.exp(-k1 * t),
        e2 = Math.exp(-k2 * t);
      assertCloseTo(y[0], (b / k1) * (1 - e1), { rel: 1e-6 }, `A(${t})`);
      assertCloseTo(y[1], (b / k2) * (1 - e2) + (b / (k2 - k1)) * (e2 - e1), { rel: 1e-6 }, `B(${t})`);
    }
    assert.equal(ode.method, "stiff", "Dormand-Prince handed over to the Rosenbrock method");
    // explicit stability alone needs k1 * 1000 / 3.3 ~ 3e6 steps (Dormand-Prince's stability interval is about 3.3)
    assert.ok(ode.steps < 5000, `${ode.steps} steps`);
  });

  test("Dormand-Prince's stiffness test (Hairer & Wanner II, IV.2) fires on the fast cascade and not on slow decay", () => {
    const stiffModel = compileModel(CircuitSchema.parse(cascade(1e4, 0.1, 1000)), 1);
    const slowModel = compileModel(CircuitSchema.parse(cascade(0.5, 0.1, 1000)), 1);
    const run = (model: ReturnType<typeof compileModel>) => {
      const sig = Float64Array.from(model.signalOff);
      const d = new DopriIntegrator(2, meanFieldRhs(model, model.baseParams, sig), {
        relTol: 1e-10,
        absTol: 1e-10,
        maxSteps: 1e6,
        stopWhenStiff: true,
      });
      const reached = d.integrate(Float64Array.from(model.init), 0, 100);
      return { reached, stiff: d.stiff };
    };
    const s = run(stiffModel);
    assert.equal(s.stiff, true);
    assert.ok(s.reached < 100);
    assert.deepEqual(run(slowModel), { reached: 100, stiff: false });
  });
});

describe("budget of a whole ODE call", () => {
  const fastSpec = (rate: number, endTimeMinutes: number, periodic = false, make = 10) =>
    makeSpec(
      {
        name: "fast",
        species: [{ name: "qsaA", initialCount: 0 }],
        signals: [{ name: "Q", offLevel: 0, onLevel: 1 }],
        reactions: [
          {
            name: "makeX",
            products: [{ species: "qsaA" }],
            rate: { kind: "constant", ratePerMinute: make },
            scaledBy: "Q",
          },
          { name: "degX", reactants: [{ species: "qsaA" }], rate: { kind: "massAction", ratePerMinute: rate } },
        ],
        outputSpecies: "qsaA",
      },
      {
        program: periodic
          ? { kind: "periodic", start: 0, onDuration: 5, offDuration: 5 }
          : { kind: "pulses", pulses: [{ start: 5, duration: 10 }] },
        endTimeMinutes,
        gridStepMinutes: endTimeMinutes / 100,
      },
    );

  test("a stiff circuit gets an answer: steady state 10/1e4 while ON (closed form b/a), inside a small budget", () => {
    const sol = withOdeBudget(new OdeBudget({ maxSteps: 50_000 }), () => solveOde(fastSpec(1e4, 20)));
    // grid step 0.2 min: t = 10 is inside the pulse [5, 15), long after the 1e-4 min relaxation
    assertCloseTo(sol.values[50], 10 / 1e4, { rel: 1e-6 }, "qsaA(10)");
    assertCloseTo(sol.values[99], 0, { abs: 1e-9 }, "qsaA(19.8), after the pulse");
  });

  test("the step budget counts the whole call, not one grid interval, and names the fastest reaction", () => {
    // 1000 pulses: every grid interval and every pulse takes far fewer than 1000 steps
    const budget = new OdeBudget({ maxSteps: 1000 });
    assert.throws(
      () => withOdeBudget(budget, () => estimateEvents(fastSpec(30, 1e4, true))),
      (e: unknown) => {
        assert.ok(e instanceof OdeBudgetError);
        assert.equal(e.reason, "steps");
        assert.match(
          e.message,
          /^stiff or too fast: reaction "degX" at 30\/min needs about [0-9,.e]+ steps over 1e4 min/,
        );
        assert.match(e.message, /more than 1,000 steps/);
        return true;
      },
    );
    assert.equal(budget.steps, 1001);
  });

  test("the checkpoint stops the call (wall time is injected, sim has no clock)", () => {
    let calls = 0;
    const budget = new OdeBudget({ maxSteps: 1e9, checkpoint: () => ++calls < 3, wallSeconds: 2 });
    assert.throws(
      () => withOdeBudget(budget, () => solveOde(fastSpec(30, 1e4, true))),
      (e: unknown) =>
        e instanceof OdeBudgetError && e.reason === "time" && /more than 2 s of computing/.test(e.message),
    );
    assert.equal(calls, 3);
  });

  test("a steady state beyond the largest double overflows: a clear error naming the reaction, not millions of steps", () => {
    const budget = new OdeBudget({ maxSteps: 100_000 });
    assert.throws(
      () => withOdeBudget(budget, () => estimateEvents(fastSpec(0.1, 20, false, 1e308))),
      (e: unknown) =>
        e instanceof OdeBudgetError &&
        e.reason === "nonFinite" &&
        /overflow/.test(e.message) &&
        /reaction "makeX"/.test(e.message),
    );
    assert.ok(budget.steps < 20_000, `${budget.steps} steps`);
  });
});
