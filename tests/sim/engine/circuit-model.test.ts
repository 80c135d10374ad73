/** Validation, parameters, templates, threshold resolution and the event estimate. */
import { test, describe } from "node:test";
import assert from "node:assert/strict";
import {
  validateCircuit,
  listParameters,
  setParameter,
  templates,
  resolveThreshold,
  estimateEvents,
  simulateChunk,
  compileModel,
  reactionRate,
} from "@/sim";
import { RunSpecSchema } from "@/shared/schemas/run-spec";
import { assertCloseTo } from "@/tests/helpers/close-to";
import { makeSpec } from "./spec-helpers";

const base = () => structuredClone(templates["c1ffl-and"].circuit);

describe("validateCircuit", () => {
  test("templates are valid", () => {
    for (const t of Object.values(templates)) assert.deepEqual(validateCircuit(t.circuit), { ok: true });
  });

  test("errors name the reaction and field", () => {
    const c = base() as any;
    c.reactions[5].reactants[0].species = "Q9";
    const r = validateCircuit(c);
    assert.equal(r.ok, false);
    if (!r.ok) {
      assert.equal(r.errors[0].path, "reactions[5].reactants[0].species");
      assert.equal(r.errors[0].message, 'reactions[5] "degZ": reactant "Q9" is not a species');
    }
  });

  test("schema errors keep the reaction name; negative and non-finite parameters are refused", () => {
    const c = base() as any;
    c.reactions[1].rate.ratePerMinute = -1;
    c.reactions[2].rate.maxRatePerMinute = Infinity;
    const r = validateCircuit(c);
    assert.equal(r.ok, false);
    if (!r.ok) {
      assert.ok(r.errors.some((e) => e.message.startsWith('reactions[1] "degX":') && /negative/.test(e.message)));
      assert.ok(
        r.errors.some((e) => e.message.startsWith('reactions[2] "makeY":') && /finite|a number/.test(e.message)),
      );
    }
  });

  test("duplicates, unknown regulators, counts that could go negative, size limits", () => {
    const c = base() as any;
    c.species.push({ name: "hldB", initialCount: 0 });
    c.reactions[4].rate.regulators[1].source = "nope";
    c.reactions.push({ name: "leaky", reactants: [{ species: "qsaA" }], rate: { kind: "constant", ratePerMinute: 1 } });
    const r = validateCircuit(c);
    assert.equal(r.ok, false);
    if (!r.ok) {
      const msgs = r.errors.map((e) => e.message).join("\n");
      assert.match(msgs, /duplicate species name "hldB"/);
      assert.match(msgs, /reactions\[4\] "makeZ": regulator "nope" is not a species or signal/);
      assert.match(msgs, /reactions\[6\] "leaky": reactants: .*could drive a count negative/);
    }
    const big = base() as any;
    big.reactions = Array.from({ length: 201 }, (_, i) => ({
      name: `r${i}`,
      products: [{ species: "qsaA" }],
      rate: { kind: "constant", ratePerMinute: 1 },
    }));
    assert.equal(validateCircuit(big).ok, false);
  });
});

describe("parameters", () => {
  test("listParameters and setParameter by reference", () => {
    const c = base();
    const refs = listParameters(c).map((p) => p.ref);
    for (const r of ["rate(makeX)", "rate(degY)", "leak(makeZ)", "K(makeZ,hldB)", "n(makeZ,qsaA)", "init(rptC)"])
      assert.ok(refs.includes(r), r);
    const d = setParameter(c, "K(makeZ,hldB)", 80);
    assert.equal(listParameters(d).find((p) => p.ref === "K(makeZ,hldB)")!.value, 80);
    assert.equal(listParameters(c).find((p) => p.ref === "K(makeZ,hldB)")!.value, 100, "original unchanged");
    assert.throws(() => setParameter(c, "K(makeZ,zzz)", 1), /does not regulate/);
    assert.throws(() => setParameter(c, "rate(makeX)", -1), /not negative/);
  });

  test("propensities: k A (A-1)/2 for 2A, k A^2/2 mean-field; OR = 1 - prod(1 - h)", () => {
    const m = compileModel(
      {
        name: "t",
        description: "",
        species: [
          { name: "A", initialCount: 5 },
          { name: "B", initialCount: 0 },
        ],
        signals: [],
        reactions: [
          {
            name: "pair",
            reactants: [{ species: "A", count: 2 }],
            products: [{ species: "B", count: 1 }],
            modifiers: [],
            rate: { kind: "massAction", ratePerMinute: 0.3 },
          },
          {
            name: "or",
            reactants: [],
            products: [{ species: "B", count: 1 }],
            modifiers: [],
            rate: {
              kind: "regulated",
              maxRatePerMinute: 2,
              logic: "or",
              leakFraction: 0.1,
              regulators: [
                { source: "A", effect: "activates", halfMax: 5, hill: 2 },
                { source: "B", effect: "represses", halfMax: 1, hill: 1 },
              ],
            },
          },
        ],
        outputSpecies: "B",
      },
      1,
    );
    const x = [5, 1];
    assertCloseTo(reactionRate(m, m.baseParams, x, [], 0, false), (0.3 * 5 * 4) / 2, { rel: 1e-15 });
    assertCloseTo(reactionRate(m, m.baseParams, x, [], 0, true), (0.3 * 25) / 2, { rel: 1e-15 });
    const h1 = 25 / (25 + 25),
      h2 = 1 / (1 + 1);
    assertCloseTo(reactionRate(m, m.baseParams, x, [], 1, false), 2 * (0.1 + 0.9 * (1 - (1 - h1) * (1 - h2))), {
      rel: 1e-15,
    });
  });
});

describe("run-level helpers", () => {
  const specFor = (key: keyof typeof templates, replicates = 40) =>
    RunSpecSchema.parse({
      circuit: templates[key].circuit,
      inputSignal: templates[key].inputSignal,
      program: { kind: "periodic", start: 50, onDuration: 60, offDuration: 140 },
      endTimeMinutes: 600,
      gridStepMinutes: 1,
      replicates,
      seed: "tpl",
    });

  test("resolveThreshold: half-way from OFF (0) to the ON level, window 3 lifetimes of the output (Linger's own rule, docs/metrics.md)", () => {
    const t = resolveThreshold(specFor("simple"));
    // ON steady state: X = 100, f = 100^2/(50^2+100^2) = 0.8, Z = 20 * 0.8 / 0.1 = 160 (closed form), reached well within 600 min
    assertCloseTo(t.onMaximum, 160, { rel: 1e-6 });
    assert.equal(t.offSteadyState, 0);
    assertCloseTo(t.theta, 80, { rel: 1e-6 });
    assertCloseTo(t.downTheta, 64, { rel: 1e-6 });
    assert.equal(t.outputLifetimeMinutes, 10);
    assert.equal(t.windowMinutes, 30);
  });

  test("resolveThreshold refuses when the output has no first-order removal and no window is set", () => {
    const spec = makeSpec(
      {
        name: "x",
        species: [{ name: "A", initialCount: 0 }],
        reactions: [{ name: "m", products: [{ species: "A" }], rate: { kind: "constant", ratePerMinute: 1 } }],
        outputSpecies: "A",
      },
      { threshold: { value: 3 } },
    );
    assert.throws(() => resolveThreshold(spec), /no first-order removal; set threshold\.outputLifetimeMinutes/);
  });

  test("estimateEvents is within 2x of the actual number of firings on every template", () => {
    for (const key of Object.keys(templates) as (keyof typeof templates)[]) {
      const spec = specFor(key);
      const actual = simulateChunk(spec, 0, spec.replicates).events;
      const est = estimateEvents(spec);
      assert.ok(est > actual / 2 && est < actual * 2, `${key}: estimate ${est}, actual ${actual}`);
    }
  });

  test("templates produce a response to a long pulse", () => {
    const r = simulateChunk(specFor("c1ffl-and", 10), 0, 10);
    assert.ok(r.pulses.filter((p) => p.passed).length > 0);
  });
});
