/**
 * The mean-field solver against closed forms of linear ODEs (each derived in
 * its test name from the linear step response), to 1e-6 relative.
 */
import { test, describe } from "node:test";
import assert from "node:assert/strict";
import { solveOde } from "@/sim";
import { makeSpec } from "@/tests/sim/engine/spec-helpers";
import { assertCloseTo } from "@/tests/helpers/close-to";

describe("ODE solver (Dormand-Prince 5(4)) against closed forms", () => {
  test("simple regulation: Z(t) = Z_st (1 - e^{-a t}), T1/2 = ln 2 / a (closed form of the linear ODE)", () => {
    const b = 20,
      a = 0.1;
    const tHalf = Math.log(2) / a;
    const spec = makeSpec(
      {
        name: "simple",
        species: [{ name: "Z", initialCount: 0 }],
        signals: [{ name: "X", offLevel: 0, onLevel: 1 }],
        reactions: [
          { name: "make", products: [{ species: "Z" }], rate: { kind: "constant", ratePerMinute: b }, scaledBy: "X" },
          { name: "deg", reactants: [{ species: "Z" }], rate: { kind: "massAction", ratePerMinute: a } },
        ],
        outputSpecies: "Z",
      },
      // X stepped ON at t = 3 (a switch inside the run); grid hits 3 + T1/2 exactly
      {
        program: { kind: "pulses", pulses: [{ start: 3, duration: 1000 }] },
        endTimeMinutes: 3 + tHalf,
        gridStepMinutes: (3 + tHalf) / 4,
      },
    );
    const sol = solveOde(spec);
    const ng = sol.times.length;
    for (let g = 0; g < ng; g++) {
      const t = sol.times[g];
      const expected = t <= 3 ? 0 : (b / a) * (1 - Math.exp(-a * (t - 3)));
      assertCloseTo(sol.values[g], expected, { rel: 1e-6, abs: 1e-9 }, `Z(${t})`);
    }
    assertCloseTo(sol.values[ng - 1], b / a / 2, { rel: 1e-6 }, "half of the steady state at T1/2");
  });

  test("C1-FFL AND: Y reaches Kyz at T_on = (1/a_y) ln(1/(1 - Kyz/Y_st)), no delay at OFF (closed form of the linear ODE; sign-sensitive delay: Mangan, Zaslaver & Alon 2003, J Mol Biol 334:197, from memory)", () => {
    const by = 10,
      ay = 0.05,
      kyz = 100;
    const yst = by / ay;
    const tOn = (1 / ay) * Math.log(1 / (1 - kyz / yst));
    const spec = makeSpec(
      {
        name: "c1ffl",
        species: [
          { name: "Y", initialCount: 0 },
          { name: "Z", initialCount: 0 },
        ],
        signals: [{ name: "X", offLevel: 0, onLevel: 1 }],
        reactions: [
          { name: "makeY", products: [{ species: "Y" }], rate: { kind: "constant", ratePerMinute: by }, scaledBy: "X" },
          { name: "degY", reactants: [{ species: "Y" }], rate: { kind: "massAction", ratePerMinute: ay } },
          {
            name: "makeZ",
            products: [{ species: "Z" }],
            rate: {
              kind: "regulated",
              maxRatePerMinute: 20,
              regulators: [{ source: "Y", effect: "activates", halfMax: kyz, hill: 4 }],
            },
            scaledBy: "X",
          },
          { name: "degZ", reactants: [{ species: "Z" }], rate: { kind: "massAction", ratePerMinute: 0.1 } },
        ],
        outputSpecies: "Z",
      },
      {
        program: { kind: "pulses", pulses: [{ start: 0, duration: 1000 }] },
        endTimeMinutes: tOn,
        gridStepMinutes: tOn,
      },
    );
    const sol = solveOde(spec);
    assertCloseTo(sol.values[1], kyz, { rel: 1e-6 }, "Y(T_on) = Kyz");
  });

  test("I1-FFL: Z reaches half its final level at T1/2 = (1/a_z) ln(2F/(2F-1)) < ln 2 / a_z (closed form of the linear ODE; acceleration: Mangan & Alon 2003, PNAS 100:11980, from memory)", () => {
    // Z made at b while the activator signal X is on (constant here); the repressor Y is a signal
    // stepped on at t_s = 20 > T1/2, dividing production by F = 1 + Y_on (K = 1, n = 1).
    const b = 20,
      az = 0.1,
      yOn = 4,
      tS = 20;
    const F = 1 + yOn;
    const tHalf = (1 / az) * Math.log((2 * F) / (2 * F - 1));
    assert.ok(tHalf < tS && tHalf < Math.log(2) / az);
    const circuit = {
      name: "i1ffl",
      species: [{ name: "Z", initialCount: 0 }],
      signals: [
        { name: "Y", offLevel: 0, onLevel: yOn },
        { name: "X", offLevel: 1, onLevel: 1 },
      ],
      reactions: [
        {
          name: "makeZ",
          products: [{ species: "Z" }],
          rate: {
            kind: "regulated" as const,
            maxRatePerMinute: b,
            regulators: [{ source: "Y", effect: "represses" as const, halfMax: 1, hill: 1 }],
          },
          scaledBy: "X",
        },
        { name: "degZ", reactants: [{ species: "Z" }], rate: { kind: "massAction" as const, ratePerMinute: az } },
      ],
      outputSpecies: "Z",
    };
    const program = { kind: "pulses" as const, pulses: [{ start: tS, duration: 10_000 }] };
    const half = solveOde(makeSpec(circuit, { program, endTimeMinutes: tHalf, gridStepMinutes: tHalf }));
    const zFinal = b / (az * F);
    assertCloseTo(half.values[1], zFinal / 2, { rel: 1e-6 }, "Z(T1/2) = Z_final / 2");
    const late = solveOde(makeSpec(circuit, { program, endTimeMinutes: 400, gridStepMinutes: 400 }));
    assertCloseTo(
      late.values[1],
      zFinal * (1 + (F - 1) * Math.exp(-az * (400 - tS))),
      { rel: 1e-6 },
      "Z after the repressor step",
    );
  });

  test("second-order decay 2A -> 0 at k: mean-field rate k A^2 / 2 gives A(t) = A0 / (1 + k A0 t) (stoichiometry 2; closed form)", () => {
    const k = 0.01,
      a0 = 100,
      t = 7;
    const spec = makeSpec(
      {
        name: "dimer",
        species: [{ name: "A", initialCount: a0 }],
        reactions: [
          { name: "pair", reactants: [{ species: "A", count: 2 }], rate: { kind: "massAction", ratePerMinute: k } },
        ],
        outputSpecies: "A",
      },
      { endTimeMinutes: t, gridStepMinutes: t },
    );
    // dA/dt = -2 * (k A^2 / 2) = -k A^2
    assertCloseTo(solveOde(spec).values[1], a0 / (1 + k * a0 * t), { rel: 1e-6 });
  });
});
