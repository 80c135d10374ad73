import { test, describe } from "node:test";
import assert from "node:assert/strict";
import { fitLogisticPass } from "@/sim/stats/logistic-fit";
import { assertCloseTo } from "@/tests/helpers/close-to";

describe("logistic fit of pass against log duration", () => {
  test("data symmetric about 4 min on the log scale give d50 = 4 exactly (symmetry of the likelihood)", () => {
    const fit = fitLogisticPass(
      [1, 2, 4, 8, 16].map((duration, i) => ({ duration, trials: 20, passed: [2, 5, 10, 15, 18][i] })),
    );
    assert.ok(fit.converged);
    assertCloseTo(fit.d50!, 4, { rel: 1e-9 });
    assert.ok(fit.d50Ci![0] < 4 && fit.d50Ci![1] > 4);
    assert.equal(fit.d50Note, null);
    assertCloseTo(fit.slopeAtD50PerMinute!, fit.slopePerLogMinute! / 16, { rel: 1e-12 });
  });

  test("the estimate solves the score equations (definition of the binomial MLE; McCullagh & Nelder 1989)", () => {
    const data = [
      { duration: 1, trials: 30, passed: 1 },
      { duration: 3, trials: 25, passed: 6 },
      { duration: 5, trials: 40, passed: 22 },
      { duration: 12, trials: 18, passed: 16 },
      { duration: 30, trials: 10, passed: 10 },
    ];
    const fit = fitLogisticPass(data);
    let s0 = 0,
      s1 = 0;
    for (const g of data) {
      const x = Math.log(g.duration);
      const p = 1 / (1 + Math.exp(-(fit.intercept! + fit.slopePerLogMinute! * x)));
      s0 += g.passed - g.trials * p;
      s1 += (g.passed - g.trials * p) * x;
    }
    assertCloseTo(s0, 0, { abs: 1e-8 });
    assertCloseTo(s1, 0, { abs: 1e-8 });
  });

  test("recovers a known curve from very large counts (d50 = 6 min, slope 3 per log-minute)", () => {
    const n = 1_000_000;
    const data = [1, 2, 4, 6, 9, 15, 30].map((duration) => {
      const p = 1 / (1 + Math.exp(-3 * (Math.log(duration) - Math.log(6))));
      return { duration, trials: n, passed: Math.round(n * p) };
    });
    const fit = fitLogisticPass(data);
    // rounding to whole counts moves p by at most 5e-7: d50 within 1e-4 relative
    assertCloseTo(fit.d50!, 6, { rel: 1e-4 });
    assertCloseTo(fit.slopePerLogMinute!, 3, { rel: 1e-3 });
  });

  test("plain-words notes when d50 cannot be estimated", () => {
    const g = (duration: number, trials: number, passed: number) => ({ duration, trials, passed });
    const sep = fitLogisticPass([g(1, 10, 0), g(2, 10, 0), g(10, 10, 10)]);
    assert.equal(sep.d50, null);
    assert.match(
      sep.d50Note!,
      /separate completely: every pulse of 2 min or shorter failed and every pulse of 10 min or longer passed/,
    );
    const quasi = fitLogisticPass([g(1, 10, 0), g(5, 10, 4), g(10, 10, 10)]);
    assert.equal(quasi.d50, null);
    assert.match(quasi.d50Note!, /except at 5 min \(4 of 10 passed\)/);
    const high = fitLogisticPass([g(1, 10, 6), g(5, 10, 9), g(10, 10, 10)]);
    assert.equal(high.d50, null);
    assert.match(high.d50Note!, /stay above 50%/);
    const low = fitLogisticPass([g(1, 10, 0), g(5, 10, 1), g(10, 10, 3)]);
    assert.match(low.d50Note!, /stay below 50%/);
    assert.match(fitLogisticPass([g(3, 10, 5)]).d50Note!, /at least two distinct/);
    assert.match(fitLogisticPass([g(3, 10, 10), g(4, 5, 5)]).d50Note!, /Every pulse passed/);
    assert.match(fitLogisticPass([g(3, 10, 0), g(4, 5, 0)]).d50Note!, /No pulse passed/);
  });
});
