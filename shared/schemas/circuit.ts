/**
 * Linger's circuit format: species with initial counts, external signals set by
 * an input program, and reactions with stoichiometry and a rate law.
 *
 * Units: time in minutes, amounts in molecules (counts). Documented with a
 * worked example per rate law in docs/circuit-format.md.
 *
 * The structure maps onto SBML Level 3 (species, parameters, reactions with
 * reactants/products/modifiers and a kinetic law), so an exporter can be added
 * without changing stored circuits.
 */
import { z } from "zod";

/** Limits that keep one circuit small enough for the per-circuit inner loop. */
export const CIRCUIT_LIMITS = {
  maxSpecies: 50,
  maxSignals: 8,
  maxReactions: 200,
  maxRegulatorsPerReaction: 6,
  maxNameLength: 40,
  maxParameters: 100,
  maxEvents: 50,
  maxExpressionLength: 2000,
} as const;

/** Names are identifiers so they can appear in parameter references and CSV headers. */
export const NameSchema = z
  .string()
  .min(1, "must not be empty")
  .max(CIRCUIT_LIMITS.maxNameLength, `at most ${CIRCUIT_LIMITS.maxNameLength} characters`)
  .regex(/^[A-Za-z][A-Za-z0-9_]*$/, "letters, digits and _ only, starting with a letter");

const nonNegative = (what: string) =>
  z
    .number({ error: `${what} must be a number` })
    .finite(`${what} must be finite`)
    .min(0, `${what} must not be negative`);
const positive = (what: string) =>
  z
    .number({ error: `${what} must be a number` })
    .finite(`${what} must be finite`)
    .gt(0, `${what} must be positive`);

export const SpeciesSchema = z.object({
  name: NameSchema,
  initialCount: z
    .number()
    .int("initial count must be a whole number")
    .min(0, "initial count must not be negative")
    .max(1e9),
  description: z.string().max(200).optional(),
});
export type Species = z.infer<typeof SpeciesSchema>;

/** An external, piecewise-constant input (for example an inducer), set by the input program. */
export const SignalSchema = z.object({
  name: NameSchema,
  /** Level while the program is off. */
  offLevel: nonNegative("off level").default(0),
  /** Level while a pulse is on (a program pulse may override it). */
  onLevel: nonNegative("on level").default(1),
  description: z.string().max(200).optional(),
});
export type Signal = z.infer<typeof SignalSchema>;

export const StoichEntrySchema = z.object({
  species: NameSchema,
  count: z.number().int().min(1).max(2).default(1),
});
export type StoichEntry = z.infer<typeof StoichEntrySchema>;

/** One regulator of a regulated-production rate: a Hill term of a species or signal. */
export const RegulatorSchema = z.object({
  /** A species or signal name. */
  source: NameSchema,
  effect: z.enum(["activates", "represses"]),
  /** Half-maximal level K, in molecules (or signal units). */
  halfMax: positive("half-max K"),
  /** Hill coefficient n. */
  hill: positive("Hill coefficient n").max(10, "Hill coefficient n must be at most 10"),
  /** Names the circuit parameters K and n follow. */
  use: z.object({ halfMax: NameSchema.optional(), hill: NameSchema.optional() }).optional(),
});
export type Regulator = z.infer<typeof RegulatorSchema>;

/**
 * A named parameter of the circuit (a number in the units its uses need).
 * Expressions read it by name; a fixed-kind field follows it when the rate law
 * (or regulator) names it under `use` (the field must then hold the same
 * value); sweeps and cell-to-cell variation refer to it as param(NAME).
 */
export const ParameterSchema = z.object({
  name: NameSchema,
  value: z.number({ error: "value must be a number" }).finite("value must be finite"),
  description: z.string().max(200).optional(),
});
export type Parameter = z.infer<typeof ParameterSchema>;

export const RateLawSchema = z.discriminatedUnion("kind", [
  /**
   * Mass action. Propensity k * (combinations of reactants): k for no reactant,
   * k*A for A ->, k*A*B for A + B ->, k*A*(A-1)/2 for 2A ->. The mean-field rate
   * of 2A -> is k*A^2/2, matching the stochastic constant.
   */
  z.object({
    kind: z.literal("massAction"),
    ratePerMinute: nonNegative("rate constant"),
    /** Names the circuit parameter the rate constant follows. */
    use: z.object({ ratePerMinute: NameSchema.optional() }).optional(),
  }),
  /** Constant production, independent of any amount: 0 -> P at a fixed rate. */
  z.object({
    kind: z.literal("constant"),
    ratePerMinute: nonNegative("rate"),
    use: z.object({ ratePerMinute: NameSchema.optional() }).optional(),
  }),
  /**
   * Regulated production: maxRate * (leak + (1 - leak) * f), where f combines the
   * regulators' Hill terms h_i: AND = product of h_i; OR = 1 - product(1 - h_i)
   * (at least one independent site active). Activation h = x^n/(K^n+x^n),
   * repression h = K^n/(K^n+x^n).
   */
  z.object({
    kind: z.literal("regulated"),
    maxRatePerMinute: nonNegative("maximal rate"),
    logic: z.enum(["and", "or"]).default("and"),
    leakFraction: z.number().min(0, "leak must be between 0 and 1").max(1, "leak must be between 0 and 1").default(0),
    regulators: z
      .array(RegulatorSchema)
      .min(1, "needs at least one regulator")
      .max(CIRCUIT_LIMITS.maxRegulatorsPerReaction),
    use: z.object({ maxRatePerMinute: NameSchema.optional(), leakFraction: NameSchema.optional() }).optional(),
  }),
  /**
   * An arithmetic expression for the propensity (molecules per minute) over
   * species amounts, signals, parameters and time; syntax and rules in
   * docs/circuit-format.md (checked by sim/circuit/expression.ts). Written in
   * molecule counts: system size does not rescale it.
   */
  z.object({
    kind: z.literal("expression"),
    formula: z
      .string()
      .min(1, "formula must not be empty")
      .max(CIRCUIT_LIMITS.maxExpressionLength, `formula: at most ${CIRCUIT_LIMITS.maxExpressionLength} characters`),
  }),
]);
export type RateLaw = z.infer<typeof RateLawSchema>;

export const ReactionSchema = z.object({
  name: NameSchema,
  /** Consumed by the reaction (and, for mass action, setting its order). */
  reactants: z.array(StoichEntrySchema).max(2).default([]),
  /** Made by the reaction. */
  products: z.array(StoichEntrySchema).max(4).default([]),
  /** Species that act only through the rate (regulators are modifiers implicitly). */
  modifiers: z.array(NameSchema).max(8).default([]),
  rate: RateLawSchema,
  /** Optional signal that multiplies the whole rate (for example production only while induced). */
  scaledBy: NameSchema.optional(),
  description: z.string().max(200).optional(),
});
export type Reaction = z.infer<typeof ReactionSchema>;

/** One assignment of an event: a species amount or a parameter gets the value of an expression. */
export const EventAssignmentSchema = z.object({
  /** A species or parameter name. */
  target: NameSchema,
  /** An expression over species amounts, signals and parameters (no time), evaluated just before the event. */
  value: z.string().min(1, "value must not be empty").max(CIRCUIT_LIMITS.maxExpressionLength),
});

/**
 * A scheduled or triggered event (docs/circuit-format.md, Events): at the
 * given times, or whenever the condition `when` becomes true (rising edge; a
 * condition on species alone, or on time alone), the assignments are made.
 */
export const EventSchema = z
  .object({
    name: NameSchema,
    /** Times (minutes, after the start) at which the event fires. */
    at: z.array(positive("event time")).min(1).max(1000).optional(),
    /** A condition; the event fires each time it turns from false to true. */
    when: z.string().min(1, "condition must not be empty").max(CIRCUIT_LIMITS.maxExpressionLength).optional(),
    assign: z.array(EventAssignmentSchema).min(1, "needs at least one assignment").max(20),
    description: z.string().max(200).optional(),
  })
  .refine((e) => (e.at === undefined) !== (e.when === undefined), {
    message: "give either at (times) or when (a condition), not both",
  });
export type CircuitEvent = z.infer<typeof EventSchema>;

/**
 * An assignment rule: the species `target` always equals the expression
 * `value` over other species and parameters (re-applied after every change of
 * the state; docs/circuit-format.md, Assignment rules).
 */
export const AssignmentRuleSchema = z.object({
  target: NameSchema,
  value: z.string().min(1, "value must not be empty").max(CIRCUIT_LIMITS.maxExpressionLength),
});
export type AssignmentRule = z.infer<typeof AssignmentRuleSchema>;

export const CircuitSchema = z.object({
  name: z.string().min(1, "name must not be empty").max(120),
  description: z.string().max(2000).default(""),
  species: z.array(SpeciesSchema).min(1, "needs at least one species").max(CIRCUIT_LIMITS.maxSpecies),
  signals: z.array(SignalSchema).max(CIRCUIT_LIMITS.maxSignals).default([]),
  reactions: z.array(ReactionSchema).min(1, "needs at least one reaction").max(CIRCUIT_LIMITS.maxReactions),
  /** Named parameters (see ParameterSchema). */
  parameters: z.array(ParameterSchema).max(CIRCUIT_LIMITS.maxParameters).optional(),
  /** Scheduled and triggered events, in firing order for events at the same instant. */
  events: z.array(EventSchema).max(CIRCUIT_LIMITS.maxEvents).optional(),
  /** Assignment rules, applied in list order. */
  rules: z.array(AssignmentRuleSchema).max(20).optional(),
  /** The species the filter figures are about (the reporter). */
  outputSpecies: NameSchema,
});
export type Circuit = z.infer<typeof CircuitSchema>;
/** What a client sends (defaults not yet applied). */
export type CircuitInput = z.input<typeof CircuitSchema>;

/**
 * A parameter reference used by sweeps and cell-to-cell variation:
 *   rate(R)     mass-action / constant rate or maximal rate of reaction R
 *   leak(R)     leak fraction of regulated reaction R
 *   K(R,S)      half-max of regulator S in reaction R
 *   n(R,S)      Hill coefficient of regulator S in reaction R
 *   init(X)     initial count of species X
 *   param(P)    the circuit parameter named P
 */
export const ParameterRefSchema = z
  .string()
  .regex(
    /^(rate|leak|init|param)\([A-Za-z][A-Za-z0-9_]*\)$|^(K|n)\([A-Za-z][A-Za-z0-9_]*,[A-Za-z][A-Za-z0-9_]*\)$/,
    "parameter must look like rate(R), leak(R), K(R,S), n(R,S), init(X) or param(P)",
  );
export type ParameterRef = z.infer<typeof ParameterRefSchema>;
