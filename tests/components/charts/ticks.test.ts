import { test } from "node:test";
import assert from "node:assert/strict";
import { niceLinearTicks, niceLogTicks } from "@/components/charts/ticks";

// The 1-2-5 tick sequence is common practice in scientific plotting.

test("log ticks follow 1, 2, 5, 10 and stay inside the range", () => {
  assert.deepEqual(niceLogTicks(0.8, 90), [1, 2, 5, 10, 20, 50]);
  assert.deepEqual(niceLogTicks(1, 80), [1, 2, 5, 10, 20, 50]);
  assert.deepEqual(niceLogTicks(0.05, 2), [0.05, 0.1, 0.2, 0.5, 1, 2]);
  // Never the 3.16 / 31.6 / 3.98 ticks of evenly spaced log10 values.
  const ticks = niceLogTicks(2, 60.5);
  assert.deepEqual(ticks, [2, 5, 10, 20, 50]);
  for (const v of niceLogTicks(0.003, 7000)) {
    const mantissa = Math.round((v / Math.pow(10, Math.floor(Math.log10(v) + 1e-9))) * 1000) / 1000;
    assert.ok([1, 2, 5].includes(mantissa), `${v} is not 1, 2 or 5 times a power of ten`);
  }
});

test("log ticks thin out over many decades", () => {
  assert.deepEqual(niceLogTicks(1, 1e6), [1, 10, 100, 1000, 10000, 100000, 1e6]);
  const many = niceLogTicks(1e-3, 1e9, 6);
  assert.ok(many.length <= 6 && many.length >= 2);
  assert.equal(many[0], 0.001);
});

test("a narrow log range with no nice tick returns its ends", () => {
  assert.deepEqual(niceLogTicks(3, 4), [3, 4]);
  assert.deepEqual(niceLogTicks(0, 10), []);
});

test("linear ticks at 1, 2 or 5 times a power of ten, without round-off", () => {
  assert.deepEqual(niceLinearTicks(0, 1), [0, 0.2, 0.4, 0.6, 0.8, 1]);
  assert.deepEqual(niceLinearTicks(0, 240, 5), [0, 50, 100, 150, 200]);
  assert.deepEqual(niceLinearTicks(0.1, 0.35, 5), [0.1, 0.15, 0.2, 0.25, 0.3, 0.35]);
  assert.deepEqual(niceLinearTicks(5, 5), [5]);
});
