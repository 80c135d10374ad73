import { test, describe } from "node:test";
import assert from "node:assert/strict";
import { templates } from "@/sim";
import { makeMatchedControl, outputSteadyStates, halfRiseTime } from "@/sim/analysis";
import { RunSpecSchema } from "@/shared/schemas/run-spec";
import { assertCloseTo } from "@/tests/helpers/close-to";

const specFor = (circuit: unknown, extra: Record<string, unknown> = {}) =>
  RunSpecSchema.parse({
    circuit,
    program: { kind: "periodic", start: 10, onDuration: 30, offDuration: 100, count: 3 },
    inputSignal: "Q",
    endTimeMinutes: 400,
    gridStepMinutes: 1,
    replicates: 3,
    seed: "control",
    ...extra,
  });

describe("makeMatchedControl", () => {
  test("I1-FFL (leaky output): ON and OFF steady states both matched; system size respected", () => {
    for (const systemSize of [1, 3]) {
      const spec = specFor(templates.i1ffl.circuit, { systemSize });
      const control = makeMatchedControl(spec);
      const a = outputSteadyStates(spec);
      const b = outputSteadyStates(control);
      assert.ok(a.offSteadyState > 0);
      assertCloseTo(b.onSteadyState, a.onSteadyState, { rel: 1e-6 });
      assertCloseTo(b.offSteadyState, a.offSteadyState, { rel: 1e-6 });
      assert.deepEqual(
        control.circuit.reactions.map((r) => r.name),
        ["driveZ", "basalZ", "decayZ"],
      );
      assert.equal(control.systemSize, systemSize);
    }
    // the incoherent circuit accelerates the response: T1/2 below the control's ln 2 / a (closed form of the
    // linear ODE; response acceleration by the I1-FFL: Mangan & Alon 2003, PNAS 100:11980, from memory)
    const spec = specFor(templates.i1ffl.circuit);
    assert.ok(halfRiseTime(spec)! < halfRiseTime(makeMatchedControl(spec))!);
  });

  test("drops cell-to-cell variation and refuses a circuit whose output falls when the input is on", () => {
    const spec = specFor(templates["c1ffl-and"].circuit, { extrinsic: [{ parameter: "rate(makeY)", cv: 0.2 }] });
    assert.deepEqual(makeMatchedControl(spec).extrinsic, []);
    const repressed = {
      name: "Repressed reporter",
      species: [{ name: "rptC", initialCount: 0 }],
      signals: [{ name: "Q", offLevel: 0, onLevel: 1 }],
      reactions: [
        {
          name: "makeZ",
          products: [{ species: "rptC", count: 1 }],
          rate: {
            kind: "regulated",
            maxRatePerMinute: 10,
            regulators: [{ source: "Q", effect: "represses", halfMax: 0.5, hill: 2 }],
          },
        },
        { name: "degZ", reactants: [{ species: "rptC", count: 1 }], rate: { kind: "massAction", ratePerMinute: 0.1 } },
      ],
      outputSpecies: "rptC",
    };
    assert.throws(
      () => makeMatchedControl(specFor(repressed, { threshold: { value: 10 } })),
      /not above its OFF steady state/,
    );
  });
});
