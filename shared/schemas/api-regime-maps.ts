/**
 * Deterministic-only regime maps, boundary refinement and design targets
 * (docs/regimes.md, docs/api.md): request and response shapes.
 */
import { z } from "zod";
import { LaunchSweepSchema } from "./api-runs";
import { RegimeVerdictSchema } from "./regime";
import { RunSpecSchema } from "./run-spec";
import { pageSchema } from "./pagination";

/** POST /api/labs/:labId/regime-maps: the sweep launch body (name, base circuit and settings, one or two axes). */
export const LaunchRegimeMapSchema = LaunchSweepSchema;
export type LaunchRegimeMapInput = z.input<typeof LaunchRegimeMapSchema>;

export const RegimeMapPointSchema = z.object({
  index: z.number().int(),
  values: z.record(z.string(), z.number()),
  refined: z.boolean(),
  verdict: RegimeVerdictSchema,
});
export type RegimeMapPoint = z.infer<typeof RegimeMapPointSchema>;

export const RegimeMapDetailSchema = z.object({
  id: z.string(),
  labId: z.string(),
  name: z.string(),
  axes: z.array(z.object({ parameter: z.string(), values: z.array(z.number()) })),
  /** Grid points first (index i * columns + j), then refined points. */
  points: z.array(RegimeMapPointSchema),
  gridPoints: z.number().int(),
  refinedPoints: z.number().int(),
  /** Most points refinement may add (in all). */
  refinementCap: z.number().int(),
  /** Seconds the compute thread spent on the labels (all requests together). */
  computeSeconds: z.number(),
  baseSpec: RunSpecSchema,
  createdAt: z.string(),
});
export type RegimeMapDetail = z.infer<typeof RegimeMapDetailSchema>;

export const RegimeMapListItemSchema = z.object({
  id: z.string(),
  name: z.string(),
  axes: z.array(z.string()),
  gridPoints: z.number().int(),
  refinedPoints: z.number().int(),
  createdAt: z.string(),
});
export const RegimeMapListPageSchema = pageSchema(RegimeMapListItemSchema);
export type RegimeMapListItem = z.infer<typeof RegimeMapListItemSchema>;

const minutes = z.number().finite().positive();
const probability = z.number().min(0).max(1);

/** What a designer asks of a point; at least one limit. Minutes and probabilities (0 to 1). */
export const DesignTargetSchema = z
  .object({
    falsePass: z.object({ maxRate: probability, belowMinutes: minutes }).optional(),
    pass: z.object({ minProbability: probability, atMinutes: minutes }).optional(),
    delayCost: z.object({ maxMinutes: minutes }).optional(),
    oscillation: z
      .object({ minMinutes: minutes, maxMinutes: minutes })
      .refine((o) => o.minMinutes <= o.maxMinutes, {
        message: "the shortest period is above the longest",
        path: ["maxMinutes"],
      })
      .optional(),
  })
  .refine((t) => Object.values(t).some((v) => v !== undefined), {
    message: "state at least one limit",
    path: ["falsePass"],
  });
export type DesignTargetInput = z.input<typeof DesignTargetSchema>;

export const LimitResultSchema = z.object({
  limit: z.enum(["falsePass", "pass", "delayCost", "oscillation"]),
  meets: z.boolean(),
  /** Inside the limit by this much (negative: outside), in the limit's unit; null with reason when not measurable. */
  margin: z.number().nullable(),
  reason: z.string().optional(),
});

export const TargetPointSchema = z.object({
  index: z.number().int(),
  /** The point's run (sweeps) or null (deterministic maps). */
  runId: z.string().nullable(),
  values: z.record(z.string(), z.number()),
  refined: z.boolean(),
  /** Null until the point has figures (reason says why). */
  meets: z.boolean().nullable(),
  limits: z.array(LimitResultSchema),
  reason: z.string().nullable(),
  /** Fraction of cells (replicates) meeting the target, Wilson 95% interval; null with fractionReason when not given. */
  fraction: z
    .object({ fraction: z.number(), low: z.number(), high: z.number(), replicates: z.number().int() })
    .nullable(),
  fractionReason: z.string().nullable(),
});
export type TargetPoint = z.infer<typeof TargetPointSchema>;

export const TargetAnswerSchema = z.object({
  target: DesignTargetSchema,
  points: z.array(TargetPointSchema),
  meeting: z.number().int(),
  /** Minimum replicates a point needs for the fraction of cells. */
  minReplicatesForFraction: z.number().int(),
});
export type TargetAnswer = z.infer<typeof TargetAnswerSchema>;
