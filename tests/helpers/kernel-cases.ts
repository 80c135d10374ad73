/**
 * What the kernel tests share: a digest over everything a chunk returns (replicate summaries, pulse records,
 * grid sums, trajectories, recorded events), the benchmark spec (docs/examples/benchmark.json) and a circuit
 * with every rate kind the kernel generator specialises on.
 */
import { createHash } from "node:crypto";
import { readFileSync } from "node:fs";
import path from "node:path";
import type { ChunkResult } from "@/sim";
import type { RunSpecInput } from "@/shared/schemas/run-spec";
import type { CircuitInput } from "@/shared/schemas/circuit";

export function digest(r: ChunkResult): string {
  const h = createHash("sha256");
  const bytes = (a: Float64Array | Int32Array) => h.update(new Uint8Array(a.buffer, a.byteOffset, a.byteLength));
  h.update(JSON.stringify({ events: r.events, replicates: r.replicates, pulses: r.pulses, aborted: r.aborted }));
  bytes(r.gridSum);
  bytes(r.gridSumSq);
  bytes(r.gridCount);
  for (const t of r.trajectories) {
    h.update(`traj${t.replicate}`);
    bytes(t.values);
  }
  for (const e of r.recordedEvents ?? []) {
    h.update(`rec${e.replicate}:${e.truncated}`);
    bytes(e.initial);
    bytes(e.times);
    bytes(e.reactions);
  }
  return h.digest("hex");
}

export const benchmark = JSON.parse(
  readFileSync(path.resolve(__dirname, "../../docs/examples/benchmark.json"), "utf8"),
) as RunSpecInput;

export /** Dimers, heterodimers, OR logic with leak, repression with a non-integer Hill exponent, a signal regulator, a signal-scaled reaction. */
const mixed: CircuitInput = {
  name: "mixed",
  species: [
    { name: "A", initialCount: 5 },
    { name: "B", initialCount: 2 },
    { name: "C", initialCount: 0 },
  ],
  signals: [{ name: "S", offLevel: 0.1, onLevel: 1 }],
  reactions: [
    { name: "makeA", products: [{ species: "A" }], rate: { kind: "constant", ratePerMinute: 6 }, scaledBy: "S" },
    {
      name: "dimer",
      reactants: [{ species: "A", count: 2 }],
      products: [{ species: "B" }],
      rate: { kind: "massAction", ratePerMinute: 0.04 },
    },
    {
      name: "bind",
      reactants: [{ species: "A" }, { species: "B" }],
      products: [{ species: "C" }],
      rate: { kind: "massAction", ratePerMinute: 0.03 },
    },
    {
      name: "split",
      reactants: [{ species: "C" }],
      products: [{ species: "A" }, { species: "B" }],
      rate: { kind: "massAction", ratePerMinute: 0.5 },
    },
    { name: "degB", reactants: [{ species: "B" }], rate: { kind: "massAction", ratePerMinute: 0.2 } },
    {
      name: "makeC",
      products: [{ species: "C", count: 2 }],
      rate: {
        kind: "regulated",
        maxRatePerMinute: 4,
        logic: "or",
        leakFraction: 0.05,
        regulators: [
          { source: "B", effect: "represses", halfMax: 6, hill: 1.7 },
          { source: "S", effect: "activates", halfMax: 0.5, hill: 2 },
        ],
      },
    },
    { name: "degC", reactants: [{ species: "C" }], rate: { kind: "massAction", ratePerMinute: 0.3 } },
    { name: "degA", reactants: [{ species: "A" }], rate: { kind: "massAction", ratePerMinute: 0.1 } },
  ],
  outputSpecies: "C",
};
