import { test, describe } from "node:test";
import * as ss from "simple-statistics";
import { normalCdf, normalUpperTail, normalTwoSidedP, erfc, Z_95 } from "@/sim/stats/normal-distribution";
import { wilson } from "@/sim/stats/wilson-interval";
import { assertCloseTo } from "@/tests/helpers/close-to";
import assert from "node:assert/strict";

describe("normal distribution", () => {
  test("known values of the standard normal", () => {
    // Abramowitz & Stegun 1964, Table 26.1 (from memory): Phi(1) = 0.8413447461, Phi(1.959964) = 0.975
    assertCloseTo(normalCdf(1), 0.8413447460685429, { abs: 1e-13 });
    assertCloseTo(normalCdf(Z_95), 0.975, { abs: 1e-13 });
    assertCloseTo(normalCdf(0), 0.5, { abs: 1e-15 });
    // upper tail at 5 sd: 2.8665157e-7 (A&S Table 26.1, from memory), relative accuracy in the tail
    assertCloseTo(normalUpperTail(5), 2.866515718791939e-7, { rel: 1e-9 });
    // erfc(3) = 2.209049699858544e-5 across the series / continued-fraction switch (A&S Table 7.1, from memory)
    assertCloseTo(erfc(3), 2.209049699858544e-5, { rel: 1e-10 });
    assertCloseTo(erfc(2.9999999), 2.209049699858544e-5, { rel: 1e-5 });
    assertCloseTo(normalTwoSidedP(Z_95), 0.05, { abs: 1e-12 });
  });

  test("agrees with simple-statistics' error function (independent reference, its stated accuracy 1.2e-7)", () => {
    for (let x = -4; x <= 4; x += 0.37) {
      assertCloseTo(1 - erfc(x), ss.errorFunction(x), { abs: 2e-7 }, `erf(${x})`);
    }
    // simple-statistics' standard normal table is rounded to 4 decimals
    for (let z = -3; z <= 3; z += 0.25) {
      assertCloseTo(normalCdf(z), ss.cumulativeStdNormalProbability(z), { abs: 1.01e-4 }, `Phi(${z})`);
    }
  });
});

describe("Wilson score interval", () => {
  test("50 of 100 at 95% is [0.4038, 0.5962] (Wilson 1927, JASA 22:209)", () => {
    const [lo, hi] = wilson(50, 100);
    assertCloseTo(lo, 0.4038, { abs: 5e-5 });
    assertCloseTo(hi, 0.5962, { abs: 5e-5 });
  });

  test("Newcombe 1998 (Stat Med 17:857, Table I, Wilson score method without correction; from memory)", () => {
    const cases: [number, number, number, number][] = [
      [81, 263, 0.2553, 0.3662],
      [15, 148, 0.0624, 0.1605],
      [0, 20, 0, 0.1611],
      [1, 29, 0.0061, 0.1718],
    ];
    for (const [k, n, lo, hi] of cases) {
      const ci = wilson(k, n);
      assertCloseTo(ci[0], lo, { abs: 6e-5 }, `${k}/${n} lower`);
      assertCloseTo(ci[1], hi, { abs: 6e-5 }, `${k}/${n} upper`);
    }
  });

  test("closed form at the ends: 0 of n gives [0, z^2/(n+z^2)], n of n gives [n/(n+z^2), 1]", () => {
    const z2 = Z_95 * Z_95;
    assert.deepEqual(wilson(0, 10), [0, z2 / (10 + z2)]);
    const [lo, hi] = wilson(10, 10);
    assertCloseTo(lo, 10 / (10 + z2), { abs: 1e-15 });
    assert.equal(hi, 1);
    assert.deepEqual(wilson(0, 0), [0, 1]);
    assert.throws(() => wilson(3, 2));
  });
});
