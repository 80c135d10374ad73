/**
 * The circuit editor's checks in plain words, keyed by the field they belong
 * to ("reactions.0.scaledBy"), so each message sits beside its field:
 *   "Reaction 1 is scaled by 'inducr', which is not a signal of this circuit."
 * The checks are the engine's own (semanticErrors); only the wording and the
 * path form change here.
 */
import { semanticErrors } from "@/sim/circuit/validate-circuit";
import type { Circuit, CircuitInput } from "@/shared/schemas/circuit";

/** "reactions[0].rate.regulators[1].source" -> "reactions.0.rate.regulators.1.source". */
export function dotPath(path: string): string {
  return path.replace(/\[(\d+)\]/g, ".$1").replace(/^\./, "");
}

const q = (s: string) => `'${s}'`;

/** One semantic error in plain words, from its path and the circuit; undefined when not recognised. */
export function plainWords(path: string, c: Circuit): string | undefined {
  const p = dotPath(path).split(".");
  if (p[0] === "outputSpecies") return `The output species ${q(c.outputSpecies)} is not a species of this circuit.`;
  if (p[0] === "species" && p[2] === "name") {
    const i = Number(p[1]);
    return `Species ${i + 1} is called ${q(c.species[i]?.name ?? "")}, like another species; give each species its own name.`;
  }
  if (p[0] === "signals" && p[2] === "name") {
    const i = Number(p[1]);
    const name = c.signals[i]?.name ?? "";
    return c.species.some((s) => s.name === name)
      ? `Signal ${i + 1} is called ${q(name)}, which is already a species name.`
      : `Signal ${i + 1} is called ${q(name)}, like another signal; give each signal its own name.`;
  }
  if (p[0] !== "reactions") return undefined;
  const i = Number(p[1]);
  const r = c.reactions[i];
  if (!r) return undefined;
  const who = `Reaction ${i + 1}`;
  const field = p[2];
  if (field === "name") return `${who} is called ${q(r.name)}, like another reaction; give each reaction its own name.`;
  if (field === "scaledBy") return `${who} is scaled by ${q(r.scaledBy ?? "")}, which is not a signal of this circuit.`;
  if (field === "modifiers") {
    const m = r.modifiers[Number(p[3])] ?? "";
    return `${who} depends on ${q(m)}, which is not a species or signal of this circuit.`;
  }
  if (field === "reactants" || field === "products") {
    if (p.length === 2 + 1) {
      if (field === "reactants" && r.reactants.reduce((s, e) => s + e.count, 0) > 2)
        return `${who} consumes more than two molecules; at most two (A + B or 2 A).`;
      if (field === "reactants" && r.rate.kind !== "massAction")
        return `${who} has a ${r.rate.kind === "constant" ? "constant" : "regulated"} rate, which does not depend on what it consumes, so a count could go below zero. Use mass action, or leave "Consumed by" empty.`;
      return undefined;
    }
    const k = Number(p[3]);
    const list = field === "reactants" ? r.reactants : r.products;
    const name = list[k]?.species ?? "";
    if (field === "reactants" && list.findIndex((e) => e.species === name) !== k)
      return `${who} lists ${q(name)} twice in what it consumes; write it once as 2 ${name}.`;
    return field === "reactants"
      ? `${who} consumes ${q(name)}, which is not a species of this circuit.`
      : `${who} makes ${q(name)}, which is not a species of this circuit.`;
  }
  if (field === "rate" && p[3] === "regulators" && r.rate.kind === "regulated") {
    const k = Number(p[4]);
    const src = r.rate.regulators[k]?.source ?? "";
    if (r.rate.regulators.findIndex((g) => g.source === src) !== k)
      return `Regulator ${k + 1} of reaction ${i + 1} (${q(src)}) is listed twice.`;
    return `Regulator ${k + 1} of reaction ${i + 1} is ${q(src)}, which is not a species or signal of this circuit.`;
  }
  return undefined;
}

/**
 * Plain-words problems of a circuit that passes its schema, keyed by dot path;
 * the first problem of a field wins. An engine message that has no plain
 * wording yet keeps its text without the developer prefix.
 */
export function circuitProblems(c: Circuit): Record<string, string> {
  const out: Record<string, string> = {};
  for (const e of semanticErrors(c)) {
    const k = dotPath(e.path);
    if (k in out) continue;
    out[k] = plainWords(e.path, c) ?? stripDeveloperPrefix(e.message);
  }
  return out;
}

/** Removes the `reactions[0] "R1": ` style prefix of an engine or server message. */
export function stripDeveloperPrefix(message: string): string {
  const m = message.replace(/^[a-zA-Z]+\[\d+\](?: "[^"]*")?: /, "");
  return m.charAt(0).toUpperCase() + m.slice(1);
}

/** Renames every reference to a species or signal (reactants, products, modifiers, regulators, scaledBy, output). */
export function renameReferences(c: CircuitInput, what: "species" | "signal", from: string, to: string): CircuitInput {
  if (!from || from === to) return c;
  const swap = (n: string) => (n === from ? to : n);
  return {
    ...c,
    outputSpecies: what === "species" && c.outputSpecies === from ? to : c.outputSpecies,
    reactions: (c.reactions ?? []).map((r) => ({
      ...r,
      reactants:
        what === "species" ? (r.reactants ?? []).map((e) => ({ ...e, species: swap(e.species) })) : r.reactants,
      products: what === "species" ? (r.products ?? []).map((e) => ({ ...e, species: swap(e.species) })) : r.products,
      modifiers: (r.modifiers ?? []).map(swap),
      scaledBy: what === "signal" && r.scaledBy === from ? to : r.scaledBy,
      rate:
        r.rate.kind === "regulated"
          ? { ...r.rate, regulators: (r.rate.regulators ?? []).map((g) => ({ ...g, source: swap(g.source) })) }
          : r.rate,
    })),
  };
}

/**
 * The regulator a reaction gets when switched to regulated: the first input
 * signal, else the first species the reaction does not make (never its own
 * product), else nothing (the user picks).
 */
export function defaultRegulatorSource(c: CircuitInput, reactionIndex: number): string {
  const signals = (c.signals ?? []).map((s) => s.name).filter(Boolean);
  if (signals.length) return signals[0];
  const made = new Set((c.reactions?.[reactionIndex]?.products ?? []).map((e) => e.species));
  return (c.species ?? []).map((s) => s.name).find((n) => n && !made.has(n)) ?? "";
}
