/**
 * Generates the per-circuit inner loop of the exact direct method (Gillespie
 * 1976, J Comput Phys 22:403; 1977, J Phys Chem 81:2340) with
 * - a dependency graph: after a firing only the propensities reading a changed
 *   species are recomputed (Gibson & Bruck 2000, J Phys Chem A 104:1876);
 * - exact piecewise-constant inputs: when the drawn event time passes the next
 *   switch time the clock moves to the switch, the signal changes, the affected
 *   propensities are recomputed and a new time is drawn (exact by the
 *   memorylessness of the exponential waiting time);
 * - waiting time tau = -ln(1 - u1)/a0 with u1 in [0, 1); reaction j is the first
 *   whose cumulative propensity exceeds u2*a0 (round-off fallback: the last
 *   with non-zero propensity);
 * - the Alea generator of seedrandom stepped inline (same sequence as
 *   seedrandom.alea), species, propensities and parameters in local variables,
 *   no allocation per event;
 * - grid recording, online crossing detection (PulseTracker.push on every
 *   change of the output) and optional event recording.
 *
 * The source is built only from the compiled model's indices and the numeric
 * flags below (integer Hill exponents, zero leak); no user text reaches it.
 * Parameter values are read from the parameter vector at entry, so one kernel
 * serves every replicate and extrinsic draw.
 */
import type { PulseTracker } from "@/sim/metrics/pulse-tracker";
import type { CompiledModel } from "@/sim/circuit/compile-model";
import type { EventRecorder } from "./event-recorder";

/** In/out state of one kernel call. */
export class KernelContext {
  t = 0;
  tEnd = 0;
  switchTimes: Float64Array = new Float64Array(0);
  switchLevels: Float64Array = new Float64Array(0);
  switchIndex = 0;
  gridTimes: Float64Array = new Float64Array(0);
  gridIndex = 0;
  /** [species][grid] values of this replicate, or null when gridTimes is empty. */
  gridBuf: Float64Array | null = null;
  tracker: PulseTracker | null = null;
  recorder: EventRecorder | null = null;
  eventCap = Infinity;
  events = 0;
  /** 0 finished, 1 stopped at the event cap, 2 aborted by the checkpoint. */
  status = 0;
  checkpoint: (() => boolean) | null = null;
}

export const KERNEL_FINISHED = 0;
export const KERNEL_CAPPED = 1;
export const KERNEL_ABORTED = 2;

export type Kernel = (
  x: Float64Array,
  p: Float64Array,
  sig: Float64Array,
  rs: Float64Array,
  ctx: KernelContext,
) => void;

export interface KernelOptions {
  /** Index of the signal the program drives, or -1. */
  inputSignal: number;
  /** Parameter slots that vary between replicates (their values are not specialised). */
  variedSlots: ReadonlySet<number>;
}

function powExpr(v: string, n: number, nSlot: number, varied: boolean): string {
  if (!varied && Number.isInteger(n) && n >= 1 && n <= 10) return `(${Array(n).fill(v).join("*")})`;
  return `Math.pow(${v},P${nSlot})`;
}

/** Statements assigning propensity j to local a<j>. */
function propensityCode(model: CompiledModel, j: number, opts: KernelOptions, usedParams: Set<number>): string {
  const r = model.reactions[j];
  const P = (slot: number) => {
    usedParams.add(slot);
    return `P${slot}`;
  };
  let expr: string;
  let pre = "";
  if (r.kind === "massAction") {
    const parts = [P(r.rateSlot)];
    for (const e of r.reactants) parts.push(e.count === 1 ? `x${e.species}` : `(x${e.species}*(x${e.species}-1)*0.5)`);
    expr = parts.join("*");
  } else if (r.kind === "constant") {
    expr = P(r.rateSlot);
  } else {
    const hs: string[] = [];
    r.regulators.forEach((g, k) => {
      const v = g.isSignal ? `g${g.source}` : `x${g.source}`;
      const n = model.baseParams[g.nSlot];
      const varied = opts.variedSlots.has(g.nSlot);
      if (!(!varied && Number.isInteger(n) && n >= 1 && n <= 10)) usedParams.add(g.nSlot);
      const q = `q${j}_${k}`;
      pre += `${q} = ${powExpr(v, n, g.nSlot, varied)}; `;
      const kn = P(g.knSlot);
      hs.push(g.activates ? `(${q}/(${kn}+${q}))` : `(${kn}/(${kn}+${q}))`);
    });
    const f = r.logic === "and" ? hs.join("*") : `(1-${hs.map((h) => `(1-${h})`).join("*")})`;
    const leakFixedZero = !opts.variedSlots.has(r.leakSlot) && model.baseParams[r.leakSlot] === 0;
    const lk = leakFixedZero ? f : `(${P(r.leakSlot)}+(1-P${r.leakSlot})*${f})`;
    expr = `${P(r.rateSlot)}*${lk}`;
  }
  if (r.scaledBy >= 0) expr += `*g${r.scaledBy}`;
  return `${pre}a${j} = ${expr};`;
}

/** The kernel's JavaScript source (exported for inspection and tests). */
export function kernelSource(model: CompiledModel, opts: KernelOptions): string {
  const nS = model.nSpecies;
  const nG = model.nSignals;
  const nR = model.nReactions;
  const used = new Set<number>();
  const props = Array.from({ length: nR }, (_, j) => propensityCode(model, j, opts, used));
  const qVars: string[] = [];
  model.reactions.forEach((r, j) => r.regulators.forEach((_, k) => qVars.push(`q${j}_${k} = 0.0`)));
  const L: string[] = [];
  L.push(`"use strict";`);
  L.push(`var ${Array.from({ length: nS }, (_, i) => `x${i} = x[${i}]`).join(", ")};`);
  if (nG > 0) L.push(`var ${Array.from({ length: nG }, (_, i) => `g${i} = sig[${i}]`).join(", ")};`);
  const usedList = [...used].sort((a, b) => a - b);
  if (usedList.length > 0) L.push(`var ${usedList.map((s) => `P${s} = p[${s}]`).join(", ")};`);
  if (qVars.length > 0) L.push(`var ${qVars.join(", ")};`);
  L.push(`var ${Array.from({ length: nR }, (_, j) => `a${j} = 0.0`).join(", ")};`);
  L.push(`var s0 = rs[0], s1 = rs[1], s2 = rs[2], c = rs[3], tt = 0.0;`);
  L.push(props.join("\n"));
  L.push(`var t = ctx.t, tEnd = ctx.tEnd;`);
  L.push(`var sw = ctx.switchTimes, swl = ctx.switchLevels, si = ctx.switchIndex, nsw = sw.length;`);
  L.push(`var tSw = si < nsw ? sw[si] : Infinity;`);
  L.push(`var gt = ctx.gridTimes, gi = ctx.gridIndex, ng = gt.length, gb = ctx.gridBuf;`);
  L.push(`var tG = gi < ng ? gt[gi] : Infinity;`);
  L.push(`var trk = ctx.tracker, rec = ctx.recorder, cp = ctx.checkpoint;`);
  L.push(`var ev = ctx.events, cap = ctx.eventCap, status = 0;`);
  L.push(`var atot = 0.0, tNext = 0.0, r = 0.0, cum = 0.0, j = 0;`);
  const gridWrite = (cond: string) =>
    `while (${cond}) { ${Array.from({ length: nS }, (_, i) => `gb[${i === 0 ? "gi" : `gi + ${i} * ng`}] = x${i};`).join(" ")} gi++; tG = gi < ng ? gt[gi] : Infinity; }`;
  const rand = `tt = 2091639 * s0 + c * 2.3283064365386963e-10; s0 = s1; s1 = s2; c = tt | 0; s2 = tt - c;`;
  L.push(`for (;;) {`);
  L.push(`  atot = ${Array.from({ length: nR }, (_, j) => `a${j}`).join(" + ")};`);
  L.push(`  ${rand}`);
  L.push(`  tNext = atot > 0 ? t - Math.log(1 - s2) / atot : Infinity;`);
  L.push(`  if (tSw <= tNext && tSw < tEnd) {`);
  L.push(`    ${gridWrite("tG < tSw")}`);
  L.push(`    t = tSw;`);
  if (opts.inputSignal >= 0) {
    L.push(`    g${opts.inputSignal} = swl[si];`);
    for (const k of model.signalDependents[opts.inputSignal]) L.push(`    ${props[k]}`);
  }
  L.push(`    si++; tSw = si < nsw ? sw[si] : Infinity;`);
  L.push(`    continue;`);
  L.push(`  }`);
  L.push(`  if (tNext > tEnd) { ${gridWrite("tG <= tEnd")} t = tEnd; break; }`);
  L.push(`  ${gridWrite("tG < tNext")}`);
  L.push(`  t = tNext;`);
  L.push(`  ${rand}`);
  L.push(`  r = s2 * atot;`);
  const out = model.outputIndex;
  const fire = model.reactions.map((rx, j) => {
    const upd = rx.delta.map((d) => `x${d.species} += ${d.change};`).join(" ");
    const deps = model.dependents[j].map((k) => props[k]).join(" ");
    const trk = rx.delta.some((d) => d.species === out) ? ` if (trk !== null) trk.push(t, x${out});` : "";
    return `j = ${j}; ${upd} ${deps}${trk}`;
  });
  // selection and firing in one chain; the round-off fallback (last non-zero propensity) via a switch
  for (let j = 0; j < nR; j++)
    L.push(`  ${j === 0 ? "if" : "else if"} (r < (cum ${j === 0 ? "=" : "+="} a${j})) { ${fire[j]} }`);
  let fallback = "0";
  for (let j = 0; j < nR; j++) fallback = `a${j} > 0 ? ${j} : ${fallback}`;
  L.push(`  else {`);
  L.push(`    switch (${fallback}) {`);
  fire.forEach((f, j) => L.push(`      case ${j}: { ${f} break; }`));
  L.push(`    }`);
  L.push(`  }`);
  L.push(`  if (rec !== null) rec.push(t, j);`);
  L.push(`  if (++ev >= cap) { status = 1; break; }`);
  L.push(`  if ((ev & 65535) === 0 && cp !== null && cp() === false) { status = 2; break; }`);
  L.push(`}`);
  L.push(Array.from({ length: nS }, (_, i) => `x[${i}] = x${i};`).join(" "));
  if (nG > 0) L.push(Array.from({ length: nG }, (_, i) => `sig[${i}] = g${i};`).join(" "));
  L.push(`rs[0] = s0; rs[1] = s1; rs[2] = s2; rs[3] = c;`);
  L.push(`ctx.t = t; ctx.switchIndex = si; ctx.gridIndex = gi; ctx.events = ev; ctx.status = status;`);
  return L.join("\n");
}

/** Compiles the kernel for a model (new Function over kernelSource). */
export function generateKernel(model: CompiledModel, opts: KernelOptions): Kernel {
  return new Function("x", "p", "sig", "rs", "ctx", kernelSource(model, opts)) as Kernel;
}
