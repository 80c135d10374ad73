/**
 * C1-FFL AND in the large-system limit (Kurtz 1972, J Chem Phys 57:2976): with
 * counts, K and zero-order rates scaled by the system size Omega = 1000, the
 * mean first time Y reaches Kyz tends to T_on (closed form of the linear ODE
 * Y(t) = Y_st (1 - e^{-a_y t}) solved for Y = Kyz) and the mean Z-crossing delay to the ODE's crossing time.
 * Tolerance: 4 standard errors of the mean delay (SE from the replicates' SD)
 * plus an O(1/Omega) finite-size allowance of T/Omega.
 */
import { test, describe } from "node:test";
import assert from "node:assert/strict";
import { simulateChunk, solveOde, pulseStatsFromSampledTrace } from "@/sim";
import { makeSpec, meanVar } from "./spec-helpers";

const omega = 1000;
const by = 0.1,
  ay = 0.05,
  kyz = 1; // concentration units per minute
const circuit = (output: "Y" | "Z") => ({
  name: "c1ffl-and",
  species: [
    { name: "Y", initialCount: 0 },
    { name: "Z", initialCount: 0 },
  ],
  signals: [{ name: "X", offLevel: 0, onLevel: 1 }],
  reactions: [
    {
      name: "makeY",
      products: [{ species: "Y" }],
      rate: { kind: "constant" as const, ratePerMinute: by },
      scaledBy: "X",
    },
    { name: "degY", reactants: [{ species: "Y" }], rate: { kind: "massAction" as const, ratePerMinute: ay } },
    {
      name: "makeZ",
      products: [{ species: "Z" }],
      rate: {
        kind: "regulated" as const,
        maxRatePerMinute: 0.5,
        regulators: [{ source: "Y", effect: "activates" as const, halfMax: kyz, hill: 4 }],
      },
      scaledBy: "X",
    },
    { name: "degZ", reactants: [{ species: "Z" }], rate: { kind: "massAction" as const, ratePerMinute: 0.1 } },
  ],
  outputSpecies: output,
});
const common = {
  program: { kind: "pulses" as const, pulses: [{ start: 0, duration: 1000 }] },
  endTimeMinutes: 60,
  gridStepMinutes: 60,
  replicates: 200,
  systemSize: omega,
};

function delays(spec: ReturnType<typeof makeSpec>): Float64Array {
  const r = simulateChunk(spec, 0, spec.replicates);
  const d = r.pulses.map((p) => {
    assert.ok(p.delay !== null, "every replicate responds within the run");
    return p.delay!;
  });
  return Float64Array.from(d);
}

describe("C1-FFL AND, SSA in the large-system limit", () => {
  test("mean first time Y reaches Kyz -> T_on", () => {
    const tOn = (1 / ay) * Math.log(1 / (1 - kyz / (by / ay)));
    const spec = makeSpec(circuit("Y"), {
      ...common,
      seed: "ffl-y",
      threshold: { value: kyz * omega, windowMinutes: 10 },
    });
    const s = meanVar(delays(spec));
    const se = Math.sqrt(s.variance / 200);
    assert.ok(Math.abs(s.mean - tOn) < 4 * se + tOn / omega, `mean ${s.mean} vs T_on ${tOn} (SE ${se})`);
  });

  test("mean Z-crossing delay -> the ODE's crossing time", () => {
    const theta = 1 * omega;
    const spec = makeSpec(circuit("Z"), { ...common, seed: "ffl-z", threshold: { value: theta, windowMinutes: 10 } });
    // ODE crossing on a fine grid, linear interpolation (error O(h^2) ~ 1e-5 min)
    const fine = makeSpec(circuit("Z"), {
      ...common,
      gridStepMinutes: 0.01,
      threshold: { value: theta, windowMinutes: 10 },
    });
    const ode = solveOde(fine);
    const ng = ode.times.length;
    const z = ode.values.subarray(ng, 2 * ng);
    const [odeStat] = pulseStatsFromSampledTrace(ode.times, z, [{ on: 0, off: 1000, durationBin: 1000 }], {
      theta,
      downTheta: theta * 0.8,
      windowMinutes: 10,
    });
    const tCross = odeStat.delay!;
    assert.ok(tCross > 10 && tCross < 40, `ODE crossing ${tCross}`);
    const s = meanVar(delays(spec));
    const se = Math.sqrt(s.variance / 200);
    assert.ok(Math.abs(s.mean - tCross) < 4 * se + tCross / omega, `mean ${s.mean} vs ODE ${tCross} (SE ${se})`);
  });
});
