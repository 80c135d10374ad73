/**
 * Compiles a validated circuit into index form for the engines: species,
 * signals and parameters as array slots, net stoichiometry, and the dependency
 * graph of the direct method (after reaction j fires, only the propensities
 * that read a species j changes are recomputed; Gibson & Bruck 2000,
 * J Phys Chem A 104:1876, section on dependency graphs).
 *
 * System size (molecules per concentration unit, Omega) is applied here:
 * initial counts, zero-order and maximal production rates and the K of species
 * regulators are multiplied by Omega, second-order mass-action constants divided
 * by it; first-order constants, leak, Hill coefficients and signal K are unchanged.
 *
 * Parameter vector layout (Float64Array, one per replicate): first the
 * circuit's named parameters (param(P), unscaled), then per reaction its rate
 * slot, then for regulated reactions a leak slot and per regulator K, n and
 * K^n. deriveParams fills the derived slots: a fixed-kind field that follows a
 * named parameter (`use`) is that parameter times its system-size scale (leak
 * capped at 1, n at 10), then K^n. A circuit without named parameters has
 * exactly the layout it had before they existed.
 *
 * Expression rates (./expression.ts) keep their checked tree; the engines
 * generate code from it (reactionRate here, the kernel in
 * sim/engine/generate-kernel.ts). Their "clock stops" (the constants time is
 * compared with) are collected in clockStops; between two stops every
 * time-dependent rate is constant, and clockProbe holds one time inside each
 * interval at which the rates are evaluated.
 */
import type { Circuit } from "@/shared/schemas/circuit";
import { semanticErrors } from "./validate-circuit";
import { namesRead, parseExpression, timeStops, treeToJs, usesTime, type ExprNode } from "./expression";
import { compileEvents, type CompiledEvent } from "./compile-events";

export interface CompiledRegulator {
  source: number;
  isSignal: boolean;
  activates: boolean;
  kSlot: number;
  nSlot: number;
  knSlot: number;
}

export interface CompiledReaction {
  name: string;
  kind: "massAction" | "constant" | "regulated" | "expression";
  /** Mass-action order (0, 1 or 2); 0 for other kinds. */
  order: number;
  reactants: { species: number; count: number }[];
  /** Net change per species (non-zero entries only). */
  delta: { species: number; change: number }[];
  rateSlot: number;
  leakSlot: number;
  logic: "and" | "or";
  regulators: CompiledRegulator[];
  /** Signal index multiplying the rate, or -1. */
  scaledBy: number;
  readsSpecies: number[];
  readsSignals: number[];
  /** Expression rates: the checked tree (names resolved by kind), else null. */
  expr: ExprNode | null;
  /** Parameter slots the rate reads directly (expressions only; fixed kinds read their own slots). */
  readsParams: number[];
  /** Whether the rate depends on time (through piecewise conditions). */
  readsTime: boolean;
}

/** A fixed-kind slot that follows a named parameter: p[slot] = min(max, p[from] * scale). */
export interface ParamLink {
  slot: number;
  from: number;
  scale: number;
  max: number;
}

export interface CompiledModel {
  speciesNames: string[];
  signalNames: string[];
  nSpecies: number;
  nSignals: number;
  nReactions: number;
  nParams: number;
  outputIndex: number;
  systemSize: number;
  /** Initial counts after system-size scaling. */
  init: Float64Array;
  signalOff: Float64Array;
  signalOn: Float64Array;
  /** Parameters after system-size scaling (K^n slots filled). */
  baseParams: Float64Array;
  reactions: CompiledReaction[];
  /** Parameter reference -> slot (rate, leak, K, n), with how system size scaled it. */
  slots: Map<string, { slot: number; scale: number }>;
  /** After reaction j fires, recompute these propensities (sorted). */
  dependents: number[][];
  /** Propensities reading signal s. */
  signalDependents: number[][];
  parameterNames: string[];
  /** Slot of each named parameter (same order as parameterNames). */
  parameterSlots: number[];
  links: ParamLink[];
  /** Sorted distinct times at which time-dependent rates may change. */
  clockStops: Float64Array;
  /** clockProbe[k]: a time strictly inside the interval after k clock stops (length clockStops.length + 1). */
  clockProbe: Float64Array;
  /** Reactions whose rate depends on time. */
  timeDependents: number[];
  /** Whether any rate is an expression. */
  hasExpressions: boolean;
  /** Scheduled and triggered events (./compile-events.ts), in circuit order. */
  events: CompiledEvent[];
  /** Per clock stop, the scheduled events firing there (in circuit order). */
  stopEvents: number[][];
  /** 1 where a clock stop fires events (parallel to clockStops). */
  stopFire: Uint8Array;
  /** Events with a species condition (checked after every change of the state). */
  speciesTriggers: number[];
  /** Parameter slots that events assign. */
  eventParamSlots: number[];
  /** Assignment rules in order (targets are species no reaction changes). */
  rules: CompiledRule[];
  /** Per reaction: the rules to re-apply after it fires (in order). */
  rulesAfter: number[][];
  /** Per reaction: every species its firing changes, rule targets included. */
  changedBy: number[][];
}

export interface CompiledRule {
  target: number;
  value: ExprNode;
  /** Species the value reads. */
  reads: number[];
}

export function compileModel(circuit: Circuit, systemSize = 1): CompiledModel {
  const errs = semanticErrors(circuit);
  if (errs.length > 0) throw new Error(`invalid circuit: ${errs.map((e) => e.message).join("; ")}`);
  const speciesNames = circuit.species.map((s) => s.name);
  const signalNames = circuit.signals.map((s) => s.name);
  const sp = new Map(speciesNames.map((n, i) => [n, i]));
  const sg = new Map(signalNames.map((n, i) => [n, i]));
  const omega = systemSize;
  const params: number[] = [];
  const slots = new Map<string, { slot: number; scale: number }>();
  const add = (ref: string, value: number, scale: number) => {
    slots.set(ref, { slot: params.length, scale });
    params.push(value * scale);
    return params.length - 1;
  };
  const circuitParams = circuit.parameters ?? [];
  const paramSlot = new Map<string, number>();
  for (const q of circuitParams) paramSlot.set(q.name, add(`param(${q.name})`, q.value, 1));
  const links: ParamLink[] = [];
  const follow = (slot: number, name: string | undefined, max = Infinity) => {
    if (name === undefined) return;
    links.push({ slot, from: paramSlot.get(name)!, scale: slots.get(refOfSlot(slot))!.scale, max });
  };
  const refOfSlot = (slot: number) => [...slots.entries()].find(([, v]) => v.slot === slot)![0];
  const stops = new Set<number>();
  const scope = {
    species: new Set(speciesNames),
    signals: new Set(signalNames),
    params: new Set(paramSlot.keys()),
  };
  const reactions: CompiledReaction[] = circuit.reactions.map((r) => {
    const reactants = r.reactants.map((e) => ({ species: sp.get(e.species)!, count: e.count }));
    const net = new Map<number, number>();
    for (const e of r.reactants) net.set(sp.get(e.species)!, (net.get(sp.get(e.species)!) ?? 0) - e.count);
    for (const e of r.products) net.set(sp.get(e.species)!, (net.get(sp.get(e.species)!) ?? 0) + e.count);
    const delta = [...net.entries()].filter(([, c]) => c !== 0).map(([species, change]) => ({ species, change }));
    const order = r.rate.kind === "massAction" ? reactants.reduce((s, e) => s + e.count, 0) : 0;
    const scaledBy = r.scaledBy !== undefined ? sg.get(r.scaledBy)! : -1;
    const readsSpecies = new Set<number>(reactants.map((e) => e.species));
    const readsSignals = new Set<number>(scaledBy >= 0 ? [scaledBy] : []);
    let rateSlot = -1;
    let expr: ExprNode | null = null;
    const readsParams = new Set<number>();
    let readsTime = false;
    let leakSlot = -1;
    let logic: "and" | "or" = "and";
    const regulators: CompiledRegulator[] = [];
    if (r.rate.kind === "expression") {
      const res = parseExpression(r.rate.formula, scope);
      if (!res.ok) throw new Error(`reaction "${r.name}": formula ${res.error.message}`);
      expr = res.tree;
      const names = namesRead(expr);
      for (const n of names.species) readsSpecies.add(sp.get(n)!);
      for (const n of names.signals) readsSignals.add(sg.get(n)!);
      for (const n of names.params) readsParams.add(paramSlot.get(n)!);
      readsTime = usesTime(expr);
      timeStops(expr, stops);
    } else if (r.rate.kind === "regulated") {
      rateSlot = add(`rate(${r.name})`, r.rate.maxRatePerMinute, omega);
      follow(rateSlot, r.rate.use?.maxRatePerMinute);
      leakSlot = add(`leak(${r.name})`, r.rate.leakFraction, 1);
      follow(leakSlot, r.rate.use?.leakFraction, 1);
      logic = r.rate.logic;
      for (const g of r.rate.regulators) {
        const isSignal = !sp.has(g.source);
        const source = isSignal ? sg.get(g.source)! : sp.get(g.source)!;
        if (isSignal) readsSignals.add(source);
        else readsSpecies.add(source);
        const kSlot = add(`K(${r.name},${g.source})`, g.halfMax, isSignal ? 1 : omega);
        follow(kSlot, g.use?.halfMax);
        const nSlot = add(`n(${r.name},${g.source})`, g.hill, 1);
        follow(nSlot, g.use?.hill, 10);
        params.push(0);
        regulators.push({
          source,
          isSignal,
          activates: g.effect === "activates",
          kSlot,
          nSlot,
          knSlot: params.length - 1,
        });
      }
    } else {
      const scale = r.rate.kind === "constant" || order === 0 ? omega : order === 2 ? 1 / omega : 1;
      rateSlot = add(`rate(${r.name})`, r.rate.ratePerMinute, scale);
      follow(rateSlot, r.rate.use?.ratePerMinute);
    }
    return {
      name: r.name,
      kind: r.rate.kind,
      order,
      reactants,
      delta,
      rateSlot,
      leakSlot,
      logic,
      regulators,
      scaledBy,
      readsSpecies: [...readsSpecies].sort((a, b) => a - b),
      readsSignals: [...readsSignals].sort((a, b) => a - b),
      expr,
      readsParams: [...readsParams].sort((a, b) => a - b),
      readsTime,
    };
  });
  const events = compileEvents(circuit, sp, paramSlot);
  for (const e of events) for (const t of e.times) stops.add(t);
  const clockStops = Float64Array.from([...stops].sort((a, b) => a - b));
  const stopIndex = new Map([...clockStops].map((t, k) => [t, k]));
  const stopEvents: number[][] = Array.from(clockStops, () => []);
  events.forEach((e, i) => e.times.forEach((t) => stopEvents[stopIndex.get(t)!].push(i)));
  const m = clockStops.length;
  const clockProbe = new Float64Array(m + 1);
  for (let k = 0; k <= m; k++)
    clockProbe[k] =
      m === 0
        ? 0
        : k === 0
          ? clockStops[0] - 1
          : k === m
            ? clockStops[m - 1] + 1
            : 0.5 * (clockStops[k - 1] + clockStops[k]);
  const nR = reactions.length;
  const rules: CompiledRule[] = (circuit.rules ?? []).map((rule) => {
    const res = parseExpression(rule.value, { ...scope, signals: new Set(), allowTime: false });
    if (!res.ok) throw new Error(`rule for "${rule.target}": value ${res.error.message}`);
    return {
      target: sp.get(rule.target)!,
      value: res.tree,
      reads: [...namesRead(res.tree).species].map((n) => sp.get(n)!),
    };
  });
  /** Species changed by a firing of reaction j, rule targets included, and the rules to re-apply. */
  const rulesAfter: number[][] = [];
  const changedBy: number[][] = reactions.map((r) => {
    const changed = new Set(r.delta.map((d) => d.species));
    const after: number[] = [];
    rules.forEach((rule, k) => {
      if (rule.reads.some((i) => changed.has(i))) {
        after.push(k);
        changed.add(rule.target);
      }
    });
    rulesAfter.push(after);
    return [...changed];
  });
  const dependents: number[][] = reactions.map((_, j) => {
    const changed = new Set(changedBy[j]);
    const out: number[] = [];
    for (let k = 0; k < nR; k++) if (reactions[k].readsSpecies.some((s) => changed.has(s))) out.push(k);
    return out;
  });
  const signalDependents = signalNames.map((_, s) => {
    const out: number[] = [];
    for (let k = 0; k < nR; k++) if (reactions[k].readsSignals.includes(s)) out.push(k);
    return out;
  });
  const model: CompiledModel = {
    speciesNames,
    signalNames,
    nSpecies: speciesNames.length,
    nSignals: signalNames.length,
    nReactions: nR,
    nParams: params.length,
    outputIndex: sp.get(circuit.outputSpecies)!,
    systemSize: omega,
    init: Float64Array.from(circuit.species.map((s) => Math.round(s.initialCount * omega))),
    signalOff: Float64Array.from(circuit.signals.map((s) => s.offLevel)),
    signalOn: Float64Array.from(circuit.signals.map((s) => s.onLevel)),
    baseParams: Float64Array.from(params),
    reactions,
    slots,
    dependents,
    signalDependents,
    parameterNames: circuitParams.map((q) => q.name),
    parameterSlots: circuitParams.map((q) => paramSlot.get(q.name)!),
    links,
    clockStops,
    clockProbe,
    timeDependents: reactions.flatMap((r, j) => (r.readsTime ? [j] : [])),
    hasExpressions: reactions.some((r) => r.expr !== null),
    events,
    stopEvents,
    stopFire: Uint8Array.from(stopEvents, (l) => (l.length > 0 ? 1 : 0)),
    speciesTriggers: events.flatMap((e, i) => (e.condition !== null ? [i] : [])),
    rules,
    rulesAfter,
    changedBy,
    eventParamSlots: [
      ...new Set(events.flatMap((e) => e.assigns.filter((a) => a.target === "param").map((a) => a.index))),
    ].sort((a, b) => a - b),
  };
  deriveParams(model, model.baseParams);
  return model;
}

/** Fills the derived slots of a parameter vector: fields that follow named parameters, then K^n. */
export function deriveParams(model: CompiledModel, p: Float64Array): void {
  for (const l of model.links) p[l.slot] = Math.min(l.max, p[l.from] * l.scale);
  for (const r of model.reactions) for (const g of r.regulators) p[g.knSlot] = Math.pow(p[g.kSlot], p[g.nSlot]);
}

/** The probe time of the clock interval containing t (just after any stop at t). */
export function clockProbeAt(model: CompiledModel, t: number): number {
  const s = model.clockStops;
  let k = 0;
  while (k < s.length && s[k] <= t) k++;
  return model.clockProbe[k];
}

export type TreeFn = (x: ArrayLike<number>, sig: ArrayLike<number>, p: ArrayLike<number>, tq: number) => number;
const treeFns = new WeakMap<ExprNode, TreeFn>();

/**
 * A JavaScript function of (x, sig, p, tq) generated from a checked tree of the
 * model (cached per tree); conditions return booleans.
 */
export function treeFn(model: CompiledModel, tree: ExprNode): TreeFn {
  let f = treeFns.get(tree);
  if (!f) {
    const sp = new Map(model.speciesNames.map((n, i) => [n, i]));
    const sg = new Map(model.signalNames.map((n, i) => [n, i]));
    const pq = new Map(model.parameterNames.map((n, i) => [n, model.parameterSlots[i]]));
    const body = treeToJs(tree, {
      name: (kind, name) =>
        kind === "species" ? `x[${sp.get(name)}]` : kind === "signal" ? `sig[${sg.get(name)}]` : `p[${pq.get(name)}]`,
      time: "tq",
    });
    f = new Function("x", "sig", "p", "tq", `"use strict"; return ${body};`) as TreeFn;
    treeFns.set(tree, f);
  }
  return f;
}

/** The rate function of an expression reaction. */
export function expressionRateFn(model: CompiledModel, r: CompiledReaction): TreeFn {
  return treeFn(model, r.expr!);
}

/** Applies every assignment rule in order to a state (amounts rounded to whole counts when round). */
export function applyRules(model: CompiledModel, x: Float64Array, p: Float64Array, sig: Float64Array, round: boolean) {
  for (const rule of model.rules) {
    const v = treeFn(model, rule.value)(x, sig, p, 0);
    const w = round ? Math.round(v) : v;
    if (!(w >= 0 && w < Infinity))
      throw new Error(
        `the rule for ${model.speciesNames[rule.target]} gives ${v}; a species amount must be a finite number, not negative`,
      );
    x[rule.target] = w;
  }
}

/** Error for a rate that is negative or not a finite number (the run stops; never clamped). */
export function badRateMessage(name: string, value: number, t: number | null): string {
  const what = Number.isNaN(value)
    ? "is not a number"
    : !Number.isFinite(value)
      ? "is infinite"
      : `is negative (${value})`;
  return `reaction "${name}": the rate ${what}${t !== null ? ` at t = ${t} min` : ""}; a rate must be a finite number, not negative`;
}

function hillPow(x: number, n: number): number {
  if (x <= 0) return 0;
  return n === 2 ? x * x : n === 1 ? x : Math.pow(x, n);
}

/**
 * Rate of reaction j at state x (counts) and signal levels sig.
 * meanField = false: the stochastic propensity (k*A*(A-1)/2 for 2A);
 * meanField = true: the ODE rate (k*A^2/2 for 2A). Other laws are identical.
 * tq: the probe time of the current clock interval for time-dependent
 * expressions (default: the interval just after t = 0). An expression whose
 * value is negative or not finite throws (badRateMessage).
 */
export function reactionRate(
  model: CompiledModel,
  p: Float64Array,
  x: ArrayLike<number>,
  sig: ArrayLike<number>,
  j: number,
  meanField: boolean,
  tq?: number,
): number {
  const r = model.reactions[j];
  if (r.expr !== null) {
    let a = expressionRateFn(model, r)(x, sig, p, tq ?? clockProbeAt(model, 0));
    if (r.scaledBy >= 0) a *= sig[r.scaledBy];
    if (!(a >= 0 && a < Infinity)) throw new Error(badRateMessage(r.name, a, null));
    return a;
  }
  let a = p[r.rateSlot];
  if (r.kind === "massAction") {
    for (const e of r.reactants) {
      const v = x[e.species];
      if (e.count === 1) a *= v;
      else a *= meanField ? (v * v) / 2 : (v * (v - 1)) / 2;
    }
  } else if (r.kind === "regulated") {
    let f = r.logic === "and" ? 1 : 1;
    for (const g of r.regulators) {
      const xn = hillPow(g.isSignal ? sig[g.source] : x[g.source], p[g.nSlot]);
      const kn = p[g.knSlot];
      const h = g.activates ? (xn === 0 ? 0 : xn / (kn + xn)) : kn / (kn + xn);
      f *= r.logic === "and" ? h : 1 - h;
    }
    if (r.logic === "or") f = 1 - f;
    const leak = p[r.leakSlot];
    a *= leak + (1 - leak) * f;
  }
  if (r.scaledBy >= 0) a *= sig[r.scaledBy];
  return a;
}
