/**
 * The wiring of a circuit as signed regulation edges, and the feed-forward
 * loops in it with their sign type.
 *
 * Edges ("from acts on the production of to"):
 *   - a regulator of a regulated reaction acts on every species the reaction
 *     makes (net gain), with its own sign, and on every species the reaction
 *     uses up (net loss) with the opposite sign (regulated removal);
 *   - a signal that scales a reaction (scaledBy) activates what it makes;
 *   - a catalyst of a mass-action reaction (a reactant given back unchanged,
 *     e.g. X -> X + Y) activates what the reaction makes.
 * Edges with the same ends and sign are merged (their reactions listed).
 *
 * Feed-forward loop: three distinct nodes with edges X->Y, Y->Z and X->Z,
 * each with one sign. Coherent when sign(X->Z) = sign(X->Y) * sign(Y->Z)
 * (Mangan & Alon 2003, PNAS 100:11980). Of the 8 sign patterns, 4 are coherent and 4
 * incoherent, numbered type 1 to 4 as is common practice; the numbering below
 * (signs of X->Y, Y->Z, X->Z) is from memory of Mangan & Alon 2003, PNAS
 * 100:11980, Fig. 1, where type k incoherent is type k coherent with the Y->Z
 * sign flipped:
 *   C1 + + +   C2 - + -   C3 + - -   C4 - - +
 *   I1 + - +   I2 - - -   I3 + + -   I4 - + +
 */
import type { Circuit } from "@/shared/schemas/circuit";
import type { FeedForward, WiringEdge, WiringNode } from "@/shared/schemas/api-circuits";

export type Sign = "activates" | "represses";
export interface Wiring {
  nodes: WiringNode[];
  edges: WiringEdge[];
}

const flip = (s: Sign): Sign => (s === "activates" ? "represses" : "activates");

/** The signed regulation edges of a circuit (self-loops kept: autoregulation). */
export function wiringOf(circuit: Circuit): Wiring {
  const signalNames = new Set(circuit.signals.map((s) => s.name));
  const nodes: WiringNode[] = [
    ...circuit.species.map((s) => ({
      name: s.name,
      kind: "species" as const,
      isOutput: s.name === circuit.outputSpecies,
    })),
    ...circuit.signals.map((s) => ({ name: s.name, kind: "signal" as const, isOutput: false })),
  ];
  const byKey = new Map<string, WiringEdge>();
  const add = (from: string, to: string, sign: Sign, reaction: string) => {
    const key = `${from}\u0000${to}\u0000${sign}`;
    const e = byKey.get(key);
    if (e) {
      if (!e.reactions.includes(reaction)) e.reactions.push(reaction);
    } else byKey.set(key, { from, to, sign, reactions: [reaction] });
  };
  for (const r of circuit.reactions) {
    const net = new Map<string, number>();
    for (const e of r.reactants) net.set(e.species, (net.get(e.species) ?? 0) - e.count);
    for (const e of r.products) net.set(e.species, (net.get(e.species) ?? 0) + e.count);
    const made = [...net].filter(([, n]) => n > 0).map(([s]) => s);
    const usedUp = [...net].filter(([, n]) => n < 0).map(([s]) => s);
    if (r.rate.kind === "regulated") {
      for (const g of r.rate.regulators) {
        for (const t of made) add(g.source, t, g.effect, r.name);
        for (const t of usedUp) add(g.source, t, flip(g.effect), r.name);
      }
    } else if (r.rate.kind === "massAction") {
      const catalysts = r.reactants.filter((e) => net.get(e.species) === 0).map((e) => e.species);
      for (const c of catalysts) for (const t of made) add(c, t, "activates", r.name);
    }
    if (r.scaledBy && signalNames.has(r.scaledBy)) for (const t of made) add(r.scaledBy, t, "activates", r.name);
  }
  return { nodes, edges: [...byKey.values()] };
}

const TYPES: Record<string, { code: FeedForward["code"]; coherent: boolean; typeNumber: number }> = {
  "+++": { code: "C1", coherent: true, typeNumber: 1 },
  "-+-": { code: "C2", coherent: true, typeNumber: 2 },
  "+--": { code: "C3", coherent: true, typeNumber: 3 },
  "--+": { code: "C4", coherent: true, typeNumber: 4 },
  "+-+": { code: "I1", coherent: false, typeNumber: 1 },
  "---": { code: "I2", coherent: false, typeNumber: 2 },
  "++-": { code: "I3", coherent: false, typeNumber: 3 },
  "-++": { code: "I4", coherent: false, typeNumber: 4 },
};

/** The sign type of a loop from its three edge signs (X->Y, Y->Z, X->Z). */
export function feedForwardType(
  xy: Sign,
  yz: Sign,
  xz: Sign,
): { code: FeedForward["code"]; coherent: boolean; typeNumber: number; label: string } {
  const key = [xy, yz, xz].map((s) => (s === "activates" ? "+" : "-")).join("");
  const t = TYPES[key];
  return { ...t, label: `${t.coherent ? "coherent" : "incoherent"} type ${t.typeNumber}` };
}

/**
 * Every feed-forward loop of the wiring. Node pairs with both signs (for
 * example activation in one reaction and repression in another) are skipped:
 * their type is not defined. Loops ending at the output species come first.
 */
export function findFeedForwardLoops(circuit: Circuit, wiring: Wiring = wiringOf(circuit)): FeedForward[] {
  const signs = new Map<string, Set<Sign>>();
  for (const e of wiring.edges) {
    if (e.from === e.to) continue;
    const k = `${e.from}\u0000${e.to}`;
    if (!signs.has(k)) signs.set(k, new Set());
    signs.get(k)!.add(e.sign);
  }
  const single = (a: string, b: string): Sign | null => {
    const s = signs.get(`${a}\u0000${b}`);
    return s && s.size === 1 ? [...s][0] : null;
  };
  const outs = new Map<string, string[]>();
  for (const k of signs.keys()) {
    const [a, b] = k.split("\u0000");
    if (!outs.has(a)) outs.set(a, []);
    outs.get(a)!.push(b);
  }
  const loops: FeedForward[] = [];
  for (const [x, ys] of outs) {
    for (const y of ys) {
      const xy = single(x, y);
      if (!xy) continue;
      for (const z of outs.get(y) ?? []) {
        if (z === x) continue;
        const yz = single(y, z);
        const xz = single(x, z);
        if (!yz || !xz) continue;
        const t = feedForwardType(xy, yz, xz);
        loops.push({ ...t, x, y, z, logic: logicAt(circuit, x, y, z) });
      }
    }
  }
  const out = circuit.outputSpecies;
  return loops.sort((a, b) => Number(b.z === out) - Number(a.z === out));
}

/** The logic of the regulated reaction making Z with both X and Y as regulators, if there is one. */
function logicAt(circuit: Circuit, x: string, y: string, z: string): "and" | "or" | null {
  for (const r of circuit.reactions) {
    if (r.rate.kind !== "regulated") continue;
    if (!r.products.some((p) => p.species === z)) continue;
    const srcs = new Set(r.rate.regulators.map((g) => g.source));
    if (srcs.has(x) && srcs.has(y)) return r.rate.logic;
  }
  return null;
}
