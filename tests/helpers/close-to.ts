/**
 * Approximate comparison for numerical tests: passes when
 * |actual - expected| <= max(abs, rel * |expected|). Give at least one tolerance.
 */
import assert from "node:assert/strict";

export function assertCloseTo(
  actual: number,
  expected: number,
  tolerance: { abs?: number; rel?: number },
  message?: string,
): void {
  const abs = tolerance.abs ?? 0;
  const rel = tolerance.rel ?? 0;
  if (abs === 0 && rel === 0) throw new Error("assertCloseTo needs abs or rel tolerance");
  const allowed = Math.max(abs, rel * Math.abs(expected));
  const ok = Number.isFinite(actual) ? Math.abs(actual - expected) <= allowed : actual === expected;
  assert.ok(ok, `${message ? message + ": " : ""}expected ${expected} (+/- ${allowed}), got ${actual}`);
}
