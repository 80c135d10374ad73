/**
 * The stochastic behaviour label (sim/regimes/classify-stochastic.ts) against
 * classic circuits (sources beside each check), in counts with system size
 * Omega = 100, fixed seeds, 8 replicates per ensemble (the default).
 */
import { test, describe } from "node:test";
import assert from "node:assert/strict";
import { compileModel } from "@/sim/circuit/compile-model";
import { classifyStochastic } from "@/sim/regimes";
import { acfRinging, amplitudeSpread, pooledAutocorrelation } from "@/sim/regimes/autocorrelation";
import { dwellTimes } from "@/sim/regimes/dwell-times";
import { setParameter, templates } from "@/sim";
import { feedbackTemplates } from "@/sim/circuit/templates";
import { assertCloseTo } from "@/tests/helpers/close-to";
import { mutualRepression, repressorRing } from "./circuits";

const OMEGA = 100;
// Hopf point of the ring of three at n = 3: a = 3 * 2^(1/3) (derived in classify-deterministic.test.ts)
const A_HOPF = 3 * 2 ** (1 / 3);
// Rayleigh envelope of a narrow-band Gaussian process: CV = sqrt(4/pi - 1) (Rice 1944, Bell Syst Tech J 23:282)
const RAYLEIGH_CV = Math.sqrt(4 / Math.PI - 1);

describe("stochastic regimes", () => {
  test("ring of three, n = 3, at 1.5 x its Hopf point: sustained oscillation, its amplitude held from cycle to cycle", () => {
    for (const seed of ["ring-above-1", "ring-above-2"]) {
      const v = classifyStochastic({ model: compileModel(repressorRing(1.5 * A_HOPF, 3), OMEGA), seed });
      assert.equal(v.label, "sustained oscillation", `${seed}: ${JSON.stringify(v.evidence)}`);
      assert.ok((v.evidence.amplitudeCv as number) <= 0.4);
      // period of order 2 pi / Im at the Hopf point (Im = sqrt 3 per turnover), lengthened by the
      // cycle's growth past it: between one and two times that value (a loose bound, common practice)
      const period = v.evidence.acfPeriodMinutes as number;
      assert.ok(period > (2 * Math.PI) / Math.sqrt(3) && period < (4 * Math.PI) / Math.sqrt(3), `period ${period}`);
    }
  });

  test("ring of three, n = 3, at 0.7 x its Hopf point: noise-driven quasi-cycles (McKane & Newman 2005, Phys Rev Lett 94:218102), low peak coherence", () => {
    const above = classifyStochastic({ model: compileModel(repressorRing(1.5 * A_HOPF, 3), OMEGA), seed: "ring-1" });
    for (const seed of ["ring-1", "ring-2"]) {
      const v = classifyStochastic({ model: compileModel(repressorRing(0.7 * A_HOPF, 3), OMEGA), seed });
      assert.equal(v.label, "damped oscillation", `${seed}: ${JSON.stringify(v.evidence)}`);
      assert.equal(v.evidence.quasiCycles, 1);
      // the amplitude spread is the Rayleigh envelope's: ~1,600 periods of data put the CV's sampling
      // error near 0.01; the band of 0.1 also covers the quasi-cycle's finite bandwidth (Rice's law is
      // exact only in the narrow-band limit)
      assertCloseTo(v.evidence.amplitudeCv as number, RAYLEIGH_CV, { abs: 0.1 }, seed);
      // one period later the quasi-cycle has lost much more of its correlation than the limit cycle
      assert.ok(
        (v.evidence.acfFirstPeak as number) < (above.evidence.acfFirstPeak as number) - 0.2,
        `coherence ${v.evidence.acfFirstPeak} vs ${above.evidence.acfFirstPeak}`,
      );
    }
  });

  test("mutual repression at a = 4 (twice the boundary a = 2; Cherry & Adler 2000, J Theor Biol 203:117), Omega = 100, where switching is rare: memory", () => {
    const v = classifyStochastic({ model: compileModel(mutualRepression(4), OMEGA), seed: "switch-1" });
    assert.equal(v.label, "memory", JSON.stringify(v.evidence));
    assert.ok((v.evidence.onDwellOverLifetimes as number) >= 10);
    assert.ok((v.evidence.longestOffDwellMinutes as number) >= 10 * (v.evidence.outputLifetimeMinutes as number));
  });

  test("mutual repression below its boundary (a = 1): one state under noise, no memory", () => {
    const v = classifyStochastic({ model: compileModel(mutualRepression(1), OMEGA), seed: "switch-2" });
    assert.notEqual(v.label, "memory", JSON.stringify(v.evidence));
  });

  test("same seed, same verdict; the seed reaches the ensemble", () => {
    const model = compileModel(repressorRing(0.7 * A_HOPF, 3), OMEGA);
    const a = classifyStochastic({ model, seed: "same" });
    assert.deepEqual(classifyStochastic({ model, seed: "same" }), a);
    assert.notDeepEqual(classifyStochastic({ model, seed: "other" }).evidence, a.evidence);
  });

  test("templates: i1ffl a pulse generator at its defaults and not with its repressor's K x 100; the latch and the ring keep their labels", () => {
    assert.equal(
      classifyStochastic({ model: compileModel(templates.i1ffl.circuit), seed: "t" }).label,
      "pulse generator",
    );
    const weak = setParameter(structuredClone(templates.i1ffl.circuit), "K(makeZ,hldB)", 4000);
    assert.notEqual(classifyStochastic({ model: compileModel(weak), seed: "t" }).label, "pulse generator");
    assert.equal(
      classifyStochastic({ model: compileModel(feedbackTemplates.latch.circuit), seed: "t" }).label,
      "memory",
    );
    assert.equal(
      classifyStochastic({ model: compileModel(feedbackTemplates.ring.circuit), seed: "t" }).label,
      "sustained oscillation",
    );
  });

  test("a pass curve that says so makes a steady circuit a persistence filter", () => {
    const v = classifyStochastic({
      model: compileModel(templates["c1ffl-and"].circuit),
      seed: "t",
      passCurve: [
        { durationMinutes: 2, passed: 0, counted: 40 },
        { durationMinutes: 60, passed: 40, counted: 40 },
      ],
    });
    assert.equal(v.label, "persistence filter");
  });

  test("a busy circuit over the event budget is unclear, with a reason", () => {
    const v = classifyStochastic({ model: compileModel(repressorRing(5, 3), OMEGA), seed: "b", eventBudget: 1000 });
    assert.equal(v.label, "unclear");
    assert.match(v.reason ?? "", /budget/);
  });
});

describe("ensemble statistics", () => {
  test("autocorrelation of a sampled cosine: biased estimator (1 - k/N) cos(w k) when N - k spans whole half-periods (Box & Jenkins 1976, section 2.1.5; the cross term sums to zero there)", () => {
    const N = 1000,
      P = 50;
    const y = Float64Array.from({ length: N }, (_, i) => Math.cos((2 * Math.PI * i) / P));
    const acf = pooledAutocorrelation([y], 200)!;
    for (const k of [25, 50, 100, 200])
      assertCloseTo(acf[k], (1 - k / N) * Math.cos((2 * Math.PI * k) / P), { abs: 1e-9 }, `lag ${k}`);
    const ring = acfRinging(acf);
    assert.equal(ring.troughLag, 25);
    assert.equal(ring.peakLag, 50);
    assert.equal(pooledAutocorrelation([new Float64Array(10).fill(3)], 3), null);
  });

  test("amplitude spread: a cosine traces a circle in quadrature (CV ~ 0)", () => {
    const y = Float64Array.from({ length: 1000 }, (_, i) => 100 + 40 * Math.cos((2 * Math.PI * i) / 40));
    const a = amplitudeSpread([y], 40, 1);
    assert.ok(a.cv < 1e-6, String(a.cv)); // round-off only
    assertCloseTo(a.mean, 40, { rel: 1e-9 });
  });

  test("dwell times with hysteresis; the last dwell is censored", () => {
    // up at 10, down at 8: on from sample 2 to 5 (3 samples), off to 8, then on till the end
    const y = Float64Array.from([0, 5, 10, 9, 9, 8, 0, 0, 12, 12]);
    const d = dwellTimes(y, 2, 10, 8);
    assert.deepEqual(d.off, [
      { minutes: 4, censored: false },
      { minutes: 6, censored: false },
    ]);
    assert.deepEqual(d.on, [
      { minutes: 6, censored: false },
      { minutes: 2, censored: true },
    ]);
  });
});
