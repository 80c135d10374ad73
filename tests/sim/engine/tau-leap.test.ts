/**
 * Tau-leaping (APPROXIMATE; Cao, Gillespie & Petzold 2006, J Chem Phys
 * 124:044109) on a birth-death process with large counts: the mean and
 * variance at a time point match the exact Poisson law (Jahnke & Huisinga 2007)
 * within 4 standard errors plus the method's bias allowance (eps = 0.03 relative
 * change per leap; allowance 2% of the mean, common practice for eps = 0.03).
 */
import { test } from "node:test";
import assert from "node:assert/strict";
import { simulateChunk } from "@/sim";
import { makeSpec, samplesAtEnd, meanVar } from "./spec-helpers";

test("tau-leap birth-death: mean and variance close to the exact Poisson(k/g (1 - e^{-gt}))", () => {
  const k = 2000,
    g = 0.5,
    t = 6;
  const spec = makeSpec(
    {
      name: "bd",
      species: [{ name: "A", initialCount: 0 }],
      reactions: [
        { name: "make", products: [{ species: "A" }], rate: { kind: "constant", ratePerMinute: k } },
        { name: "decay", reactants: [{ species: "A" }], rate: { kind: "massAction", ratePerMinute: g } },
      ],
      outputSpecies: "A",
    },
    { endTimeMinutes: t, gridStepMinutes: t, replicates: 400, seed: "tau", method: "tauLeap" },
  );
  const [a] = samplesAtEnd(spec);
  const m = (k / g) * (1 - Math.exp(-g * t));
  const s = meanVar(a);
  assert.ok(Math.abs(s.mean - m) < 4 * Math.sqrt(m / a.length) + 0.02 * m, `mean ${s.mean} vs ${m}`);
  // variance of the sample variance of a Poisson: ~2 m^2 / N
  assert.ok(
    Math.abs(s.variance - m) < 4 * Math.sqrt((2 * m * m) / a.length) + 0.1 * m,
    `variance ${s.variance} vs ${m}`,
  );
  const r = simulateChunk(spec, 0, 5);
  assert.equal(r.method, "tauLeap");
  // far fewer steps than firings is the point of leaping; events still count firings
  assert.ok(r.events > 5 * m);
});
