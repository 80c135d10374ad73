/**
 * Scheduled and triggered events in index form (docs/circuit-format.md, Events).
 *
 * - `at` events fire at their times; `when` conditions on time alone are
 *   turned into the times at which they rise (the constants time is compared
 *   with, where the condition is false just before and true at or just after
 *   the time; times <= 0 never fire, as a condition already true at the start
 *   does not). Both become clock stops: the engines stop there exactly.
 * - `when` conditions on species (and parameters) are checked after every
 *   change of the state: the event fires when the condition turns from false
 *   to true (rising edge, no delay).
 * Every event's assignment values are computed from the state just before its
 * own assignments; events at one instant fire in the circuit's order, then
 * species conditions that rose because of them fire, again in order.
 */
import type { Circuit } from "@/shared/schemas/circuit";
import { evaluateTree, namesRead, parseExpression, timeStops, usesTime, type ExprNode } from "./expression";

export interface CompiledAssignment {
  target: "species" | "param";
  /** Species index or parameter slot. */
  index: number;
  value: ExprNode;
}

export interface CompiledEvent {
  name: string;
  /** Species-condition event: the condition; null for a scheduled (time) event. */
  condition: ExprNode | null;
  /** Times at which a scheduled event fires (sorted). */
  times: number[];
  /** Species read by the condition. */
  readsSpecies: number[];
  assigns: CompiledAssignment[];
}

/** Times at which a condition on time alone turns true (t > 0). */
export function risingTimes(cond: ExprNode): number[] {
  const cs = [...timeStops(cond)].sort((a, b) => a - b);
  const at = (t: number) => evaluateTree(cond, () => NaN, t) === true;
  const out: number[] = [];
  for (let k = 0; k < cs.length; k++) {
    const c = cs[k];
    if (!(c > 0)) continue;
    const before = k === 0 ? c - 1 : 0.5 * (cs[k - 1] + c);
    const after = k === cs.length - 1 ? c + 1 : 0.5 * (c + cs[k + 1]);
    if (!at(before) && (at(c) || at(after))) out.push(c);
  }
  return out;
}

export function compileEvents(
  circuit: Circuit,
  speciesIndex: ReadonlyMap<string, number>,
  paramSlot: ReadonlyMap<string, number>,
): CompiledEvent[] {
  const scope = {
    species: new Set(speciesIndex.keys()),
    signals: new Set(circuit.signals.map((s) => s.name)),
    params: new Set(paramSlot.keys()),
  };
  return (circuit.events ?? []).map((e) => {
    let condition: ExprNode | null = null;
    let times: number[] = [];
    if (e.at !== undefined) times = [...new Set(e.at)].sort((a, b) => a - b);
    else {
      const res = parseExpression(e.when!, scope, "bool");
      if (!res.ok) throw new Error(`event "${e.name}": condition ${res.error.message}`);
      if (usesTime(res.tree)) times = risingTimes(res.tree);
      else condition = res.tree;
    }
    const assigns = e.assign.map((a) => {
      const res = parseExpression(a.value, { ...scope, allowTime: false });
      if (!res.ok) throw new Error(`event "${e.name}": value of ${a.target} ${res.error.message}`);
      const isSpecies = speciesIndex.has(a.target);
      return {
        target: isSpecies ? ("species" as const) : ("param" as const),
        index: isSpecies ? speciesIndex.get(a.target)! : paramSlot.get(a.target)!,
        value: res.tree,
      };
    });
    const readsSpecies = condition ? [...namesRead(condition).species].map((n) => speciesIndex.get(n)!) : [];
    return { name: e.name, condition, times, readsSpecies: readsSpecies.sort((a, b) => a - b), assigns };
  });
}
