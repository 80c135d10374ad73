/**
 * Starting circuits for the app's "create from template" and the CLI examples:
 * the circuits of domain notes section 2, built from the same schema, named
 * for the demo scenario (signal Q = inducer "compound Q"; species qsaA in the X
 * role, hldB in the Y role, rptC the reporter in the Z role). Rates per minute,
 * amounts in molecules: X is made at 10/min while Q is on and lives 10 min
 * (about 100 copies when on); Hill K of 50-100 copies, n = 2.
 */
import { CircuitSchema, type Circuit, type CircuitInput } from "@/shared/schemas/circuit";

export type TemplateKey = "simple" | "c1ffl-and" | "c1ffl-or" | "i1ffl";

export interface CircuitTemplate {
  title: string;
  description: string;
  circuit: Circuit;
  inputSignal: string;
}

const signalQ = { name: "Q", offLevel: 0, onLevel: 1, description: "inducer (compound Q) present" };
const sensor = [
  {
    name: "makeX",
    products: [{ species: "qsaA", count: 1 }],
    rate: { kind: "constant", ratePerMinute: 10 },
    scaledBy: "Q",
  },
  { name: "degX", reactants: [{ species: "qsaA", count: 1 }], rate: { kind: "massAction", ratePerMinute: 0.1 } },
] as const;
const act = (source: string, halfMax: number) => ({ source, effect: "activates" as const, halfMax, hill: 2 });
const rep = (source: string, halfMax: number) => ({ source, effect: "represses" as const, halfMax, hill: 2 });

function build(c: CircuitInput): Circuit {
  return CircuitSchema.parse(c);
}

function ffl(name: string, description: string, logic: "and" | "or"): Circuit {
  return build({
    name,
    description,
    species: [
      { name: "qsaA", initialCount: 0, description: "sensor activator (X)" },
      { name: "hldB", initialCount: 0, description: "hold factor (Y)" },
      { name: "rptC", initialCount: 0, description: "fluorescent reporter (Z)" },
    ],
    signals: [signalQ],
    reactions: [
      ...sensor.map((r) => structuredClone(r) as never),
      {
        name: "makeY",
        products: [{ species: "hldB", count: 1 }],
        rate: { kind: "regulated", maxRatePerMinute: 10, regulators: [act("qsaA", 50)] },
      },
      { name: "degY", reactants: [{ species: "hldB", count: 1 }], rate: { kind: "massAction", ratePerMinute: 0.05 } },
      {
        name: "makeZ",
        products: [{ species: "rptC", count: 1 }],
        rate: { kind: "regulated", maxRatePerMinute: 20, logic, regulators: [act("qsaA", 50), act("hldB", 100)] },
      },
      { name: "degZ", reactants: [{ species: "rptC", count: 1 }], rate: { kind: "massAction", ratePerMinute: 0.1 } },
    ],
    outputSpecies: "rptC",
  });
}

export const templates: Record<TemplateKey, CircuitTemplate> = {
  simple: {
    title: "Simple regulation",
    description:
      "The control: the sensor activator qsaA drives the reporter rptC directly. Step response time ln 2 / 0.1 min.",
    inputSignal: "Q",
    circuit: build({
      name: "Tank sensor, direct",
      description: "Simple regulation: Q -> qsaA -> rptC.",
      species: [
        { name: "qsaA", initialCount: 0, description: "sensor activator (X)" },
        { name: "rptC", initialCount: 0, description: "fluorescent reporter (Z)" },
      ],
      signals: [signalQ],
      reactions: [
        ...sensor.map((r) => structuredClone(r) as never),
        {
          name: "makeZ",
          products: [{ species: "rptC", count: 1 }],
          rate: { kind: "regulated", maxRatePerMinute: 20, regulators: [act("qsaA", 50)] },
        },
        { name: "degZ", reactants: [{ species: "rptC", count: 1 }], rate: { kind: "massAction", ratePerMinute: 0.1 } },
      ],
      outputSpecies: "rptC",
    }),
  },
  "c1ffl-and": {
    title: "Coherent feed-forward (AND)",
    description:
      "Persistence detector: rptC needs both qsaA and the slow hold factor hldB, so brief Q spikes are filtered; delay at ON, none at OFF.",
    inputSignal: "Q",
    circuit: ffl("Tank sensor, hold", "Coherent type-1 feed-forward circuit with AND logic.", "and"),
  },
  "c1ffl-or": {
    title: "Coherent feed-forward (OR)",
    description: "Either qsaA or hldB makes rptC: no delay at ON, a delay after Q goes away.",
    inputSignal: "Q",
    circuit: ffl("Tank sensor, hold-off", "Coherent type-1 feed-forward circuit with OR logic.", "or"),
  },
  i1ffl: {
    title: "Incoherent feed-forward",
    description:
      "qsaA activates rptC and the repressor hldB, which later shuts rptC down: a timed pulse and a faster rise.",
    inputSignal: "Q",
    circuit: build({
      name: "Dosing pulse",
      description: "Incoherent type-1 feed-forward circuit: a timed pulse of the release enzyme rptC.",
      species: [
        { name: "qsaA", initialCount: 0, description: "sensor activator (X)" },
        { name: "hldB", initialCount: 0, description: "repressor (Y)" },
        { name: "rptC", initialCount: 0, description: "release enzyme / reporter (Z)" },
      ],
      signals: [signalQ],
      reactions: [
        ...sensor.map((r) => structuredClone(r) as never),
        {
          name: "makeY",
          products: [{ species: "hldB", count: 1 }],
          rate: { kind: "regulated", maxRatePerMinute: 10, regulators: [act("qsaA", 50)] },
        },
        { name: "degY", reactants: [{ species: "hldB", count: 1 }], rate: { kind: "massAction", ratePerMinute: 0.05 } },
        {
          name: "makeZ",
          products: [{ species: "rptC", count: 1 }],
          rate: {
            kind: "regulated",
            maxRatePerMinute: 20,
            leakFraction: 0.02,
            regulators: [act("qsaA", 50), rep("hldB", 40)],
          },
        },
        { name: "degZ", reactants: [{ species: "rptC", count: 1 }], rate: { kind: "massAction", ratePerMinute: 0.1 } },
      ],
      outputSpecies: "rptC",
    }),
  },
};
