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
 * Expression rates (sim/circuit/expression.ts) are generated from their checked
 * tree; a model with expressions additionally
 * - checks every expression propensity: negative or not finite stops the
 *   replicate (status KERNEL_FAILED, ctx.error*), never a silent clamp; so does
 *   a firing of an expression reaction that would make a count negative;
 * - stops the clock at the model's clock stops (ctx.stopTimes, the constants
 *   time is compared with), recomputing the time-dependent propensities with
 *   the probe time of the new interval (ctx.stopProbe), exactly as at an input
 *   switch; at equal times the input switch comes first.
 * - with events (sim/circuit/compile-events.ts): at a clock stop that fires
 *   events, and after a firing that changes a species condition, the state is
 *   written back, ctx.onEvents carries out the events, and the state,
 *   parameters and every propensity are reloaded; grid values at an event time
 *   are written after the event.
 * A model without expressions or events gets exactly the source it got before
 * they existed.
 *
 * Two variants: "fast" (the default) and "reference", the kernel exactly as it
 * stood before issue 16's speed work (its source is frozen by digest in
 * tests/sim/engine/fast-kernel.test.ts). The fast kernel gives the same
 * doubles for the same seeds and differs in three ways:
 * - the output's path reaches the tracker in blocks: each change is appended
 *   to ctx.pathBuf, handed over with PulseTracker.pushPath when full and before
 *   the kernel returns, instead of a method call per change (the tracker's
 *   state is read by nobody while the kernel runs, so the records are the same);
 * - ln(1 - u) of the waiting time is computed inline (./kernel-log.ts: V8's
 *   Math.log algorithm, proven bit-identical on every value u can take);
 * - each Hill factor q/(K+q) of a regulated rate is kept in a local and
 *   recomputed only when its source changed (the same operations on the same
 *   values give the same double).
 * Both variants give bit-identical results for the same seeds (tested over
 * every rate kind, events, rules, extrinsic variation and many seeds).
 *
 * The source is built only from the compiled model's indices, numbers from
 * checked trees and the numeric flags below (integer Hill exponents, zero
 * leak); no user text reaches it.
 * Parameter values are read from the parameter vector at entry, so one kernel
 * serves every replicate and extrinsic draw.
 */
import type { PulseTracker } from "@/sim/metrics/pulse-tracker";
import { badRateMessage, type CompiledModel } from "@/sim/circuit/compile-model";
import { treeToJs } from "@/sim/circuit/expression";
import type { EventRecorder } from "./event-recorder";
import { KERNEL_LOG_LOCALS, kernelLogCode } from "./kernel-log";

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
  /** Clock stops of time-dependent rates still ahead (empty during a burn-in). */
  stopTimes: Float64Array = new Float64Array(0);
  /** Probe time per clock interval (length stopTimes.length + 1). */
  stopProbe: Float64Array = Float64Array.of(0);
  /** Set with status KERNEL_FAILED: the reaction, its rate, and 1 = bad rate, 2 = count would go negative. */
  errorReaction = -1;
  errorValue = 0;
  errorKind = 0;
  /** Events: the condition states, the stops that fire events, and the runner (sim/engine/event-runner.ts). */
  trig: Uint8Array = new Uint8Array(0);
  stopFire: Uint8Array = new Uint8Array(0);
  onEvents: ((t: number, stop: number) => number) | null = null;
  /** The fast kernel's block of output-path pairs (t, x) on their way to the tracker (PulseTracker.pushPath). */
  pathBuf: Float64Array = new Float64Array(2 * 4096);
}

export const KERNEL_FINISHED = 0;
export const KERNEL_CAPPED = 1;
export const KERNEL_ABORTED = 2;
export const KERNEL_FAILED = 3;

/** The error of a replicate that stopped with KERNEL_FAILED. */
export function kernelFailureMessage(model: CompiledModel, ctx: KernelContext): string {
  if (ctx.errorKind === 3) {
    const rule = model.rules[ctx.errorReaction];
    return `the rule for ${model.speciesNames[rule?.target ?? 0]} gives ${ctx.errorValue} at t = ${ctx.t} min; a species amount must be a finite number, not negative`;
  }
  const r = model.reactions[ctx.errorReaction];
  const name = r?.name ?? "?";
  if (ctx.errorKind === 2) {
    const neg = r?.delta.find((d) => d.change < 0);
    return `reaction "${name}" fired with too few molecules of ${neg ? `"${model.speciesNames[neg.species]}"` : "a reactant"} at t = ${ctx.t} min (the count would go negative): its expression must be 0 when a reactant runs out`;
  }
  return badRateMessage(name, ctx.errorValue, ctx.t);
}

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
  /**
   * "fast" (the default) or "reference": the kernel as it stood before the
   * speed work of issue 16, kept to check the fast one against (same results,
   * bit for bit, for the same seeds); the differences are listed at the top of this file.
   */
  variant?: "fast" | "reference";
}

function powExpr(v: string, n: number, nSlot: number, varied: boolean): string {
  if (!varied && Number.isInteger(n) && n >= 1 && n <= 10) return `(${Array(n).fill(v).join("*")})`;
  return `Math.pow(${v},P${nSlot})`;
}

type Regulator = CompiledModel["reactions"][number]["regulators"][number];

/**
 * Statements assigning propensity j to local a<j>. With `fresh` (the fast
 * kernel), each Hill factor lives in its own local h<j>_<k> and is recomputed
 * only where fresh(regulator) holds (its source changed): the same operations
 * on the same values as recomputing it, so the same double.
 */
function propensityCode(
  model: CompiledModel,
  j: number,
  opts: KernelOptions,
  usedParams: Set<number>,
  fresh?: (g: Regulator) => boolean,
): string {
  const r = model.reactions[j];
  const P = (slot: number) => {
    usedParams.add(slot);
    return `P${slot}`;
  };
  let expr: string;
  let pre = "";
  if (r.expr !== null) {
    const sp = new Map(model.speciesNames.map((n, i) => [n, i]));
    const sg = new Map(model.signalNames.map((n, i) => [n, i]));
    const pq = new Map(model.parameterNames.map((n, i) => [n, model.parameterSlots[i]]));
    expr = treeToJs(r.expr, {
      name: (kind, name) =>
        kind === "species" ? `x${sp.get(name)}` : kind === "signal" ? `g${sg.get(name)}` : P(pq.get(name)!),
      time: "tq",
    });
    if (r.scaledBy >= 0) expr = `${expr}*g${r.scaledBy}`;
    return `a${j} = ${expr}; if (!(a${j} >= 0 && a${j} < Infinity)) { ctx.errorReaction = ${j}; ctx.errorValue = a${j}; ctx.errorKind = 1; status = 3; break main; }`;
  } else if (r.kind === "massAction") {
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
      const kn = P(g.knSlot);
      const h = g.activates ? `(${q}/(${kn}+${q}))` : `(${kn}/(${kn}+${q}))`;
      if (fresh === undefined) {
        pre += `${q} = ${powExpr(v, n, g.nSlot, varied)}; `;
        hs.push(h);
      } else {
        if (fresh(g)) pre += `${q} = ${powExpr(v, n, g.nSlot, varied)}; h${j}_${k} = ${h}; `;
        hs.push(`h${j}_${k}`);
      }
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
export function kernelSource(model: CompiledModel, optsIn: KernelOptions): string {
  // slots that follow a varied named parameter vary too
  const variedSlots = new Set(optsIn.variedSlots);
  for (const s of model.eventParamSlots) variedSlots.add(s);
  for (const l of model.links) if (variedSlots.has(l.from)) variedSlots.add(l.slot);
  const opts: KernelOptions = { ...optsIn, variedSlots };
  const fast = opts.variant !== "reference";
  // the output's new value on its way to the tracker: at once (reference) or via the path buffer (fast)
  const track = (v: string) =>
    fast
      ? `if (trk !== null) { ob[on] = t; ob[on + 1] = ${v}; on += 2; if (on === obn) { trk.pushPath(ob, on); on = 0; } }`
      : `if (trk !== null) trk.push(t, ${v});`;
  const hasEvents = model.events.length > 0;
  const ext = model.hasExpressions || hasEvents || model.rules.length > 0;
  const nS = model.nSpecies;
  const nG = model.nSignals;
  const nR = model.nReactions;
  const used = new Set<number>();
  const all = fast ? () => true : undefined;
  const props = Array.from({ length: nR }, (_, j) => propensityCode(model, j, opts, used, all));
  /** Propensity k after a change of the given species (fast: only the Hill factors reading them are recomputed). */
  const propsAfterSpecies = (k: number, changed: ReadonlySet<number>) =>
    fast ? propensityCode(model, k, opts, used, (g) => !g.isSignal && changed.has(g.source)) : props[k];
  const propsAfterSignal = (k: number, sig: number) =>
    fast ? propensityCode(model, k, opts, used, (g) => g.isSignal && g.source === sig) : props[k];
  const qVars: string[] = [];
  model.reactions.forEach((r, j) =>
    r.regulators.forEach((_, k) => qVars.push(fast ? `q${j}_${k} = 0.0, h${j}_${k} = 0.0` : `q${j}_${k} = 0.0`)),
  );
  // species conditions of events, on the kernel's locals
  const sp = new Map(model.speciesNames.map((n, i) => [n, i]));
  const sg = new Map(model.signalNames.map((n, i) => [n, i]));
  const pq = new Map(model.parameterNames.map((n, i) => [n, model.parameterSlots[i]]));
  const localNames = {
    name: (kind: "species" | "signal" | "param", name: string) => {
      if (kind === "species") return `x${sp.get(name)}`;
      if (kind === "signal") return `g${sg.get(name)}`;
      used.add(pq.get(name)!);
      return `P${pq.get(name)}`;
    },
    time: "tq",
  };
  const ruleJs = model.rules.map((rule) => treeToJs(rule.value, localNames));
  const trigCode = new Map<number, string>();
  for (const k of model.speciesTriggers)
    trigCode.set(
      k,
      treeToJs(model.events[k].condition!, {
        name: (kind, name) => {
          if (kind === "species") return `x${sp.get(name)}`;
          if (kind === "signal") return `g${sg.get(name)}`;
          used.add(pq.get(name)!);
          return `P${pq.get(name)}`;
        },
        time: "tq",
      }),
    );
  const L: string[] = [];
  L.push(`"use strict";`);
  L.push(`var ${Array.from({ length: nS }, (_, i) => `x${i} = x[${i}]`).join(", ")};`);
  if (nG > 0) L.push(`var ${Array.from({ length: nG }, (_, i) => `g${i} = sig[${i}]`).join(", ")};`);
  const usedList = [...used].sort((a, b) => a - b);
  if (usedList.length > 0) L.push(`var ${usedList.map((s) => `P${s} = p[${s}]`).join(", ")};`);
  if (qVars.length > 0) L.push(`var ${qVars.join(", ")};`);
  L.push(`var ${Array.from({ length: nR }, (_, j) => `a${j} = 0.0`).join(", ")};`);
  L.push(`var s0 = rs[0], s1 = rs[1], s2 = rs[2], c = rs[3], tt = 0.0;`);
  if (ext) {
    L.push(`var status = 0;`);
    L.push(`main: {`);
    L.push(`var t = ctx.t, tEnd = ctx.tEnd;`);
    L.push(`var xs = ctx.stopTimes, xp = ctx.stopProbe, nx = xs.length, xi = 0;`);
    L.push(`while (xi < nx && xs[xi] <= t) xi++;`);
    L.push(`var tq = xp[xi], tX = xi < nx ? xs[xi] : Infinity;`);
    if (hasEvents) L.push(`var tr = ctx.trig, xe = ctx.stopFire, onEv = ctx.onEvents, pend = 0, xob = 0;`);
  }
  L.push(props.join("\n"));
  if (!ext) L.push(`var t = ctx.t, tEnd = ctx.tEnd;`);
  L.push(`var sw = ctx.switchTimes, swl = ctx.switchLevels, si = ctx.switchIndex, nsw = sw.length;`);
  L.push(`var tSw = si < nsw ? sw[si] : Infinity;`);
  L.push(`var gt = ctx.gridTimes, gi = ctx.gridIndex, ng = gt.length, gb = ctx.gridBuf;`);
  L.push(`var tG = gi < ng ? gt[gi] : Infinity;`);
  L.push(`var trk = ctx.tracker, rec = ctx.recorder, cp = ctx.checkpoint;`);
  if (fast) {
    L.push(`if (ctx.pathBuf.length < 2) ctx.pathBuf = new Float64Array(8192);`);
    L.push(`var ob = ctx.pathBuf, on = 0, obn = ob.length - (ob.length & 1);`);
    L.push(`var lq = 0.0, ${KERNEL_LOG_LOCALS};`);
  }
  L.push(`var ev = ctx.events, cap = ctx.eventCap${ext ? "" : ", status = 0"};`);
  L.push(`var atot = 0.0, tNext = 0.0, r = 0.0, cum = 0.0, j = 0;`);
  const gridWrite = (cond: string) =>
    `while (${cond}) { ${Array.from({ length: nS }, (_, i) => `gb[${i === 0 ? "gi" : `gi + ${i} * ng`}] = x${i};`).join(" ")} gi++; tG = gi < ng ? gt[gi] : Infinity; }`;
  const rand = `tt = 2091639 * s0 + c * 2.3283064365386963e-10; s0 = s1; s1 = s2; c = tt | 0; s2 = tt - c;`;
  L.push(`for (;;) {`);
  L.push(`  atot = ${Array.from({ length: nR }, (_, j) => `a${j}`).join(" + ")};`);
  L.push(`  ${rand}`);
  if (fast) L.push(`  if (atot > 0) { ${kernelLogCode("s2", "lq")} tNext = t - lq / atot; } else tNext = Infinity;`);
  else L.push(`  tNext = atot > 0 ? t - Math.log(1 - s2) / atot : Infinity;`);
  const out = model.outputIndex;
  const fireEvents = (stop: string) =>
    [
      `xob = x${out};`,
      Array.from({ length: nS }, (_, i) => `x[${i}] = x${i};`).join(" "),
      `onEv(t, ${stop});`,
      Array.from({ length: nS }, (_, i) => `x${i} = x[${i}];`).join(" "),
      usedList.map((s) => `P${s} = p[${s}];`).join(" "),
      props.join(" "),
      fast
        ? `if (x${out} !== xob) { ${track(`x${out}`)} }`
        : `if (trk !== null && x${out} !== xob) trk.push(t, x${out});`,
    ].join(" ");
  if (ext && model.clockStops.length > 0) {
    L.push(`  if (tX <= tNext && tX <= tEnd && tX < tSw) {`);
    L.push(`    ${gridWrite("tG < tX")}`);
    L.push(`    t = tX; xi++; tq = xp[xi]; tX = xi < nx ? xs[xi] : Infinity;`);
    const timed = model.timeDependents.map((k) => props[k]).join(" ");
    if (hasEvents) L.push(`    if (xe[xi - 1] !== 0) { ${fireEvents("xi - 1")} } else { ${timed} }`);
    else L.push(`    ${timed}`);
    L.push(`    continue;`);
    L.push(`  }`);
  }
  L.push(`  if (tSw <= tNext && tSw < tEnd) {`);
  L.push(`    ${gridWrite("tG < tSw")}`);
  L.push(`    t = tSw;`);
  if (opts.inputSignal >= 0) {
    L.push(`    g${opts.inputSignal} = swl[si];`);
    for (const k of model.signalDependents[opts.inputSignal]) L.push(`    ${propsAfterSignal(k, opts.inputSignal)}`);
  }
  L.push(`    si++; tSw = si < nsw ? sw[si] : Infinity;`);
  L.push(`    continue;`);
  L.push(`  }`);
  L.push(`  if (tNext > tEnd) { ${gridWrite("tG <= tEnd")} t = tEnd; break; }`);
  L.push(`  ${gridWrite("tG < tNext")}`);
  L.push(`  t = tNext;`);
  L.push(`  ${rand}`);
  L.push(`  r = s2 * atot;`);
  const fire = model.reactions.map((rx, j) => {
    const upd = rx.delta.map((d) => `x${d.species} += ${d.change};`).join(" ");
    const changedAll = new Set(model.changedBy[j]);
    const deps = model.dependents[j].map((k) => propsAfterSpecies(k, changedAll)).join(" ");
    const trk = changedAll.has(out) ? ` ${track(`x${out}`)}` : "";
    const ruleCode = model.rulesAfter[j]
      .map((k) => {
        const rule = model.rules[k];
        const v = ruleJs[k];
        return ` x${rule.target} = Math.round(${v}); if (!(x${rule.target} >= 0 && x${rule.target} < Infinity)) { ctx.errorReaction = ${k}; ctx.errorValue = x${rule.target}; ctx.errorKind = 3; status = 3; break main; }`;
      })
      .join("");
    const neg = rx.expr !== null ? rx.delta.filter((d) => d.change < 0).map((d) => `x${d.species} < 0`) : [];
    const guard =
      neg.length > 0
        ? ` if (${neg.join(" || ")}) { ctx.errorReaction = ${j}; ctx.errorValue = a${j}; ctx.errorKind = 2; status = 3; break main; }`
        : "";
    const checks = model.speciesTriggers
      .filter((k) => model.events[k].readsSpecies.some((i) => changedAll.has(i)))
      .map((k) => ` if (${trigCode.get(k)} !== (tr[${k}] === 1)) pend = 1;`)
      .join("");
    return `j = ${j}; ${upd}${guard}${ruleCode} ${deps}${trk}${checks}`;
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
  if (hasEvents && model.speciesTriggers.length > 0) L.push(`  if (pend === 1) { pend = 0; ${fireEvents("-1")} }`);
  L.push(`  if (rec !== null) rec.push(t, j);`);
  L.push(`  if (++ev >= cap) { status = 1; break; }`);
  L.push(`  if ((ev & 65535) === 0 && cp !== null && cp() === false) { status = 2; break; }`);
  L.push(`}`);
  if (ext) L.push(`}`);
  if (fast) L.push(`if (trk !== null && on > 0) trk.pushPath(ob, on);`);
  L.push(Array.from({ length: nS }, (_, i) => `x[${i}] = x${i};`).join(" "));
  if (nG > 0) L.push(Array.from({ length: nG }, (_, i) => `sig[${i}] = g${i};`).join(" "));
  L.push(`rs[0] = s0; rs[1] = s1; rs[2] = s2; rs[3] = c;`);
  L.push(`ctx.t = t; ctx.switchIndex = si; ctx.gridIndex = gi; ctx.events = ev; ctx.status = status;`);
  return L.join("\n");
}

/**
 * Compiled kernels by source text. A kernel reads every parameter value at entry, so runs whose models give the
 * same source (the same circuit with other rates, replicates, seed or grid; a sweep's points) share one
 * function, and with it the machine code V8 has already optimised in this thread: a run of a circuit the
 * thread has run before starts at full speed instead of interpreting its first replicates.
 */
const compiled = new Map<string, Kernel>();
const COMPILED_MAX = 32;

/** Compiles the kernel for a model (new Function over kernelSource), or returns the one compiled from the same source. */
export function generateKernel(model: CompiledModel, opts: KernelOptions): Kernel {
  const source = kernelSource(model, opts);
  let k = compiled.get(source);
  if (k) {
    // most recently used last, so the oldest goes first when the cache is full
    compiled.delete(source);
    compiled.set(source, k);
    return k;
  }
  k = new Function("x", "p", "sig", "rs", "ctx", source) as Kernel;
  if (compiled.size >= COMPILED_MAX) compiled.delete(compiled.keys().next().value!);
  compiled.set(source, k);
  return k;
}
