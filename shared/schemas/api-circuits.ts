/**
 * Wire contract of the circuits API (server/routes/circuits.routes.ts). The
 * server validates requests with these schemas; the web app parses responses
 * with them. Times are ISO 8601 strings.
 *
 * Routes (all under /api):
 *   GET  /templates                            signed in   -> TemplatesResponse
 *   GET  /labs/:labId/circuits[?archived=1]    lab viewer  -> CircuitListResponse
 *   POST /labs/:labId/circuits                 lab editor  CreateCircuitRequest -> 201 CircuitDetailResponse
 *   POST /labs/:labId/circuits/check           lab viewer  CheckCircuitRequest  -> CheckCircuitResponse
 *   GET  /circuits/:id                         viewer      -> CircuitDetailResponse
 *   PUT  /circuits/:id                         editor      UpdateCircuitRequest -> CircuitDetailResponse (a new version)
 *   GET  /circuits/:id/versions/:version       viewer      -> CircuitVersionResponse
 *   POST /circuits/:id/duplicate               editor      DuplicateCircuitRequest -> 201 CircuitDetailResponse
 *   POST /circuits/:id/archive                 editor      -> CircuitSummary
 *   POST /circuits/:id/unarchive               editor      -> CircuitSummary
 */
import { z } from "zod";
import { CircuitSchema } from "./circuit";
import { RunRegimeSchema } from "./regime";
import { PageQuerySchema, pageSchema } from "./pagination";

/** Feed-forward templates, then the feedback ones (negative autoregulation, latch, timer ring, cross-linked ring). */
export const TEMPLATE_KEYS = [
  "simple",
  "c1ffl-and",
  "c1ffl-or",
  "i1ffl",
  "nar",
  "latch",
  "ring",
  "ring-extra",
] as const;
export const TemplateKeySchema = z.enum(TEMPLATE_KEYS);
export type TemplateKey = z.infer<typeof TemplateKeySchema>;

/** One field problem, path in dot form from the request root, e.g. "body.reactions.2.rate.regulators.0.halfMax". */
export const FieldErrorSchema = z.object({ path: z.string(), message: z.string() });
export type FieldError = z.infer<typeof FieldErrorSchema>;

/** The name of a circuit or program inside its lab (unique among non-archived items). */
export const ItemNameSchema = z
  .string({ error: "name must be text" })
  .trim()
  .min(1, "name must not be empty")
  .max(120, "name is at most 120 characters");

// ---------------------------------------------------------------- wiring
/** A regulation edge of the wiring diagram: `from` (species or signal) acts on the production of `to`. */
export const WiringEdgeSchema = z.object({
  from: z.string(),
  to: z.string(),
  sign: z.enum(["activates", "represses"]),
  /** Reactions that carry this edge. */
  reactions: z.array(z.string()),
});
export type WiringEdge = z.infer<typeof WiringEdgeSchema>;

export const WiringNodeSchema = z.object({
  name: z.string(),
  kind: z.enum(["species", "signal"]),
  isOutput: z.boolean(),
});
export type WiringNode = z.infer<typeof WiringNodeSchema>;

/**
 * A feed-forward loop X->Y, Y->Z, X->Z found in the wiring. Coherent when
 * sign(X->Z) = sign(X->Y) * sign(Y->Z). Types numbered 1-4 (common practice).
 */
export const FeedForwardSchema = z.object({
  /** "C1".."C4" or "I1".."I4". */
  code: z.enum(["C1", "C2", "C3", "C4", "I1", "I2", "I3", "I4"]),
  coherent: z.boolean(),
  typeNumber: z.number().int().min(1).max(4),
  /** E.g. "coherent type 1" or "incoherent type 1" (logic is given apart). */
  label: z.string(),
  x: z.string(),
  y: z.string(),
  z: z.string(),
  /** How Z combines X and Y when both regulate one reaction; null otherwise. */
  logic: z.enum(["and", "or"]).nullable(),
});
export type FeedForward = z.infer<typeof FeedForwardSchema>;

// ---------------------------------------------------------------- templates
export const TemplateSchema = z.object({
  key: TemplateKeySchema,
  title: z.string(),
  description: z.string(),
  circuit: CircuitSchema,
  /** The signal an input program drives. */
  inputSignal: z.string(),
  feedForward: FeedForwardSchema.nullable(),
});
export type Template = z.infer<typeof TemplateSchema>;
export const TemplatesResponseSchema = z.object({ templates: z.array(TemplateSchema) });
export type TemplatesResponse = z.infer<typeof TemplatesResponseSchema>;

export const ParameterInfoSchema = z.object({
  ref: z.string(),
  label: z.string(),
  value: z.number(),
  unit: z.string(),
});
export type ParameterInfoWire = z.infer<typeof ParameterInfoSchema>;

// ---------------------------------------------------------------- circuits
export const CircuitSummarySchema = z.object({
  id: z.string(),
  labId: z.string(),
  name: z.string(),
  description: z.string(),
  currentVersion: z.number().int(),
  speciesCount: z.number().int(),
  reactionCount: z.number().int(),
  outputSpecies: z.string(),
  /** Label of the first feed-forward loop, e.g. "coherent type 1", or null. */
  feedForwardLabel: z.string().nullable(),
  createdByName: z.string().nullable(),
  createdAt: z.string(),
  updatedAt: z.string(),
  archivedAt: z.string().nullable(),
  /** Stable key for seeded demo items; null for user items. */
  demoKey: z.string().nullable(),
});
export type CircuitSummary = z.infer<typeof CircuitSummarySchema>;

/** A page of the list (`?cursor=`, `?limit=`, shared/schemas/pagination.ts). */
export const CircuitListQuerySchema = PageQuerySchema.extend({
  /** "1" or "true": list archived circuits instead of active ones. */
  archived: z.enum(["0", "1", "true", "false"]).optional(),
});
/** One page of circuits, most recently changed first (ties by id). */
export const CircuitListResponseSchema = pageSchema(CircuitSummarySchema);
export type CircuitListResponse = z.infer<typeof CircuitListResponseSchema>;

export const CircuitVersionInfoSchema = z.object({
  version: z.number().int(),
  note: z.string().nullable(),
  createdAt: z.string(),
  createdByName: z.string().nullable(),
});
export type CircuitVersionInfo = z.infer<typeof CircuitVersionInfoSchema>;

export const CircuitDetailResponseSchema = z.object({
  circuit: CircuitSummarySchema,
  /** The current version's body. */
  body: CircuitSchema,
  /** Newest first. */
  versions: z.array(CircuitVersionInfoSchema),
  wiring: z.object({ nodes: z.array(WiringNodeSchema), edges: z.array(WiringEdgeSchema) }),
  /** The first feed-forward loop (preferring one that ends at the output), or null. */
  feedForward: FeedForwardSchema.nullable(),
  /** Every feed-forward loop in the wiring. */
  feedForwardLoops: z.array(FeedForwardSchema),
  /** Every parameter of the current body (for sweeps and cell-to-cell variation). */
  parameters: z.array(ParameterInfoSchema),
  /** Behaviour measured in this circuit's latest finalised runs and sweep points (newest first, at most 3). */
  behaviour: z
    .array(
      z.object({
        runId: z.string(),
        runName: z.string(),
        circuitVersion: z.number().int().nullable(),
        sweepId: z.string().nullable(),
        finishedAt: z.string().nullable(),
        regime: RunRegimeSchema,
      }),
    )
    .optional(),
});
export type CircuitDetailResponse = z.infer<typeof CircuitDetailResponseSchema>;

export const CircuitVersionResponseSchema = z.object({
  circuitId: z.string(),
  version: z.number().int(),
  note: z.string().nullable(),
  createdAt: z.string(),
  createdByName: z.string().nullable(),
  isCurrent: z.boolean(),
  body: CircuitSchema,
  wiring: z.object({ nodes: z.array(WiringNodeSchema), edges: z.array(WiringEdgeSchema) }),
  feedForward: FeedForwardSchema.nullable(),
});
export type CircuitVersionResponse = z.infer<typeof CircuitVersionResponseSchema>;

/**
 * Create a circuit (version 1) from a body, a template, or both (the body wins;
 * the template is then only noted). The stored body's name is the circuit name.
 */
export const CreateCircuitRequestSchema = z
  .object({
    name: ItemNameSchema,
    body: CircuitSchema.optional(),
    template: TemplateKeySchema.optional(),
    note: z.string().max(500, "note is at most 500 characters").optional(),
  })
  .refine((v) => v.body !== undefined || v.template !== undefined, {
    message: "give a circuit body or a template key",
    path: ["body"],
  });
export type CreateCircuitRequest = z.input<typeof CreateCircuitRequestSchema>;

/** Save a new version (never overwrites). baseVersion: 409 when the circuit has moved on. */
export const UpdateCircuitRequestSchema = z.object({
  body: CircuitSchema,
  note: z.string().max(500, "note is at most 500 characters").optional(),
  baseVersion: z.number().int().min(1).optional(),
  /** Rename at the same time (optional). */
  name: ItemNameSchema.optional(),
});
export type UpdateCircuitRequest = z.input<typeof UpdateCircuitRequestSchema>;

export const DuplicateCircuitRequestSchema = z.object({
  /** Name of the copy; "<name> (copy)" when absent. */
  name: ItemNameSchema.optional(),
});
export type DuplicateCircuitRequest = z.input<typeof DuplicateCircuitRequestSchema>;

/** Live validation: the body is checked as given (unknown shape allowed). */
export const CheckCircuitRequestSchema = z.object({ body: z.unknown() });
export type CheckCircuitRequest = z.input<typeof CheckCircuitRequestSchema>;
export const CheckCircuitResponseSchema = z.object({
  ok: z.boolean(),
  errors: z.array(FieldErrorSchema),
  /** When the body is valid: the wiring's feed-forward loop, if any. */
  feedForward: FeedForwardSchema.nullable(),
});
export type CheckCircuitResponse = z.infer<typeof CheckCircuitResponseSchema>;
