/**
 * Whole distributions at a time point against exact CME solutions, one sample
 * per replicate, fixed seeds. Chi-square at the 0.1% level (see spec-helpers).
 * Means/Fano factors within 4 standard errors, the SE estimated from the same
 * samples (SE of a variance: sqrt((m4 - s^4)/N)).
 */
import { test, describe } from "node:test";
import assert from "node:assert/strict";
import { makeSpec, samplesAtEnd, assertChiSquareFits, poissonPmf, binomialPmf, meanVar } from "./spec-helpers";

const birthDeath = (k: number, g: number, scaledBy?: string) => ({
  name: "birth-death",
  species: [{ name: "A", initialCount: 0 }],
  signals: [{ name: "S", offLevel: scaledBy ? 0 : 1, onLevel: 1 }],
  reactions: [
    {
      name: "make",
      products: [{ species: "A" }],
      rate: { kind: "constant" as const, ratePerMinute: k },
      ...(scaledBy ? { scaledBy } : {}),
    },
    { name: "decay", reactants: [{ species: "A" }], rate: { kind: "massAction" as const, ratePerMinute: g } },
  ],
  outputSpecies: "A",
});

describe("monomolecular systems (Jahnke & Huisinga 2007, J Math Biol 54:1)", () => {
  test("birth-death from 0: A(t) ~ Poisson((k/g)(1 - e^{-gt}))", () => {
    const k = 10,
      g = 0.1,
      t = 5;
    const spec = makeSpec(birthDeath(k, g), { endTimeMinutes: t, gridStepMinutes: t, replicates: 2000, seed: "bd-1" });
    const [a] = samplesAtEnd(spec);
    const m = (k / g) * (1 - Math.exp(-g * t));
    assertChiSquareFits(a, poissonPmf(m), 90, "birth-death");
    const s = meanVar(a);
    assert.ok(Math.abs(s.mean - m) < 4 * Math.sqrt(m / a.length), `mean ${s.mean} vs ${m}`);
  });

  test("birth-death with a switching production rate: A(t) ~ Poisson(m(t)), dm/dt = k(t) - g m", () => {
    // k = 10 on [0,2), 30 on [2,4) (pulse levels 1 and 3 of signal S), 0 after; g = 0.5; sample at t = 6
    const g = 0.5;
    const spec = makeSpec(birthDeath(10, g, "S"), {
      program: {
        kind: "pulses",
        pulses: [
          { start: 0, duration: 2, level: 1 },
          { start: 2, duration: 2, level: 3 },
        ],
      },
      endTimeMinutes: 6,
      gridStepMinutes: 6,
      replicates: 2000,
      seed: "bd-switch",
    });
    const [a] = samplesAtEnd(spec);
    const e = Math.exp(-2 * g);
    const m2 = (10 / g) * (1 - e);
    const m4 = m2 * e + (30 / g) * (1 - e);
    const m6 = m4 * e;
    assertChiSquareFits(a, poissonPmf(m6), 60, "switching birth-death");
    const s = meanVar(a);
    assert.ok(Math.abs(s.mean - m6) < 4 * Math.sqrt(m6 / a.length), `mean ${s.mean} vs ${m6}`);
  });

  test("pure decay: A(t) ~ Binomial(N, e^{-gt})", () => {
    const N = 50,
      g = 0.2,
      t = 3;
    const spec = makeSpec(
      {
        name: "decay",
        species: [{ name: "A", initialCount: N }],
        reactions: [{ name: "decay", reactants: [{ species: "A" }], rate: { kind: "massAction", ratePerMinute: g } }],
        outputSpecies: "A",
      },
      { endTimeMinutes: t, gridStepMinutes: t, replicates: 2000, seed: "decay" },
    );
    const [a] = samplesAtEnd(spec);
    assertChiSquareFits(a, binomialPmf(N, Math.exp(-g * t)), N, "pure decay");
  });

  test("isomerisation A <-> B: stationary A ~ Binomial(N, k_back/(k_fwd + k_back))", () => {
    const N = 30,
      kf = 1,
      kb = 0.5;
    const spec = makeSpec(
      {
        name: "isomerisation",
        species: [
          { name: "A", initialCount: N },
          { name: "B", initialCount: 0 },
        ],
        reactions: [
          {
            name: "fwd",
            reactants: [{ species: "A" }],
            products: [{ species: "B" }],
            rate: { kind: "massAction", ratePerMinute: kf },
          },
          {
            name: "back",
            reactants: [{ species: "B" }],
            products: [{ species: "A" }],
            rate: { kind: "massAction", ratePerMinute: kb },
          },
        ],
        outputSpecies: "A",
      },
      // relaxation rate kf + kb = 1.5/min: after 20 min the start is forgotten to e^-30
      { endTimeMinutes: 20, gridStepMinutes: 20, replicates: 2000, seed: "iso" },
    );
    const [a, b] = samplesAtEnd(spec);
    for (let i = 0; i < a.length; i++) assert.equal(a[i] + b[i], N, "conservation");
    assertChiSquareFits(a, binomialPmf(N, kb / (kf + kb)), N, "isomerisation");
  });
});

function assertFano(samples: Float64Array, mean: number, fano: number, label: string) {
  const s = meanVar(samples);
  const n = samples.length;
  const seMean = Math.sqrt(s.variance / n);
  assert.ok(Math.abs(s.mean - mean) < 4 * seMean, `${label}: mean ${s.mean} vs ${mean} (SE ${seMean})`);
  // Fano = var/mean; SE from the SE of the variance (m4 - s^4)/N and of the mean (delta method)
  const seVar = Math.sqrt(Math.max(0, s.m4 - s.variance ** 2) / n);
  const f = s.variance / s.mean;
  const seF = f * Math.sqrt((seVar / s.variance) ** 2 + (seMean / s.mean) ** 2);
  assert.ok(Math.abs(f - fano) < 4 * seF, `${label}: Fano ${f} vs ${fano} (SE ${seF})`);
}

describe("stationary noise of gene expression", () => {
  test("two-stage mRNA/protein: mean P = km kp/(gm gp), Fano = 1 + kp/(gm + gp) (Thattai & van Oudenaarden 2001, PNAS 98:8614)", () => {
    const km = 1,
      gm = 0.5,
      kp = 3,
      gp = 0.1;
    const meanP = (km * kp) / (gm * gp);
    const spec = makeSpec(
      {
        name: "two-stage",
        species: [
          { name: "M", initialCount: 2 },
          { name: "P", initialCount: 60 },
        ],
        reactions: [
          { name: "tx", products: [{ species: "M" }], rate: { kind: "constant", ratePerMinute: km } },
          { name: "mdeg", reactants: [{ species: "M" }], rate: { kind: "massAction", ratePerMinute: gm } },
          {
            name: "tl",
            reactants: [{ species: "M" }],
            products: [{ species: "M" }, { species: "P" }],
            rate: { kind: "massAction", ratePerMinute: kp },
          },
          { name: "pdeg", reactants: [{ species: "P" }], rate: { kind: "massAction", ratePerMinute: gp } },
        ],
        outputSpecies: "P",
      },
      // slowest relaxation gp = 0.1/min: 120 min = 12 lifetimes from a start at the mean
      { endTimeMinutes: 120, gridStepMinutes: 120, replicates: 1500, seed: "two-stage" },
    );
    const [, p] = samplesAtEnd(spec);
    assertFano(p, meanP, 1 + kp / (gm + gp), "two-stage");
  });

  test("telegraph gene: mean M = v kon/(d(kon+koff)), Fano = 1 + v koff/((kon+koff)(kon+koff+d)) (Peccoud & Ycart 1995, Theor Popul Biol 48:222)", () => {
    const kon = 0.2,
      koff = 0.3,
      v = 20,
      d = 1;
    const spec = makeSpec(
      {
        name: "telegraph",
        species: [
          { name: "Goff", initialCount: 1 },
          { name: "Gon", initialCount: 0 },
          { name: "M", initialCount: 0 },
        ],
        reactions: [
          {
            name: "on",
            reactants: [{ species: "Goff" }],
            products: [{ species: "Gon" }],
            rate: { kind: "massAction", ratePerMinute: kon },
          },
          {
            name: "off",
            reactants: [{ species: "Gon" }],
            products: [{ species: "Goff" }],
            rate: { kind: "massAction", ratePerMinute: koff },
          },
          {
            name: "tx",
            reactants: [{ species: "Gon" }],
            products: [{ species: "Gon" }, { species: "M" }],
            rate: { kind: "massAction", ratePerMinute: v },
          },
          { name: "deg", reactants: [{ species: "M" }], rate: { kind: "massAction", ratePerMinute: d } },
        ],
        outputSpecies: "M",
      },
      // slowest relaxation kon + koff = 0.5/min: 60 min = 30 relaxation times
      { endTimeMinutes: 60, gridStepMinutes: 60, replicates: 3000, seed: "telegraph" },
    );
    const [, , m] = samplesAtEnd(spec);
    assertFano(m, (v * kon) / (d * (kon + koff)), 1 + (v * koff) / ((kon + koff) * (kon + koff + d)), "telegraph");
  });
});
