/**
 * Starting circuits for the app's "create from template" and the CLI examples:
 * simple regulation and the feed-forward circuits (Mangan & Alon 2003, PNAS
 * 100:11980; sign-sensitive delay of the coherent type: Mangan, Zaslaver & Alon
 * 2003, J Mol Biol 334:197; both from memory), built from the same schema, named
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

/**
 * Circuits with feedback, in the same scenario's words (invented genes): a
 * sensor that limits itself, a latch that remembers an exposure, a three-gene
 * timer ring and the ring with one extra repression. Dimensionless strength of
 * a repressor a = maxRate / (decay * K); defaults chosen so that each shows its
 * textbook behaviour (checked in tests/sim/regimes/feedback-templates.test.ts).
 * Offered by the app's template list (TEMPLATE_KEYS) after the feed-forward ones.
 */
export type FeedbackTemplateKey = "nar" | "latch" | "ring" | "ring-extra";

const deg = (name: string, species: string, rate = 0.1) => ({
  name,
  reactants: [{ species, count: 1 }],
  rate: { kind: "massAction" as const, ratePerMinute: rate },
});
const repN = (source: string, halfMax: number, hill: number) => ({
  source,
  effect: "represses" as const,
  halfMax,
  hill,
});
const ringSpecies = [
  { name: "tmrA", initialCount: 50, description: "timer repressor A (reporter fused)" },
  { name: "tmrB", initialCount: 0, description: "timer repressor B" },
  { name: "tmrC", initialCount: 0, description: "timer repressor C" },
];
/**
 * Ring tmrA -| tmrB -| tmrC -| tmrA, a = 100/(0.1*100) = 10, n = 3 (above the Hopf point a = 3.78).
 * With the extra edge tmrB -| tmrA (K 100), tmrC represses tmrA only weakly (K 800), so the tmrA/tmrB
 * pair is a switch: two stable states, tmrA low or high. Compound Q adds tmrA at 40 per minute in both.
 */
const ringReactions = (extra: boolean) => [
  {
    name: "makeA",
    products: [{ species: "tmrA", count: 1 }],
    rate: {
      kind: "regulated" as const,
      maxRatePerMinute: 100,
      regulators: extra ? [repN("tmrC", 800, 3), repN("tmrB", 100, 3)] : [repN("tmrC", 100, 3)],
    },
  },
  {
    name: "makeB",
    products: [{ species: "tmrB", count: 1 }],
    rate: { kind: "regulated" as const, maxRatePerMinute: 100, regulators: [repN("tmrA", 100, 3)] },
  },
  {
    name: "makeC",
    products: [{ species: "tmrC", count: 1 }],
    rate: { kind: "regulated" as const, maxRatePerMinute: 100, regulators: [repN("tmrB", 100, 3)] },
  },
  {
    // compound Q adds tmrA (the input's way into the ring; zero with Q off, so the OFF dynamics are the ring's own)
    name: "kickA",
    products: [{ species: "tmrA", count: 1 }],
    rate: { kind: "constant" as const, ratePerMinute: 40 },
    scaledBy: "Q",
  },
  deg("degA", "tmrA"),
  deg("degB", "tmrB"),
  deg("degC", "tmrC"),
];

export const feedbackTemplates: Record<FeedbackTemplateKey, CircuitTemplate> = {
  nar: {
    title: "Self-limiting sensor",
    description:
      "Negative autoregulation: compound Q induces the sensor limA, which represses its own gene; a faster rise to a lower, steadier level.",
    inputSignal: "Q",
    circuit: build({
      name: "Tank sensor, self-limiting",
      description: "Negative autoregulation: limA represses its own production while Q induces it.",
      species: [{ name: "limA", initialCount: 0, description: "self-limiting sensor (reporter fused)" }],
      signals: [signalQ],
      reactions: [
        {
          name: "makeA",
          products: [{ species: "limA", count: 1 }],
          rate: { kind: "regulated", maxRatePerMinute: 50, regulators: [repN("limA", 50, 2)] },
          scaledBy: "Q",
        },
        deg("degA", "limA"),
      ],
      outputSpecies: "limA",
    }),
  },
  latch: {
    title: "Exposure latch",
    description:
      "Mutual-repression switch: ltcA and ltcB repress each other (a = 4 > 2, bistable); compound Q pushes ltcA on, and it stays on after Q is gone.",
    inputSignal: "Q",
    circuit: build({
      name: "Tank latch",
      description: "Mutual-repression switch set by compound Q.",
      species: [
        { name: "ltcA", initialCount: 0, description: "latch repressor A (reporter fused)" },
        { name: "ltcB", initialCount: 200, description: "latch repressor B" },
      ],
      signals: [signalQ],
      reactions: [
        {
          name: "makeA",
          products: [{ species: "ltcA", count: 1 }],
          rate: { kind: "regulated", maxRatePerMinute: 40, regulators: [repN("ltcB", 100, 2)] },
        },
        {
          name: "setA",
          products: [{ species: "ltcA", count: 1 }],
          rate: { kind: "constant", ratePerMinute: 40 },
          scaledBy: "Q",
        },
        {
          name: "makeB",
          products: [{ species: "ltcB", count: 1 }],
          rate: { kind: "regulated", maxRatePerMinute: 40, regulators: [repN("ltcA", 100, 2)] },
        },
        deg("degA", "ltcA"),
        deg("degB", "ltcB"),
      ],
      outputSpecies: "ltcA",
    }),
  },
  ring: {
    title: "Timer ring",
    description:
      "A ring of three repressors (tmrA -| tmrB -| tmrC -| tmrA, n = 3): at these strengths it oscillates for ever; weaker genes only ring down. Compound Q adds tmrA.",
    inputSignal: "Q",
    circuit: build({
      name: "Tank timer ring",
      description: "Ring of three repressors; compound Q adds tmrA.",
      species: ringSpecies,
      signals: [signalQ],
      reactions: ringReactions(false),
      outputSpecies: "tmrA",
    }),
  },
  "ring-extra": {
    title: "Timer ring with a cross-link",
    description:
      "The timer ring plus one extra repression (tmrB -| tmrA, with tmrC -| tmrA made weak): tmrA and tmrB now form a switch that stops the ring in one of two states. Compound Q adds tmrA.",
    inputSignal: "Q",
    circuit: build({
      name: "Tank timer ring, cross-linked",
      description: "Ring of three repressors with one extra repression edge tmrB -| tmrA.",
      species: ringSpecies,
      signals: [signalQ],
      reactions: ringReactions(true),
      outputSpecies: "tmrA",
    }),
  },
};

/** Every template the app offers, feed-forward then feedback (keys as in TEMPLATE_KEYS). */
export const allTemplates: Record<TemplateKey | FeedbackTemplateKey, CircuitTemplate> = {
  ...templates,
  ...feedbackTemplates,
};
