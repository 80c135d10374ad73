/**
 * The fast kernel's logarithm of the waiting time, ln(1 - u), computed inline
 * and bit-identical to V8's Math.log for every argument the kernel can pass.
 *
 * Math.log in V8 is a C function (V8's port of fdlibm's __ieee754_log, Sun
 * Microsystems 1993) called out of the optimised JavaScript. The kernel's u is
 * an Alea output, tt - (tt | 0), always k * 2^-32 for an integer k in
 * [0, 2^32), so 1 - u = m * 2^-32 for an integer m in [1, 2^32]. The code below
 * is the same fdlibm algorithm with the same floating-point operations in the
 * same order, specialised to that domain: the exponent and the high fraction
 * word come from m with integer operations (Math.clz32 and shifts) instead of
 * reading the double's bits, and the subnormal, negative, infinite and NaN
 * branches are gone (they cannot occur). Any u outside the domain (not a
 * multiple of 2^-32, or u = 0, where m = 2^32) goes to Math.log itself, so the
 * result is Math.log(1 - u) whatever u is.
 *
 * Proof over the whole domain: scripts/verify-kernel-log.ts evaluates this very
 * source for all 2^32 values of m and counts the results that differ from
 * Math.log(m * 2^-32) in any bit (docs/benchmarks.md quotes the run); a
 * sampled check runs in tests/sim/engine/kernel-log.test.ts. The proof holds
 * for the V8 it ran on: should a later Node change Math.log, the bit-identity
 * tests of the fast against the reference kernel (which calls Math.log) fail.
 */

/** The locals the inline code uses (declared once at the top of the kernel). */
export const KERNEL_LOG_LOCALS =
  "lgM = 0.0, lgU = 0, lgZ = 0, lgW = 0, lgH = 0, lgI = 0, lgK = 0, lgF = 0.0, lgD = 0.0, lgS = 0.0, lgQ = 0.0, lgV = 0.0, lgR = 0.0, lgE = 0.0";

/**
 * Statements that set `out` to Math.log(1 - u), bit for bit, where `u` names a
 * local holding a number in [0, 1). Uses only the locals in KERNEL_LOG_LOCALS.
 */
export function kernelLogCode(u: string, out: string): string {
  // fdlibm's constants (ln2_hi, ln2_lo, Lg1..Lg7), written as the exact decimal expansions of their doubles
  const ln2Hi = "6.93147180369123816490e-01";
  const ln2Lo = "1.90821492927058770002e-10";
  const [lg1, lg2, lg3, lg4, lg5, lg6, lg7] = [
    "6.666666666666735130e-01",
    "3.999999999940941908e-01",
    "2.857142874366239149e-01",
    "2.222219843214978396e-01",
    "1.818357216161805012e-01",
    "1.531383769920937332e-01",
    "1.479819860511658591e-01",
  ];
  return [
    // m = (1 - u) * 2^32, exact for u = k * 2^-32
    `lgM = 4294967296 - ${u} * 4294967296; lgU = lgM >>> 0;`,
    `if (lgU !== lgM || lgU === 0) { ${out} = Math.log(1 - ${u}); } else {`,
    // 1 - u = 2^(31 - z - 32) * (w / 2^31) with w = m shifted up to bit 31; the fraction's top 20 bits: h
    `lgZ = Math.clz32(lgU); lgW = (lgU << lgZ) >>> 0; lgH = (lgW >>> 11) & 0xfffff;`,
    // fdlibm: normalise into [sqrt(2)/2, sqrt(2)): x (i = 0) or x/2 (i = 1); f = x - 1 (exact either way)
    `lgI = ((lgH + 0x95f64) >>> 20) & 1; lgK = lgI - 1 - lgZ;`,
    `lgF = lgW * (4.656612873077393e-10 - lgI * 2.3283064365386963e-10) - 1.0;`,
    `if ((0xfffff & (2 + lgH)) < 3) {`,
    `  if (lgF === 0) { if (lgK === 0) { ${out} = 0; } else { lgD = lgK; ${out} = lgD * ${ln2Hi} + lgD * ${ln2Lo}; } }`,
    `  else { lgR = lgF * lgF * (0.5 - 0.33333333333333333 * lgF); if (lgK === 0) { ${out} = lgF - lgR; } else { lgD = lgK; ${out} = lgD * ${ln2Hi} - ((lgR - lgD * ${ln2Lo}) - lgF); } }`,
    `} else {`,
    `  lgS = lgF / (2.0 + lgF); lgD = lgK; lgQ = lgS * lgS; lgV = lgQ * lgQ;`,
    `  lgR = lgQ * (${lg1} + lgV * (${lg3} + lgV * (${lg5} + lgV * ${lg7}))) + lgV * (${lg2} + lgV * (${lg4} + lgV * ${lg6}));`,
    // fdlibm's k = 0 forms (f - ...) equal the general ones at k = 0 bit for bit (the result is never zero here), so one form serves
    `  if (((lgH - 0x6147a) | (0x6b851 - lgH)) > 0) { lgE = 0.5 * lgF * lgF; ${out} = lgD * ${ln2Hi} - ((lgE - (lgS * (lgE + lgR) + lgD * ${ln2Lo})) - lgF); }`,
    `  else { ${out} = lgD * ${ln2Hi} - ((lgS * (lgF - lgR) - lgD * ${ln2Lo}) - lgF); }`,
    `}`,
    `}`,
  ].join("\n");
}

/** A standalone ln(1 - u) over the same source (for the proof script, tests and measurements). */
export function makeKernelLog(): (u: number) => number {
  return new Function(
    "u",
    `"use strict"; var r = 0.0, ${KERNEL_LOG_LOCALS};\n${kernelLogCode("u", "r")}\nreturn r;`,
  ) as (u: number) => number;
}
