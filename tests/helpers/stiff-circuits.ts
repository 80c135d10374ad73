/** Circuits whose mean-field path is costly, for the compute-budget and fairness tests. */
import type { CircuitInput } from "@/shared/schemas/circuit";

/** Three repressors in a ring with fast turnover: the mean-field path needs millions of steps over a long run. */
export const ringCircuit: CircuitInput = {
  name: "ring",
  species: [
    { name: "P", initialCount: 5 },
    { name: "Q", initialCount: 0 },
    { name: "R", initialCount: 0 },
  ],
  signals: [{ name: "S", offLevel: 0, onLevel: 1 }],
  reactions: [
    ...(
      [
        ["R", "P"],
        ["P", "Q"],
        ["Q", "R"],
      ] as const
    ).map(([from, to]) => ({
      name: `make${to}`,
      products: [{ species: to }],
      rate: {
        kind: "regulated" as const,
        maxRatePerMinute: 1000,
        leakFraction: 0.001,
        regulators: [{ source: from, effect: "represses" as const, halfMax: 10, hill: 3 }],
      },
    })),
    ...["P", "Q", "R"].map((s) => ({
      name: `deg${s}`,
      reactants: [{ species: s }],
      rate: { kind: "massAction" as const, ratePerMinute: 10 },
    })),
  ],
  outputSpecies: "R",
};
