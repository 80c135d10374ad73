import { test, describe as suite } from "node:test";
import assert from "node:assert/strict";
import * as ss from "simple-statistics";
import seedrandom from "seedrandom";
import { quantileSorted } from "@/sim/stats/quantile";
import { describe, describeInPlace, describeSorted, mean, medianInPlace, sampleVariance } from "@/sim/stats/describe";
import { mergeSorted } from "@/sim/stats/merge-sorted";
import { summarizeDelayTimes, summarizeDelayTimesInPlace } from "@/sim/analysis/delay-summary";
import { histogram, sturgesBinCount } from "@/sim/stats/histogram";
import { assertCloseTo } from "@/tests/helpers/close-to";

suite("quantiles and descriptive summary", () => {
  test("definition 7 of Hyndman & Fan 1996 on 1..10: 3.25, 5.5, 7.75 (worked by hand)", () => {
    const xs = [1, 2, 3, 4, 5, 6, 7, 8, 9, 10];
    assert.equal(quantileSorted(xs, 0.25), 3.25);
    assert.equal(quantileSorted(xs, 0.5), 5.5);
    assert.equal(quantileSorted(xs, 0.75), 7.75);
    assert.equal(quantileSorted(xs, 0), 1);
    assert.equal(quantileSorted(xs, 1), 10);
    assert.ok(Number.isNaN(quantileSorted([], 0.5)));
  });

  test("agrees with simple-statistics (quantile type 7, mean, sample sd; independent reference)", () => {
    const rng = seedrandom("describe");
    for (let rep = 0; rep < 10; rep++) {
      const xs = Array.from({ length: 2 + Math.floor(rng() * 40) }, () => rng() * 100 - 20);
      const d = describe(xs);
      assertCloseTo(d.mean!, ss.mean(xs), { rel: 1e-12 });
      assertCloseTo(d.sd!, ss.sampleStandardDeviation(xs), { rel: 1e-10 });
      assertCloseTo(sampleVariance(xs), ss.sampleVariance(xs), { rel: 1e-10 });
      for (const [p, key] of [
        [0.1, "q10"],
        [0.25, "q25"],
        [0.5, "median"],
        [0.75, "q75"],
        [0.9, "q90"],
      ] as const) {
        assertCloseTo(d[key]!, ss.quantile(xs, p), { abs: 1e-9 }, `${key}`);
      }
    }
  });

  test("empty and single-value samples give nulls, not NaN", () => {
    assert.equal(describe([]).mean, null);
    const one = describe([4]);
    assert.equal(one.mean, 4);
    assert.equal(one.sd, null);
    assert.ok(Number.isNaN(mean([])));
  });
});

suite("histogram", () => {
  test("counts, right-closed last bin, out-of-range values and Sturges' rule (Sturges 1926)", () => {
    const h = histogram([0, 1, 1, 2], { binCount: 2 });
    assert.deepEqual(h.edges, [0, 1, 2]);
    assert.deepEqual(h.counts, [1, 3]);
    const fixed = histogram([-1, 0.5, 3, 9], { binCount: 3, min: 0, max: 3 });
    assert.deepEqual(fixed.counts, [1, 0, 1]);
    assert.equal(fixed.below, 1);
    assert.equal(fixed.above, 1);
    assert.equal(sturgesBinCount(100), 8);
    assert.equal(
      histogram([5, 5, 5]).counts.reduce((s, c) => s + c, 0),
      3,
    );
  });
});

suite("summaries of samples sorted in place (the run summary's Float64Arrays)", () => {
  test("describeInPlace, medianInPlace and summarizeDelayTimesInPlace equal the copying versions", () => {
    const rng = seedrandom("in-place");
    for (let rep = 0; rep < 30; rep++) {
      const n = Math.floor(rng() * 60);
      // ties, -0 beside 0, and wide magnitudes
      const xs = Array.from({ length: n }, () =>
        rng() < 0.2 ? [0, -0, 1, 2.5][Math.floor(rng() * 4)] : (rng() - 0.4) * 10 ** (rng() * 6 - 2),
      );
      assert.deepStrictEqual(describeInPlace(Float64Array.from(xs)), describe(xs));
      assert.ok(Object.is(medianInPlace(Float64Array.from(xs)), describe(xs).median));
      const censored = xs.filter((_, i) => i % 3 === 0).map(Math.abs);
      const observed = xs.filter((_, i) => i % 3 !== 0).map(Math.abs);
      assert.deepStrictEqual(
        summarizeDelayTimesInPlace(Float64Array.from(observed), Float64Array.from(censored)),
        summarizeDelayTimes(observed, censored),
      );
    }
    assert.throws(() => describeInPlace(Float64Array.from([1, NaN])), RangeError);
  });
});

suite("merging sorted samples", () => {
  test("mergeSorted equals sorting every value together, -0 before 0 included", () => {
    const rng = seedrandom("merge-sorted");
    for (let rep = 0; rep < 40; rep++) {
      const parts = Array.from({ length: Math.floor(rng() * 7) }, () =>
        Float64Array.from({ length: Math.floor(rng() * 30) }, () =>
          rng() < 0.3 ? [0, -0, 1, -2][Math.floor(rng() * 4)] : (rng() - 0.5) * 100,
        ).sort(),
      );
      const all = new Float64Array(parts.reduce((n, p) => n + p.length, 0));
      let o = 0;
      for (const p of parts) all.set(p, (o += p.length) - p.length);
      all.sort();
      const merged = mergeSorted(parts);
      assert.equal(merged.length, all.length);
      for (let i = 0; i < all.length; i++) assert.ok(Object.is(merged[i], all[i]), `${rep}[${i}]`);
      assert.deepStrictEqual(describeSorted(merged), describe([...all]));
    }
  });
});
