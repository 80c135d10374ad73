/**
 * Parameter references (shared/schemas/circuit.ts ParameterRefSchema):
 *   rate(R), leak(R), K(R,S), n(R,S), init(X), param(P)
 * A fixed-kind field that follows a circuit parameter (rate law or regulator
 * `use`) is not a parameter of its own: it is changed through param(P), which
 * changes every field that follows P.
 * listParameters enumerates every parameter of a circuit with a label and unit;
 * getParameter / setParameter read and write one by reference (setParameter
 * returns a new circuit and never mutates its argument).
 */
import { CircuitSchema, type Circuit, type Reaction } from "@/shared/schemas/circuit";
import { semanticErrors } from "./validate-circuit";

export interface ParameterInfo {
  ref: string;
  label: string;
  value: number;
  unit: string;
}

function rateUnit(r: Reaction): string {
  if (r.rate.kind === "expression") return "";
  if (r.rate.kind !== "massAction") return "molecules/min";
  const order = r.reactants.reduce((s, e) => s + e.count, 0);
  return order === 0 ? "molecules/min" : order === 1 ? "1/min" : "1/(molecule min)";
}

export function listParameters(circuit: Circuit): ParameterInfo[] {
  const out: ParameterInfo[] = [];
  const signals = new Set(circuit.signals.map((s) => s.name));
  for (const q of circuit.parameters ?? [])
    out.push({ ref: `param(${q.name})`, label: q.description ?? `parameter ${q.name}`, value: q.value, unit: "" });
  for (const r of circuit.reactions) {
    if (r.rate.kind === "expression") continue;
    if (r.rate.kind === "regulated") {
      const use = r.rate.use ?? {};
      if (use.maxRatePerMinute === undefined)
        out.push({
          ref: `rate(${r.name})`,
          label: `${r.name}: maximal rate`,
          value: r.rate.maxRatePerMinute,
          unit: "molecules/min",
        });
      if (use.leakFraction === undefined)
        out.push({ ref: `leak(${r.name})`, label: `${r.name}: leak fraction`, value: r.rate.leakFraction, unit: "" });
      for (const g of r.rate.regulators) {
        if (g.use?.halfMax === undefined)
          out.push({
            ref: `K(${r.name},${g.source})`,
            label: `${r.name}: half-max K of ${g.source}`,
            value: g.halfMax,
            unit: signals.has(g.source) ? "signal units" : "molecules",
          });
        if (g.use?.hill === undefined)
          out.push({
            ref: `n(${r.name},${g.source})`,
            label: `${r.name}: Hill coefficient of ${g.source}`,
            value: g.hill,
            unit: "",
          });
      }
    } else if (r.rate.use?.ratePerMinute === undefined) {
      out.push({
        ref: `rate(${r.name})`,
        label: `${r.name}: rate constant`,
        value: r.rate.ratePerMinute,
        unit: rateUnit(r),
      });
    }
  }
  for (const s of circuit.species)
    out.push({ ref: `init(${s.name})`, label: `${s.name}: initial count`, value: s.initialCount, unit: "molecules" });
  return out;
}

interface ParsedRef {
  kind: "rate" | "leak" | "K" | "n" | "init" | "param";
  a: string;
  b?: string;
}

export function parseParameterRef(ref: string): ParsedRef {
  const m = /^(rate|leak|K|n|init|param)\(([A-Za-z][A-Za-z0-9_]*)(?:,([A-Za-z][A-Za-z0-9_]*))?\)$/.exec(ref);
  if (!m) throw new Error(`parameter "${ref}" must look like rate(R), leak(R), K(R,S), n(R,S), init(X) or param(P)`);
  const kind = m[1] as ParsedRef["kind"];
  if ((kind === "K" || kind === "n") !== (m[3] !== undefined))
    throw new Error(`parameter "${ref}" must look like rate(R), leak(R), K(R,S), n(R,S), init(X) or param(P)`);
  return { kind, a: m[2], b: m[3] };
}

export function getParameter(circuit: Circuit, ref: string): number {
  const hit = listParameters(circuit).find((p) => p.ref === ref);
  if (!hit) throw new Error(`unknown parameter "${ref}"`);
  return hit.value;
}

/** Whether the circuit has this parameter. */
export function hasParameter(circuit: Circuit, ref: string): boolean {
  return listParameters(circuit).some((p) => p.ref === ref);
}

/** Sets param(P) and every fixed-kind field that follows it; the result must still be a valid circuit. */
function setCircuitParameter(circuit: Circuit, ref: string, name: string, value: number): Circuit {
  if (!Number.isFinite(value)) throw new Error(`parameter "${ref}": value must be finite`);
  const c: Circuit = structuredClone(circuit);
  const q = (c.parameters ?? []).find((x) => x.name === name);
  if (!q) throw new Error(`unknown parameter "${ref}": no circuit parameter "${name}"`);
  q.value = value;
  for (const r of c.reactions) {
    const rate = r.rate;
    if ((rate.kind === "massAction" || rate.kind === "constant") && rate.use?.ratePerMinute === name)
      rate.ratePerMinute = value;
    if (rate.kind === "regulated") {
      if (rate.use?.maxRatePerMinute === name) rate.maxRatePerMinute = value;
      if (rate.use?.leakFraction === name) rate.leakFraction = value;
      for (const g of rate.regulators) {
        if (g.use?.halfMax === name) g.halfMax = value;
        if (g.use?.hill === name) g.hill = value;
      }
    }
  }
  const parsed = CircuitSchema.safeParse(c);
  const problem = parsed.success ? semanticErrors(parsed.data)[0]?.message : parsed.error.issues[0]?.message;
  if (problem !== undefined) throw new Error(`parameter "${ref}" = ${value}: ${problem}`);
  return c;
}

/** Which circuit parameter a fixed-kind reference follows, if any. */
function followedBy(circuit: Circuit, ref: string): string | undefined {
  const p = parseParameterRef(ref);
  const r = circuit.reactions.find((x) => x.name === p.a);
  if (!r || p.kind === "init" || p.kind === "param") return undefined;
  const rate = r.rate;
  if (rate.kind === "massAction" || rate.kind === "constant")
    return p.kind === "rate" ? rate.use?.ratePerMinute : undefined;
  if (rate.kind !== "regulated") return undefined;
  if (p.kind === "rate") return rate.use?.maxRatePerMinute;
  if (p.kind === "leak") return rate.use?.leakFraction;
  const g = rate.regulators.find((x) => x.source === p.b);
  return p.kind === "K" ? g?.use?.halfMax : g?.use?.hill;
}

export function setParameter(circuit: Circuit, ref: string, value: number): Circuit {
  const p = parseParameterRef(ref);
  if (p.kind === "param") return setCircuitParameter(circuit, ref, p.a, value);
  if (!Number.isFinite(value) || value < 0)
    throw new Error(`parameter "${ref}": value must be finite and not negative`);
  const follows = followedBy(circuit, ref);
  if (follows !== undefined) throw new Error(`parameter "${ref}" follows param(${follows}): change param(${follows})`);
  const c: Circuit = structuredClone(circuit);
  if (p.kind === "init") {
    const s = c.species.find((x) => x.name === p.a);
    if (!s) throw new Error(`unknown parameter "${ref}": no species "${p.a}"`);
    if (!Number.isInteger(value)) throw new Error(`parameter "${ref}": an initial count must be a whole number`);
    s.initialCount = value;
    return c;
  }
  const r = c.reactions.find((x) => x.name === p.a);
  if (!r) throw new Error(`unknown parameter "${ref}": no reaction "${p.a}"`);
  if (r.rate.kind === "expression")
    throw new Error(`unknown parameter "${ref}": reaction "${p.a}" has an expression rate`);
  if (p.kind === "rate") {
    if (r.rate.kind === "regulated") r.rate.maxRatePerMinute = value;
    else r.rate.ratePerMinute = value;
    return c;
  }
  if (r.rate.kind !== "regulated") throw new Error(`unknown parameter "${ref}": reaction "${p.a}" is not regulated`);
  if (p.kind === "leak") {
    if (value > 1) throw new Error(`parameter "${ref}": leak must be between 0 and 1`);
    r.rate.leakFraction = value;
    return c;
  }
  const g = r.rate.regulators.find((x) => x.source === p.b);
  if (!g) throw new Error(`unknown parameter "${ref}": "${p.b}" does not regulate "${p.a}"`);
  if (value <= 0) throw new Error(`parameter "${ref}": must be positive`);
  if (p.kind === "K") g.halfMax = value;
  else {
    if (value > 10) throw new Error(`parameter "${ref}": Hill coefficient must be at most 10`);
    g.hill = value;
  }
  return c;
}
