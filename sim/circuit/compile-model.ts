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
 * Parameter vector layout (Float64Array, one per replicate): per reaction its
 * rate slot, then for regulated reactions a leak slot and per regulator K, n and
 * K^n (derived by deriveParams).
 */
import type { Circuit } from "@/shared/schemas/circuit";
import { semanticErrors } from "./validate-circuit";

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
  kind: "massAction" | "constant" | "regulated";
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
    let rateSlot: number;
    let leakSlot = -1;
    let logic: "and" | "or" = "and";
    const regulators: CompiledRegulator[] = [];
    if (r.rate.kind === "regulated") {
      rateSlot = add(`rate(${r.name})`, r.rate.maxRatePerMinute, omega);
      leakSlot = add(`leak(${r.name})`, r.rate.leakFraction, 1);
      logic = r.rate.logic;
      for (const g of r.rate.regulators) {
        const isSignal = !sp.has(g.source);
        const source = isSignal ? sg.get(g.source)! : sp.get(g.source)!;
        if (isSignal) readsSignals.add(source);
        else readsSpecies.add(source);
        const kSlot = add(`K(${r.name},${g.source})`, g.halfMax, isSignal ? 1 : omega);
        const nSlot = add(`n(${r.name},${g.source})`, g.hill, 1);
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
    };
  });
  const nR = reactions.length;
  const dependents: number[][] = reactions.map((r) => {
    const changed = new Set(r.delta.map((d) => d.species));
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
  };
  deriveParams(model, model.baseParams);
  return model;
}

/** Fills the derived K^n slots of a parameter vector. */
export function deriveParams(model: CompiledModel, p: Float64Array): void {
  for (const r of model.reactions) for (const g of r.regulators) p[g.knSlot] = Math.pow(p[g.kSlot], p[g.nSlot]);
}

function hillPow(x: number, n: number): number {
  if (x <= 0) return 0;
  return n === 2 ? x * x : n === 1 ? x : Math.pow(x, n);
}

/**
 * Rate of reaction j at state x (counts) and signal levels sig.
 * meanField = false: the stochastic propensity (k*A*(A-1)/2 for 2A);
 * meanField = true: the ODE rate (k*A^2/2 for 2A). Other laws are identical.
 */
export function reactionRate(
  model: CompiledModel,
  p: Float64Array,
  x: ArrayLike<number>,
  sig: ArrayLike<number>,
  j: number,
  meanField: boolean,
): number {
  const r = model.reactions[j];
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
