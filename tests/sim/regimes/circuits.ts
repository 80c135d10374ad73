/**
 * Dimensionless textbook circuits in Linger's rate kinds, in counts with a
 * system-size factor Omega (compileModel scales maximal rates and species K by
 * Omega): Hill-repressed production a*Omega/(1+(v/Omega)^n), first-order
 * decay, and exact linear steps as mass action x -> x + y (rate k*x, x unchanged).
 */
import { CircuitSchema, type Circuit } from "@/shared/schemas/circuit";

const rep = (source: string, hill: number) => ({ source, effect: "represses" as const, halfMax: 1, hill });
const decay = (s: string) => ({
  name: `deg_${s}`,
  reactants: [{ species: s }],
  rate: { kind: "massAction" as const, ratePerMinute: 1 },
});

/** Mutual repression du/dt = a/(1+v^n) - u, dv/dt = a/(1+u^n) - v. */
export function mutualRepression(a: number, n = 2): Circuit {
  return CircuitSchema.parse({
    name: "mutual repression",
    species: [
      { name: "u", initialCount: 0 },
      { name: "v", initialCount: 0 },
    ],
    signals: [{ name: "S" }],
    reactions: [
      {
        name: "make_u",
        products: [{ species: "u" }],
        rate: { kind: "regulated", maxRatePerMinute: a, regulators: [rep("v", n)] },
      },
      {
        name: "make_v",
        products: [{ species: "v" }],
        rate: { kind: "regulated", maxRatePerMinute: a, regulators: [rep("u", n)] },
      },
      decay("u"),
      decay("v"),
    ],
    outputSpecies: "u",
  });
}

/** Ring of three repressors du_i/dt = a/(1+u_{i-1}^n) - u_i (u1 represses u2, u2 u3, u3 u1). */
export function repressorRing(a: number, n: number): Circuit {
  const s = ["u1", "u2", "u3"];
  return CircuitSchema.parse({
    name: "ring of three",
    species: s.map((name, i) => ({ name, initialCount: i === 0 ? 1 : 0 })),
    signals: [{ name: "S" }],
    reactions: [
      ...s.map((x, i) => ({
        name: `make_${x}`,
        products: [{ species: x }],
        rate: { kind: "regulated", maxRatePerMinute: a, regulators: [rep(s[(i + 2) % 3], n)] },
      })),
      ...s.map(decay),
    ],
    outputSpecies: "u1",
  });
}

/** Goodwin loop dx/dt = a/(1+z^n) - x, dy/dt = x - y, dz/dt = y - z. */
export function goodwin(a: number, n: number): Circuit {
  return CircuitSchema.parse({
    name: "goodwin",
    species: [
      { name: "x", initialCount: 0 },
      { name: "y", initialCount: 0 },
      { name: "z", initialCount: 0 },
    ],
    signals: [{ name: "S" }],
    reactions: [
      {
        name: "make_x",
        products: [{ species: "x" }],
        rate: { kind: "regulated", maxRatePerMinute: a, regulators: [rep("z", n)] },
      },
      {
        name: "make_y",
        reactants: [{ species: "x" }],
        products: [{ species: "x" }, { species: "y" }],
        rate: { kind: "massAction", ratePerMinute: 1 },
      },
      {
        name: "make_z",
        reactants: [{ species: "y" }],
        products: [{ species: "y" }, { species: "z" }],
        rate: { kind: "massAction", ratePerMinute: 1 },
      },
      decay("x"),
      decay("y"),
      decay("z"),
    ],
    outputSpecies: "z",
  });
}
