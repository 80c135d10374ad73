/**
 * The deterministic behaviour label against closed-form stability boundaries
 * of classic circuits (sources beside each check), in counts with system size
 * Omega = 100.
 */
import { test, describe } from "node:test";
import assert from "node:assert/strict";
import { compileModel } from "@/sim/circuit/compile-model";
import { classifyDeterministic } from "@/sim/regimes";
import { goodwin, mutualRepression, repressorRing } from "./circuits";

const OMEGA = 100;
const label = (c: Parameters<typeof compileModel>[0]) => classifyDeterministic({ model: compileModel(c, OMEGA) });

/** Bisection for u(1+u^n) = a (left side increasing in u). */
function symmetricLevel(a: number, n: number): number {
  let lo = 0,
    hi = Math.max(1, a);
  for (let i = 0; i < 200; i++) {
    const m = (lo + hi) / 2;
    if (m * (1 + m ** n) < a) lo = m;
    else hi = m;
  }
  return (lo + hi) / 2;
}

describe("deterministic regimes", () => {
  test("mutual repression (n = 2) is bistable exactly when a > 2 (Cherry & Adler 2000, J Theor Biol 203:117)", () => {
    for (const a of [1, 1.9]) assert.notEqual(label(mutualRepression(a)).label, "memory", `a = ${a}`);
    for (const a of [2.1, 4, 10]) {
      const v = label(mutualRepression(a));
      assert.equal(v.label, "memory", `a = ${a}`);
      assert.equal(v.evidence.offStableStates, 2);
    }
    assert.equal(label(mutualRepression(1.9)).label, "steady");
  });

  test("ring of three repressors: damped below, sustained above n u^n/(1+u^n) = 2 with u(1+u^n) = a (linear stability of the cyclic system, derived here)", () => {
    // Jacobian at the symmetric state: -I + circulant with -g on the cyclic
    // entries, g = n a u^(n-1)/(1+u^n)^2 = n u^n/(1+u^n) (using a = u(1+u^n)).
    // Eigenvalues -1 - g w with w^3 = 1; the complex pair has real part -1 + g/2,
    // so stability is lost at g = 2: u^n = 2/(n-2), a = u (1 + u^n).
    for (const n of [3, 4]) {
      const un = 2 / (n - 2);
      const aHopf = un ** (1 / n) * (1 + un);
      if (n === 3) assert.ok(Math.abs(aHopf - 3 * 2 ** (1 / 3)) < 1e-12);
      if (n === 4) assert.ok(Math.abs(aHopf - 2) < 1e-12);
      const u = symmetricLevel(aHopf, n);
      assert.ok(Math.abs((n * u ** n) / (1 + u ** n) - 2) < 1e-9);
      const below = label(repressorRing(0.95 * aHopf, n));
      assert.equal(below.label, "damped oscillation", `n = ${n}, a = 0.95 a_Hopf: ${JSON.stringify(below)}`);
      const above = label(repressorRing(1.05 * aHopf, n));
      assert.equal(above.label, "sustained oscillation", `n = ${n}, a = 1.05 a_Hopf: ${JSON.stringify(above)}`);
      // period of the small cycle near the Hopf point: 2 pi / Im, Im = g sqrt(3)/2 = sqrt(3)
      const period = above.evidence.periodMinutes as number;
      assert.ok(Math.abs(period - (2 * Math.PI) / Math.sqrt(3)) < 0.1 * period, `period ${period}`);
    }
  });

  test("ring of three with n = 2 never oscillates for ever (g = 2u^2/(1+u^2) < 2)", () => {
    for (const a of [0.5, 3, 30, 1000])
      assert.notEqual(label(repressorRing(a, 2)).label, "sustained oscillation", `a = ${a}`);
  });

  test("Goodwin loop: no sustained oscillation for n <= 8 (secant condition, Tyson & Othmer 1978, Prog Theor Biol 5:1; Thron 1991, Bull Math Biol 53:383), oscillates at n = 9, a = 100", () => {
    for (const n of [2, 4, 8])
      for (let e = -1; e <= 4; e++) {
        const v = label(goodwin(10 ** e, n));
        assert.notEqual(v.label, "sustained oscillation", `n = ${n}, a = 1e${e}`);
        assert.notEqual(v.label, "unclear", `n = ${n}, a = 1e${e}: ${v.reason}`);
      }
    assert.equal(label(goodwin(100, 9)).label, "sustained oscillation");
  });
});
