import { test } from "node:test";
import assert from "node:assert/strict";
import {
  formatBytes,
  formatCount,
  formatFactor,
  formatInterval,
  formatNumber,
  formatPValue,
  formatProbability,
  formatQuantity,
  formatReached,
  formatScientific,
  formatSeconds,
} from "@/shared/number-format";

// The rules under test are Linger's own (docs/metrics.md, "How numbers are written").

test("three significant figures, trailing zeros dropped, separators", () => {
  assert.equal(formatNumber(12.345), "12.3");
  assert.equal(formatNumber(12), "12");
  assert.equal(formatNumber(0.5), "0.5");
  assert.equal(formatNumber(9.996), "10");
  assert.equal(formatNumber(12345), "12,300");
  assert.equal(formatNumber(838000), "8.38 × 10⁵");
  assert.equal(formatNumber(-2.5), "-2.5");
  assert.equal(formatNumber(1.23456, 5), "1.2346");
  assert.equal(formatNumber(0), "0");
});

test("scientific notation outside [0.001, 100000) with a superscript exponent, never e-notation", () => {
  assert.equal(formatNumber(0.000478), "4.78 × 10⁻⁴");
  assert.equal(formatNumber(0.001), "0.001");
  assert.equal(formatNumber(123456), "1.23 × 10⁵");
  assert.equal(formatScientific(-0.0000125, 2), "-1.3 × 10⁻⁵");
  for (const v of [1e-9, 3.3e-7, 4.78e-4, 2e5, 7.7e12]) assert.doesNotMatch(formatNumber(v), /e/i);
});

test("undefined figures are a dash, never 0 or NaN", () => {
  assert.equal(formatNumber(null), "–");
  assert.equal(formatNumber(undefined), "–");
  assert.equal(formatNumber(NaN), "–");
  assert.equal(formatNumber(Infinity), "–");
  assert.equal(formatQuantity(null, "min"), "–");
  assert.equal(formatCount(null), "–");
});

test("units always shown", () => {
  assert.equal(formatQuantity(22.54, "min"), "22.5 min");
  assert.equal(formatQuantity(40, "molecules"), "40 molecules");
  assert.equal(formatQuantity(0.00021, "min"), "2.1 × 10⁻⁴ min");
  assert.equal(formatReached(null, "min"), "not reached");
  assert.equal(formatReached(40.44, "min"), "40.4 min");
});

test("probabilities: percent from 0.1%, a scientific fraction below, 0%", () => {
  assert.equal(formatProbability(0.4783), "47.8%");
  assert.equal(formatProbability(1), "100%");
  assert.equal(formatProbability(0), "0%");
  assert.equal(formatProbability(0.0012), "0.12%");
  assert.equal(formatProbability(0.001), "0.1%");
  assert.equal(formatProbability(0.000478), "4.8 × 10⁻⁴");
  assert.equal(formatProbability(null), "–");
  for (const p of [1e-5, 4.78e-6, 0.0009999]) {
    const s = formatProbability(p);
    assert.doesNotMatch(s, /%/);
    assert.doesNotMatch(s, /e/);
  }
});

test("intervals: open ends in words once, the unit once", () => {
  assert.equal(formatInterval([19.4, 26.2], "min"), "95% CI 19.4–26.2 min");
  assert.equal(formatInterval([null, null], "min"), "95% CI not reached");
  assert.equal(formatInterval([40.3, null], "min"), "95% CI 40.3 min to not reached");
  assert.equal(formatInterval([null, 12], "min"), "95% CI not reached to 12 min");
  assert.equal(formatInterval([0.4038, 0.5962], "%"), "95% CI 40.4%–59.6%");
  assert.equal(formatInterval([0, 0.0003], "%"), "95% CI 0%–3 × 10⁻⁴");
  assert.equal(formatInterval(null, "min"), "95% CI –");
  assert.doesNotMatch(formatInterval([null, null], "min"), /not reached.*not reached/);
});

test("counts and p-values", () => {
  assert.equal(formatCount(838000), "838,000");
  assert.equal(formatCount(2004), "2,004");
  assert.equal(formatPValue(0.0004), "p < 0.001");
  assert.equal(formatPValue(0.0342), "p = 0.034");
});

test("factors, file sizes and lengths of time carry their unit", () => {
  assert.equal(formatFactor(2.3456), "2.35×");
  assert.equal(formatFactor(null), "–");
  assert.equal(formatBytes(0), "0 kB");
  assert.equal(formatBytes(100), "1 kB");
  assert.equal(formatBytes(12_595), "12.3 kB");
  assert.equal(formatBytes(1.5 * 1024 * 1024), "1.5 MB");
  assert.equal(formatSeconds(44.6), "45 s");
  assert.equal(formatSeconds(12.4 * 60), "12 min");
  assert.equal(formatSeconds(5400), "1.5 h");
  assert.equal(formatSeconds(undefined), "–");
});
