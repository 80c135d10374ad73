import { test, describe } from "node:test";
import assert from "node:assert/strict";
import { passCurveD50 } from "@/sim/analysis/pass-curve-d50";
import { isotonicRegression } from "@/sim/stats/isotonic-regression";
import { chiSquareUpperTail } from "@/sim/stats/chi-square";
import { fitLogisticPass } from "@/sim/stats/logistic-fit";
import { logisticGoodnessOfFit } from "@/sim/stats/logistic-goodness-of-fit";
import { AleaStream } from "@/sim/random/alea-stream";
import { assertCloseTo } from "@/tests/helpers/close-to";

const curve = (durations: number[], trials: number, percent: number[]) =>
  durations.map((duration, i) => ({ duration, trials, passed: Math.round((trials * percent[i]) / 100) }));

describe("isotonic regression and chi-square tail", () => {
  test("pool-adjacent-violators pools violators into their weighted mean (Ayer et al. 1955, Ann Math Stat 26:641)", () => {
    assert.deepEqual(isotonicRegression([0.2, 0.6, 0.4, 0.9], [10, 10, 10, 10]), [0.2, 0.5, 0.5, 0.9]);
    // weights: (0.8*1 + 0.2*3) / 4 = 0.35, then 0.35 > 0.3 pools again: (0.35*4 + 0.3*4) / 8 = 0.325
    const f = isotonicRegression([0.1, 0.8, 0.2, 0.3], [1, 1, 3, 4]);
    assertCloseTo(f[0], 0.1, { abs: 1e-12 });
    for (const x of f.slice(1)) assertCloseTo(x, 0.325, { abs: 1e-12 });
  });
  test("chi-square upper tail at tabulated 5% points (any statistics handbook table)", () => {
    assertCloseTo(chiSquareUpperTail(3.841, 1), 0.05, { abs: 1e-4 });
    assertCloseTo(chiSquareUpperTail(9.488, 4), 0.05, { abs: 1e-4 });
    assertCloseTo(chiSquareUpperTail(18.307, 10), 0.05, { abs: 1e-4 });
    // df = 2 has the closed form exp(-x/2)
    assertCloseTo(chiSquareUpperTail(3, 2), Math.exp(-1.5), { rel: 1e-12 });
  });
});

describe("d50 from the monotone pass curve", () => {
  test("a curve linear in ln(duration) gives its exact d50 (p = 0.5 + 0.2 ln(d / 6 min), so d50 = 6 min)", () => {
    const durations = [2, 3, 4, 5, 7, 9, 12, 18];
    const n = 100_000;
    const counts = durations.map((d) => ({
      duration: d,
      trials: n,
      passed: Math.round(n * (0.5 + 0.2 * Math.log(d / 6))),
    }));
    const r = passCurveD50(counts);
    assert.equal(r.kind, "estimate");
    if (r.kind !== "estimate") return;
    assertCloseTo(r.d50, 6, { rel: 1e-3 });
    assert.equal(r.low, 5);
    assert.equal(r.high, 7);
  });

  test("the 95% interval covers the true d50 in at least 92% of 200 seeds (seen: 198 of 200, all estimates)", () => {
    // exact curve p(d) = 1 - exp(-ln 2 (d / 6)^2): d50 = 6 min exactly; 40 pulses per tried duration
    const durations = [1.5, 2, 3, 4, 5, 6.5, 8, 10, 14, 20];
    const p = (d: number) => 1 - Math.exp(-Math.LN2 * (d / 6) ** 2);
    let covered = 0;
    for (let seed = 0; seed < 200; seed++) {
      const u = new AleaStream(`pass-curve-${seed}`);
      const counts = durations.map((duration) => {
        let passed = 0;
        for (let i = 0; i < 40; i++) if (u.next() < p(duration)) passed++;
        return { duration, trials: 40, passed };
      });
      const r = passCurveD50(counts);
      if (r.kind === "estimate" && r.low <= 6 && 6 <= r.high) covered++;
    }
    assert.ok(covered >= 184, `covered ${covered} of 200`);
  });

  test("a gap around 50% is not estimable and names the durations", () => {
    const r = passCurveD50(curve([2, 3, 4, 5, 60], 200, [0, 0, 1, 2, 100]));
    assert.equal(r.kind, "not-estimable");
    if (r.kind !== "not-estimable") return;
    assert.deepEqual(r.between, [5, 60]);
    assert.match(r.reason, /no durations between 5 and 60 min/);
  });

  test("a plateau near 50% is stated in words: falling beyond sampling error, or within sampling error of 50%", () => {
    const big = passCurveD50(curve([5, 10, 20, 40, 80], 4000, [57, 56, 49, 46, 52]));
    assert.equal(big.kind, "plateau");
    if (big.kind === "plateau") assert.match(big.reason, /falls with longer pulses/);
    const small = passCurveD50(curve([5, 10, 20, 40, 80], 20, [45, 50, 50, 55, 55]));
    assert.equal(small.kind, "plateau");
    if (small.kind === "plateau") assert.match(small.reason, /near 50% within sampling error/);
  });

  test("a curve that never reaches 50% is not bracketed above the longest duration; one above 50% everywhere below the shortest", () => {
    const above = passCurveD50(curve([1, 2, 5, 10], 100, [5, 10, 20, 30]));
    assert.equal(above.kind, "not-bracketed");
    if (above.kind === "not-bracketed") {
      assert.equal(above.side, "above-longest");
      assert.equal(above.bound, 10);
      assert.match(above.reason, /Never reaches 50%/);
    }
    const below = passCurveD50(curve([1, 2, 5, 10], 100, [70, 80, 90, 100]));
    assert.equal(below.kind, "not-bracketed");
    if (below.kind === "not-bracketed") assert.equal(below.side, "below-shortest");
  });
});

describe("logistic smooth goodness of fit (Pearson chi-square on k-2 df; Agresti 2013, section 4.5)", () => {
  test("counts drawn from a logistic curve fit; a sharp step does not", () => {
    const durations = [1, 2, 4, 8, 16];
    const n = 1000;
    const logistic = durations.map((d) => ({
      duration: d,
      trials: n,
      passed: Math.round(n / (1 + Math.exp(-2 * Math.log(d / 4)))),
    }));
    const good = logisticGoodnessOfFit(logistic, fitLogisticPass(logistic).fitted)!;
    assert.equal(good.df, 3);
    assert.equal(good.poorFit, false);
    const step = curve(durations, n, [2, 3, 40, 97, 98]);
    const bad = logisticGoodnessOfFit(step, fitLogisticPass(step).fitted)!;
    assert.ok(bad.chiSquare > 100, `chi-square ${bad.chiSquare}`);
    assert.equal(bad.poorFit, true);
  });
});
