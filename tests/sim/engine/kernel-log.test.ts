/**
 * The fast kernel's inline ln(1 - u) (sim/engine/kernel-log.ts) against
 * Math.log, bit for bit, on a sample of its domain u = (2^32 - m) * 2^-32,
 * m in [1, 2^32]: a stride over the whole range, random m, and the edges of
 * fdlibm's branches (e_log.c, Sun Microsystems 1993: powers of two where
 * f = 0, |f| < 2^-20 around them, the sqrt(2) normalisation boundary, the
 * window 0x6147a..0x6b851 of the high fraction word that picks the more
 * accurate form). The whole domain is checked by scripts/verify-kernel-log.ts.
 */
import { describe, test } from "node:test";
import assert from "node:assert/strict";
import { KERNEL_LOG_LOCALS, kernelLogCode, makeKernelLog } from "@/sim/engine/kernel-log";
import { AleaStream } from "@/sim/random/alea-stream";

const TWO32 = 4294967296;
const kernelLog = makeKernelLog();
const bits = new Float64Array(2);
const words = new BigUint64Array(bits.buffer);

/** Mismatching m (at most a few) among the given ones. */
function mismatches(ms: Iterable<number>): { checked: number; bad: number[] } {
  let checked = 0;
  const bad: number[] = [];
  for (const m of ms) {
    const u = (TWO32 - m) * 2.3283064365386963e-10;
    bits[0] = kernelLog(u);
    bits[1] = Math.log(1 - u);
    checked++;
    if (words[0] !== words[1] && bad.length < 5) bad.push(m);
  }
  return { checked, bad };
}

/** m whose double m * 2^-32 has the high fraction word h (20 bits) and exponent e (2^e <= m < 2^(e+1)), low bits lo. */
function withHighWord(e: number, h: number, lo: number): number {
  // m = 2^e * (1 + h / 2^20 + lo / 2^(20 + (e - 20))) for e >= 20
  return 2 ** e + h * 2 ** (e - 20) + lo;
}

describe("inline log: bit-identical to Math.log", () => {
  test("a stride over the whole domain (about 2.1 million m)", () => {
    function* stride() {
      for (let m = 1; m <= TWO32; m += 2039) yield m;
    }
    const r = mismatches(stride());
    assert.ok(r.checked > 2_000_000);
    assert.deepEqual(r.bad, []);
  });

  test("1.5 million random m (fixed seed)", () => {
    const rng = new AleaStream("kernel-log-test");
    function* random() {
      for (let i = 0; i < 1_500_000; i++) yield 1 + Math.floor(rng.next() * TWO32);
    }
    assert.deepEqual(mismatches(random()).bad, []);
  });

  test("edges: m = 1, 2^32 (u = 0), powers of two and their neighbours, small m", () => {
    const ms: number[] = [];
    for (let m = 1; m <= 70_000; m++) ms.push(m);
    for (let e = 0; e <= 32; e++)
      for (let d = -4096; d <= 4096; d++) if (2 ** e + d >= 1 && 2 ** e + d <= TWO32) ms.push(2 ** e + d);
    for (let m = TWO32 - 70_000; m <= TWO32; m++) ms.push(m);
    const r = mismatches(ms);
    assert.deepEqual(r.bad, []);
    assert.ok(ms.includes(1) && ms.includes(TWO32));
  });

  test("near the sqrt(2) normalisation boundary and the accurate-form window", () => {
    const ms: number[] = [];
    // the boundary: h + 0x95f64 crosses 0x100000 at h = 0x6a09c/0x6a09d; the window edges 0x6147a and 0x6b851
    for (const h0 of [0x6a09c, 0x6a09d, 0x6147a, 0x6b851])
      for (let e = 20; e <= 31; e++)
        for (let dh = -3; dh <= 3; dh++)
          for (let lo = 0; lo < Math.min(2 ** (e - 20), 512); lo++) ms.push(withHighWord(e, h0 + dh, lo));
    for (let e = 20; e <= 31; e++)
      for (let dh = -3; dh <= 3; dh++)
        for (let lo = 2 ** (e - 20) - 512; lo < 2 ** (e - 20); lo++)
          if (lo >= 0) for (const h0 of [0x6a09c, 0x6147a, 0x6b851]) ms.push(withHighWord(e, h0 + dh, lo));
    const r = mismatches(ms.filter((m) => m >= 1 && m <= TWO32));
    assert.ok(r.checked > 100_000);
    assert.deepEqual(r.bad, []);
  });

  test("the sample has power: the routine with fdlibm's Lg1 one ulp off is caught", () => {
    const src = kernelLogCode("u", "r");
    const wrong = src.replaceAll("6.666666666666735130e-01", "6.66666666666673624064e-01");
    assert.notEqual(wrong, src);
    const perturbed = new Function("u", `"use strict"; var r = 0.0, ${KERNEL_LOG_LOCALS};\n${wrong}\nreturn r;`) as (
      u: number,
    ) => number;
    assert.notEqual(6.66666666666673513e-1, 6.66666666666673624064e-1);
    let caught = 0;
    for (let m = 1; m <= TWO32; m += 104729) {
      const u = (TWO32 - m) * 2.3283064365386963e-10;
      if (perturbed(u) !== Math.log(1 - u)) caught++;
    }
    assert.ok(caught > 0, "a wrong constant must show up in a strided sample");
  });

  test("outside the domain (u not a multiple of 2^-32) the fallback is Math.log itself", () => {
    for (const u of [1e-12, 0.1, 0.5 + 2 ** -40, 0.999999999999]) assert.equal(kernelLog(u), Math.log(1 - u));
  });
});
