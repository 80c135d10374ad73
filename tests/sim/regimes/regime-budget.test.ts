/**
 * The behaviour labels' integrations (steady-state search, step response, cycle check) count against the
 * ambient ODE budget of the call (sim/ode/ode-budget.ts), as the overlay and threshold solves do: a stiff
 * circuit gets "unclear" with the budget's reason instead of millions of explicit steps, and a budget
 * spent by an earlier solve of the same call is not renewed for the labels. The classifier itself lets
 * the budget's error through (a regime map answers 422 for it, never a label); the run's labels say
 * unclear with its reason.
 */
import { describe, test } from "node:test";
import assert from "node:assert/strict";
import { compileModel } from "@/sim/circuit/compile-model";
import { classifyDeterministic, classifyStochastic, runRegime } from "@/sim/regimes";
import { OdeBudget, OdeBudgetError, withOdeBudget } from "@/sim/ode/ode-budget";
import { CircuitSchema, type Circuit } from "@/shared/schemas/circuit";

/** A made at b per minute, converted to B at k1, B removed at k2 (B is the output). */
function cascade(k1: number, k2: number, b: number): Circuit {
  return CircuitSchema.parse({
    name: "fast-cascade",
    species: [
      { name: "A", initialCount: 0 },
      { name: "B", initialCount: 0 },
    ],
    signals: [{ name: "Q", offLevel: 0, onLevel: 1 }],
    reactions: [
      { name: "makeA", products: [{ species: "A" }], rate: { kind: "constant", ratePerMinute: b }, scaledBy: "Q" },
      {
        name: "convertA",
        reactants: [{ species: "A" }],
        products: [{ species: "B" }],
        rate: { kind: "massAction", ratePerMinute: k1 },
      },
      { name: "degB", reactants: [{ species: "B" }], rate: { kind: "massAction", ratePerMinute: k2 } },
    ],
    outputSpecies: "B",
  });
}

describe("behaviour labels under the ODE budget", () => {
  test("a stiff circuit (convertA at 1e5/min beside degB at 0.01/min) is unclear with the budget's reason, within the budget", () => {
    // Explicit Dormand-Prince steps are bounded by about 3.3 / 1e5 min (stability region edge, Hairer &
    // Wanner, Solving ODEs II, section IV.2), so settling over 100 turnovers of 100 min needs ~1e8 steps.
    const model = compileModel(cascade(1e5, 0.01, 10));
    const budget = new OdeBudget({ maxSteps: 20_000 });
    const r = withOdeBudget(budget, () => runRegime(model, 50, undefined, { seed: "stiff", replicates: 4 }));
    const v = r.deterministic;
    assert.equal(v.label, "unclear");
    assert.match(v.reason ?? "", /stiff or too fast: reaction "convertA" at 1e5\/min/);
    assert.match(v.reason ?? "", /more than 20,000 steps/);
    assert.ok(budget.steps <= 20_001, `${budget.steps} steps`);
    // the classifier itself passes the budget's error on, for callers that refuse rather than label
    assert.throws(
      () => withOdeBudget(new OdeBudget({ maxSteps: 20_000 }), () => classifyDeterministic({ model })),
      (e: unknown) => e instanceof OdeBudgetError && e.reason === "steps",
    );
  });

  test("the same circuit with slow rates is labelled within the same budget (the budget refuses only stiff work)", () => {
    const budget = new OdeBudget({ maxSteps: 20_000 });
    const v = withOdeBudget(budget, () => classifyDeterministic({ model: compileModel(cascade(1, 0.1, 10)) }));
    assert.notEqual(v.label, "unclear", JSON.stringify(v));
    assert.ok(budget.steps > 0, "the labels' integrations were counted");
  });

  test("a budget spent earlier in the call is not renewed for the labels; the wall-time checkpoint stops them too", () => {
    const spent = new OdeBudget({ maxSteps: 100 });
    spent.steps = 100; // e.g. by the overlay solve of the same finalisation
    const r = withOdeBudget(spent, () =>
      runRegime(compileModel(cascade(1, 0.1, 10)), 50, undefined, { seed: "budget", replicates: 4 }),
    );
    assert.equal(r.deterministic.label, "unclear");
    assert.match(r.deterministic.reason ?? "", /more than 100 steps/);
    // nor for the stochastic label's starting points (its mean-field steady states): unclear with the budget's
    // reason, not a label from an ensemble that quietly started from the initial state instead
    assert.equal(r.stochastic.label, "unclear");
    assert.match(r.stochastic.reason ?? "", /steady states the ensemble starts from could not be found/);
    assert.match(r.stochastic.reason ?? "", /more than 100 steps/);
    const spentAgain = new OdeBudget({ maxSteps: 100 });
    spentAgain.steps = 100;
    assert.throws(
      () =>
        withOdeBudget(spentAgain, () =>
          classifyStochastic({ model: compileModel(cascade(1, 0.1, 10)), seed: "budget", replicates: 4 }),
        ),
      (e: unknown) => e instanceof OdeBudgetError && e.reason === "steps",
    );

    let calls = 0;
    const timed = new OdeBudget({ maxSteps: 1e9, checkpoint: () => ++calls < 2, wallSeconds: 3 });
    const t = withOdeBudget(timed, () =>
      runRegime(compileModel(cascade(1e5, 0.01, 10)), 50, undefined, { seed: "timed", replicates: 4 }),
    );
    assert.equal(t.deterministic.label, "unclear");
    assert.match(t.deterministic.reason ?? "", /more than 3 s of computing/);
  });
});
