/** Rate expressions: what the parser accepts, what it refuses (with the position), and the code it generates. */
import { describe, test } from "node:test";
import assert from "node:assert/strict";
import { parseExpression, evaluateTree, timeStops, treeToJs, type ExprScope } from "@/sim/circuit/expression";
import { validateCircuit } from "@/sim/circuit/validate-circuit";

const scope: ExprScope = {
  species: new Set(["X", "Y"]),
  signals: new Set(["S"]),
  params: new Set(["k", "K"]),
};

function value(text: string, env: Record<string, number>, time = 0): number | boolean {
  const r = parseExpression(text, scope);
  assert.ok(r.ok, r.ok ? "" : r.error.message);
  return evaluateTree(r.tree, (_kind, name) => env[name], time);
}

function refusal(text: string): { position: number | null; message: string } {
  const r = parseExpression(text, scope);
  assert.equal(r.ok, false, `"${text}" should be refused`);
  return (r as { ok: false; error: { position: number | null; message: string } }).error;
}

describe("rate expressions: accepted syntax", () => {
  test("arithmetic, precedence, unary minus and the functions", () => {
    const env = { X: 3, Y: 4, S: 2, k: 0.5, K: 10 };
    assert.equal(value("k*X + Y", env), 5.5);
    assert.equal(value("-X^2", env), -9, "^ binds tighter than unary minus");
    assert.equal(value("(X + Y) / 2", env), 3.5);
    assert.equal(value("2^3^2", env), 512, "^ is right-associative");
    assert.equal(value("log(exp(2))", env), 2, "log is the natural log");
    assert.equal(value("ln(exp(1.5))", env), 1.5);
    assert.equal(value("log10(1000)", env), 3);
    assert.equal(value("sqrt(Y) + abs(-X) + pow(X, 2)", env), 2 + 3 + 9);
    assert.equal(value("min(X, Y, 1) + max(X, Y)", env), 5);
    assert.equal(value("floor(2.7) + ceil(2.1)", env), 5);
    assert.equal(value("k * X^2 / (K^2 + X^2) * S", env), ((0.5 * 9) / 109) * 2);
  });

  test("piecewise with comparisons and and/or/not", () => {
    const env = { X: 3, Y: 4, S: 0, k: 1, K: 10 };
    assert.equal(value("piecewise(1, X > 2 and Y < 5, 0)", env), 1);
    assert.equal(value("piecewise(1, X > 5 or not (Y == 4), 2, X != 3, 7)", env), 7);
    assert.equal(value("piecewise(k, time >= 30, 0)", env, 31), 1);
    assert.equal(value("piecewise(k, time >= 30, 0)", env, 29), 0);
    assert.equal(value("X > 2 ? 5 : 6", env), 5);
  });

  test("clock stops are the constants time is compared with", () => {
    const r = parseExpression("piecewise(k, time >= 30 and time < 2*40, X, 100 <= time, 0)", scope);
    assert.ok(r.ok);
    assert.deepEqual(
      [...timeStops(r.tree)].sort((a, b) => a - b),
      [30, 80, 100],
    );
  });
});

describe("rate expressions: refusals name the position and the reason", () => {
  test("unknown names and functions", () => {
    const e = refusal("k*X + Z");
    assert.equal(e.position, 7);
    assert.match(e.message, /"Z" is not a species, signal or parameter/);
    assert.match(refusal("sin(X)").message, /unknown function sin/);
    assert.match(refusal("exp(X, Y)").message, /exp takes 1 argument, not 2/);
    assert.match(refusal("min(X)").message, /min takes 2 to 16 arguments/);
    assert.match(refusal("exp").message, /exp is a function/);
  });

  test("syntax errors carry the parser's position", () => {
    const e = refusal("k*(X + ");
    assert.ok(e.position !== null && e.position >= 7, `position ${e.position}`);
    assert.match(refusal("X = 3").message, /assignment/);
    assert.match(refusal("[1, 2]").message, /matrix or list/);
    assert.match(refusal("2X").message, /implicit multiplication/);
    assert.match(refusal('"a"').message, /only numbers/);
    assert.match(refusal("1 < X < 3").message, /chained comparison/);
  });

  test("types, domains and time", () => {
    assert.match(refusal("X > 3").message, /condition .* where a number is needed/);
    assert.match(refusal("piecewise(1, X, 0)").message, /number is used where a condition is needed/);
    assert.match(refusal("ln(0)").message, /ln of 0: the argument must be positive/);
    assert.match(refusal("sqrt(-4)").message, /sqrt of -4/);
    assert.match(refusal("X / (2 - 2)").message, /division by zero/);
    const t = refusal("k * time");
    assert.equal(t.position, 5);
    assert.match(t.message, /time may appear only in a piecewise condition/);
    assert.match(refusal("piecewise(time, X > 1, 0)").message, /time may appear only/);
    assert.match(refusal("piecewise(1, time > X, 0)").message, /compared with a constant number/);
    assert.match(refusal("piecewise(1, time > k, 0)").message, /compared with a constant number/);
    assert.match(refusal("piecewise(1, X > 2)").message, /final otherwise/);
  });
});

describe("rate expressions: generated code", () => {
  test("only the caller's names, numbers and Math functions reach the code", () => {
    const r = parseExpression("piecewise(k*X^2/(K^2+X^2), not (Y >= 1e-3), -2.5, time < 10, 0)", scope);
    assert.ok(r.ok);
    const js = treeToJs(r.tree, {
      name: (kind, name) => `${kind[0]}_${["X", "Y", "S", "k", "K"].indexOf(name)}`,
      time: "T",
    });
    assert.equal(js.replace(/Math\.(pow|log|exp)|[spn]_\d|\bT\b|[0-9.e-]+|[()*/+\-<>=!?: &|,]/g, ""), "");
    assert.match(js, /\(-2\.5\)/);
  });
});

describe("circuits with parameters and expression rates", () => {
  const circuit = (over: Record<string, unknown> = {}) => ({
    name: "vat sensor",
    species: [{ name: "X", initialCount: 0 }],
    signals: [{ name: "S" }],
    parameters: [
      { name: "kmax", value: 12 },
      { name: "Kx", value: 40 },
      { name: "g", value: 0.1 },
    ],
    reactions: [
      {
        name: "make",
        products: [{ species: "X" }],
        rate: { kind: "expression", formula: "kmax * S * Kx / (Kx + X)" },
      },
      {
        name: "deg",
        reactants: [{ species: "X" }],
        rate: { kind: "massAction", ratePerMinute: 0.1, use: { ratePerMinute: "g" } },
      },
    ],
    outputSpecies: "X",
    ...over,
  });

  test("a valid circuit passes", () => {
    assert.deepEqual(validateCircuit(circuit()), { ok: true });
  });

  test("errors name the reaction, field and position", () => {
    const c = circuit() as any;
    c.reactions[0].rate.formula = "kmax * S * Kz";
    const r = validateCircuit(c);
    assert.equal(r.ok, false);
    if (!r.ok) {
      assert.equal(r.errors[0].path, "reactions[0].rate.formula");
      assert.match(r.errors[0].message, /reactions\[0\] "make": formula at position 12: "Kz" is not a species/);
    }
  });

  test("parameter table: duplicates, clashes, following a missing or different parameter", () => {
    const c = circuit() as any;
    c.parameters.push({ name: "g", value: 1 }, { name: "X", value: 1 }, { name: "time", value: 1 });
    c.reactions[1].rate.use.ratePerMinute = "gg";
    const r = validateCircuit(c);
    assert.equal(r.ok, false);
    const msgs = r.ok ? "" : r.errors.map((e) => e.message).join("\n");
    assert.match(msgs, /parameters\[3\]: duplicate parameter name "g"/);
    assert.match(msgs, /parameters\[4\]: "X" is already a species name/);
    assert.match(msgs, /parameters\[5\]: "time" is reserved/);
    assert.match(msgs, /reactions\[1\] "deg": rate follows "gg", which is not a parameter/);
    const d = circuit() as any;
    d.reactions[1].rate.ratePerMinute = 0.2;
    const r2 = validateCircuit(d);
    assert.equal(r2.ok, false);
    assert.match(r2.ok ? "" : r2.errors[0].message, /rate is 0.2 but it follows parameter "g" = 0.1/);
  });

  test("expression reactions may have reactants (their rate must vanish when one runs out)", () => {
    const c = circuit() as any;
    c.reactions[1].rate = { kind: "expression", formula: "g * X" };
    assert.deepEqual(validateCircuit(c), { ok: true });
  });
});
