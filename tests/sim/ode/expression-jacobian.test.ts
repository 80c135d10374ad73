/**
 * The symbolic derivative of rate expressions (sim/circuit/expression-derivative.ts)
 * against central finite differences (definition of the derivative), its
 * one-sided rules at kinks, and its use in the stiff solver: the Jacobian of an
 * expression circuit is the analytic one (agreeing with the closed form to
 * round-off, which differences cannot reach), and a stiff expression circuit
 * is solved by the Rosenbrock method in few steps.
 */
import { test, describe } from "node:test";
import assert from "node:assert/strict";
import { parseExpression, evaluateTree, treeToText, type ExprNode } from "@/sim/circuit/expression";
import { differentiate } from "@/sim/circuit/expression-derivative";
import { compileModel } from "@/sim/circuit/compile-model";
import { CircuitSchema, type CircuitInput } from "@/shared/schemas/circuit";
import { meanFieldRhs } from "@/sim/ode/mean-field";
import { meanFieldJacobian } from "@/sim/ode/mean-field-jacobian";
import { AutoOdeIntegrator } from "@/sim/ode/auto-integrator";
import { assertCloseTo } from "@/tests/helpers/close-to";

const scope = { species: new Set(["A", "B"]), signals: new Set(["S"]), params: new Set(["k", "K"]) };
const VALUES: Record<string, number> = { k: 2.5, K: 7, S: 0.6 };

function tree(text: string): ExprNode {
  const r = parseExpression(text, scope);
  if (!r.ok) throw new Error(`${text}: ${r.error.message}`);
  return r.tree;
}

const at = (n: ExprNode, A: number, B: number) =>
  evaluateTree(n, (kind, name) => (kind === "species" ? (name === "A" ? A : B) : VALUES[name]), 0) as number;

/** Central difference of n in species s at (A, B). */
function central(n: ExprNode, s: "A" | "B", A: number, B: number): number {
  const v = s === "A" ? A : B;
  const h = 1e-5 * Math.max(Math.abs(v), 1);
  const up = s === "A" ? at(n, A + h, B) : at(n, A, B + h);
  const down = s === "A" ? at(n, A - h, B) : at(n, A, B - h);
  return (up - down) / (2 * h);
}

describe("symbolic derivative of rate expressions", () => {
  const EXPRESSIONS = [
    "k * A / (K + A)",
    "k * A^2 * B / (K^2 + A^2)",
    "pow(A, 1.5) * B",
    "exp(-A / 10) * B * S",
    "ln(1 + A) + log(2 + B)",
    "log10(2 + A * B)",
    "sqrt(A + 1) - B / 3",
    "A^B",
    "(A + 1)^(B / 4)",
    "2^(A / 5)",
    "-(A * B) + 40",
    "abs(A - 5) * B",
    "min(A, 2 * B, 7)",
    "max(A, 2 * B)",
    "floor(A) * B + ceil(B)",
    "piecewise(A * A, A > 3 and B < 20, 2 * A * B, B >= 20, k)",
  ];
  // Points away from every kink and jump of the expressions above.
  const POINTS: [number, number][] = [
    [1.3, 2.7],
    [4.2, 0.9],
    [8.6, 11.1],
    [2.4, 25.3],
  ];
  test("equals central differences on each expression at each point (definition of the derivative)", () => {
    for (const text of EXPRESSIONS) {
      const n = tree(text);
      for (const s of ["A", "B"] as const) {
        const d = differentiate(n, s);
        for (const [A, B] of POINTS)
          assertCloseTo(at(d, A, B), central(n, s, A, B), { rel: 1e-6, abs: 1e-8 }, `d(${text})/d${s} at (${A}, ${B})`);
      }
    }
  });

  test("one-sided rules at kinks: abs is 0 at its kink, min takes the first argument on a tie, floor and ceil are 0", () => {
    assert.equal(at(differentiate(tree("abs(A - 5)"), "A"), 5, 0), 0);
    assert.equal(at(differentiate(tree("abs(A - 5)"), "A"), 4, 0), -1);
    assert.equal(at(differentiate(tree("min(3 * A, B)"), "A"), 2, 6), 3);
    assert.equal(at(differentiate(tree("min(3 * A, B)"), "B"), 2, 6), 0);
    assert.equal(at(differentiate(tree("max(B, 3 * A)"), "B"), 2, 6), 1);
    assert.equal(at(differentiate(tree("floor(A) + ceil(A)"), "A"), 2.5, 0), 0);
  });

  test("a term without the species folds away, and the tree reads only the original's names", () => {
    assert.deepEqual(differentiate(tree("k * B + S"), "A"), { t: "num", v: 0 });
    assert.equal(treeToText(differentiate(tree("k * A"), "A")), "k");
    const d = treeToText(differentiate(tree("k * A / (K + A)"), "A"));
    assert.ok(/^[\w\s().*/+\-^]+$/.test(d), d);
    assert.ok(parseExpression(d, scope).ok, d);
  });
});

/** Fast conversion of A into B with a saturating expression law, B removed slowly. */
function saturating(vmax: number, K: number, make: number, kOut: number): CircuitInput {
  return {
    name: "saturating-stiff",
    species: [
      { name: "A", initialCount: 0 },
      { name: "B", initialCount: 0 },
    ],
    parameters: [
      { name: "vmax", value: vmax },
      { name: "K", value: K },
    ],
    reactions: [
      { name: "makeA", products: [{ species: "A" }], rate: { kind: "constant", ratePerMinute: make } },
      {
        name: "convert",
        reactants: [{ species: "A" }],
        products: [{ species: "B" }],
        rate: { kind: "expression", formula: "vmax * A / (K + A)" },
      },
      { name: "degB", reactants: [{ species: "B" }], rate: { kind: "massAction", ratePerMinute: kOut } },
    ],
    outputSpecies: "B",
  };
}

describe("expression rates in the stiff solver", () => {
  test("the Jacobian is the analytic one: d/dA of vmax A/(K + A) is vmax K/(K + A)^2 to round-off", () => {
    const vmax = 3e5,
      K = 50;
    const model = compileModel(CircuitSchema.parse(saturating(vmax, K, 1000, 0.1)), 1);
    const sig = new Float64Array(0);
    const J = new Float64Array(4);
    for (const A of [0, 0.3, 17, 1234]) {
      meanFieldJacobian(model, model.baseParams, sig)(0, Float64Array.from([A, 5]), J);
      const exact = (vmax * K) / ((K + A) * (K + A));
      // Central differences with the fallback's step carry an error near 1e-10 relative; the analytic form is exact.
      assertCloseTo(J[0], -exact, { rel: 1e-14 }, `J[A,A] at A = ${A}`);
      assertCloseTo(J[2], exact, { rel: 1e-14 }, `J[B,A] at A = ${A}`);
      assert.equal(J[3], -0.1);
    }
  });

  test("a stiff expression circuit is solved: the steady state A* = K m/(vmax - m), B* = m/kOut (setting the rates to 0), in few steps", () => {
    const vmax = 3e5,
      K = 50,
      m = 1000,
      kOut = 0.1;
    const model = compileModel(CircuitSchema.parse(saturating(vmax, K, m, kOut)), 1);
    const sig = new Float64Array(0);
    const ode = new AutoOdeIntegrator(
      2,
      meanFieldRhs(model, model.baseParams, sig),
      meanFieldJacobian(model, model.baseParams, sig),
      { relTol: 1e-9, absTol: 1e-9 },
    );
    const y = Float64Array.from(model.init);
    ode.integrate(y, 0, 300);
    assertCloseTo(y[0], (K * m) / (vmax - m), { rel: 1e-6 }, "A at 300 min");
    // B(t) = B* (1 - e^{-kOut t}) up to the fast start; at 300 min e^{-30} is negligible.
    assertCloseTo(y[1], m / kOut, { rel: 1e-6 }, "B at 300 min");
    assert.equal(ode.method, "stiff", "Dormand-Prince handed over to the Rosenbrock method");
    // explicit stability alone needs about (vmax/K) * 300 / 3.3 ~ 5e5 steps
    assert.ok(ode.steps < 5000, `${ode.steps} steps`);
  });
});
