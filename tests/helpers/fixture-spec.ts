/**
 * The smallest valid circuit, program and run spec (one output made while the input
 * is on, first-order decay; two input pulses; two replicates), for tests that need
 * stored objects of every kind rather than any particular result.
 */
import { CircuitSchema } from "@/shared/schemas/circuit";
import { InputProgramSchema } from "@/shared/schemas/input-program";
import { RunSpecSchema } from "@/shared/schemas/run-spec";

export function fixtureSpec(name: string, seed: string) {
  const circuit = CircuitSchema.parse({
    name,
    species: [{ name: "Sensor", initialCount: 0 }],
    signals: [{ name: "Inducer" }],
    reactions: [
      {
        name: "make",
        products: [{ species: "Sensor" }],
        rate: { kind: "constant", ratePerMinute: 1 },
        scaledBy: "Inducer",
      },
      { name: "decay", reactants: [{ species: "Sensor" }], rate: { kind: "massAction", ratePerMinute: 0.1 } },
    ],
    outputSpecies: "Sensor",
  });
  const program = InputProgramSchema.parse({ kind: "periodic", start: 10, onDuration: 20, offDuration: 40, count: 2 });
  const spec = RunSpecSchema.parse({
    circuit,
    program,
    inputSignal: "Inducer",
    endTimeMinutes: 100,
    gridStepMinutes: 1,
    replicates: 2,
    seed,
  });
  return { circuit, program, spec };
}
