/**
 * Behaviour labels on the wire (docs/regimes.md): what a circuit does at a
 * run's parameters, from the mean-field model and from the stochastic
 * ensemble, each with the named numbers its rule used.
 */
import { z } from "zod";

export const REGIME_LABEL_VALUES = [
  "silent",
  "steady",
  "follower",
  "persistence filter",
  "pulse generator",
  "memory",
  "damped oscillation",
  "sustained oscillation",
  "unclear",
] as const;
export const RegimeLabelSchema = z.enum(REGIME_LABEL_VALUES);
export type RegimeLabelValue = z.infer<typeof RegimeLabelSchema>;

export const RegimeVerdictSchema = z.object({
  label: RegimeLabelSchema,
  evidence: z.record(z.string(), z.union([z.number(), z.array(z.number()), z.null()])),
  reason: z.string().optional(),
});
export type RegimeVerdictView = z.infer<typeof RegimeVerdictSchema>;

export const RunRegimeSchema = z.object({
  deterministic: RegimeVerdictSchema,
  stochastic: RegimeVerdictSchema,
});
export type RunRegimeView = z.infer<typeof RunRegimeSchema>;

/** The two labels alone (sweep points, lists); null until the run is finalised. */
export const RegimeLabelsSchema = z.object({
  deterministic: RegimeLabelSchema.nullable(),
  stochastic: RegimeLabelSchema.nullable(),
});
export type RegimeLabels = z.infer<typeof RegimeLabelsSchema>;
