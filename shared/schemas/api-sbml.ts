/**
 * Wire contract of SBML in and out (server/routes/sbml.routes.ts; docs/api.md, "SBML").
 *
 * Routes (all under /api):
 *   POST /labs/:labId/circuits/import-sbml   lab editor  ImportSbmlRequest
 *        save false -> 200 SbmlPreview
 *        save true  -> 201 CircuitDetailResponse (a new circuit), or 200 with a new version when circuitId is given
 *        a refused model -> 422 SbmlRefusal (either way); larger than SBML_LIMITS.maxSbmlBytes -> 413
 *   GET  /circuits/:id/sbml[?programId=&signal=&endTimeMinutes=&version=]   viewer -> application/xml
 */
import { z } from "zod";
import { CircuitSchema } from "./circuit";
import { ItemNameSchema } from "./api-circuits";
import { RUN_LIMITS } from "./run-spec";

export const SBML_LIMITS = {
  /** Largest SBML document accepted for import, in bytes of UTF-8 text. */
  maxSbmlBytes: 1024 * 1024,
} as const;

/** One refused element of an SBML document: what, which id, which line, why. */
export const SbmlProblemSchema = z.object({
  /** The SBML element name (species, reaction, kineticLaw, event, rateRule, ...). */
  element: z.string(),
  /** Its id (or symbol / variable) where it has one. */
  id: z.string().nullable(),
  /** 1-based line of the element in the document. */
  line: z.number().int(),
  reason: z.string(),
});
export type SbmlProblemWire = z.infer<typeof SbmlProblemSchema>;

export const ImportSbmlRequestSchema = z.object({
  /** The SBML document as text. */
  sbml: z.string({ error: "sbml must be the SBML document as text" }).min(1, "sbml must not be empty"),
  /** false (default): only read it and answer with the preview; true: save it. */
  save: z.boolean({ error: "save must be true or false" }).default(false),
  /** Name of the new circuit; the model's name (made unique in the lab) when absent. */
  name: ItemNameSchema.optional(),
  /** Save as a new version of this circuit of the same lab instead of a new circuit. */
  circuitId: z.string().min(1).max(100).optional(),
  /** Version note (for circuitId) or creation note. */
  note: z.string().max(500, "note is at most 500 characters").optional(),
});
export type ImportSbmlRequest = z.input<typeof ImportSbmlRequestSchema>;

/** A reaction of the preview in plain words. */
export const SbmlReactionLineSchema = z.object({
  name: z.string(),
  /** E.g. "A + B -> C" ("nothing" for an empty side). */
  scheme: z.string(),
  /** How Linger reads the kinetic law, e.g. "mass action, 0.1 per minute" or "expression: k*A/(K+A)". */
  rate: z.string(),
});

/** What Linger understood of a document it can import. */
export const SbmlPreviewSchema = z.object({
  level: z.number().int(),
  version: z.number().int(),
  /** The circuit the document becomes (its name from the model's name or id). */
  circuit: CircuitSchema,
  /** Compartments with their sizes (they enter the laws as numbers). */
  compartments: z.array(z.object({ id: z.string(), size: z.number() })),
  reactions: z.array(SbmlReactionLineSchema),
  /** Readings that change nothing but are worth knowing (e.g. the time unit read as minutes). */
  notes: z.array(z.string()),
  /** Always empty in a preview (a refused document answers 422); kept so both answers have the report. */
  problems: z.array(SbmlProblemSchema),
});
export type SbmlPreview = z.infer<typeof SbmlPreviewSchema>;

/** The 422 answer: the error shape of every API error, with the refusal report. */
export const SbmlRefusalSchema = z.object({
  error: z.object({
    code: z.literal("sbml_refused"),
    message: z.string(),
    problems: z.array(SbmlProblemSchema).min(1),
  }),
});
export type SbmlRefusal = z.infer<typeof SbmlRefusalSchema>;

export const ExportSbmlQuerySchema = z.object({
  /** An input program of the same lab, written into the file as events on its signal. */
  programId: z.string().min(1).max(100).optional(),
  /** The signal the program drives; the circuit's only signal when absent. */
  signal: z.string().min(1).max(100).optional(),
  /** Program switches before this time (minutes) are written; 1440 when absent. */
  endTimeMinutes: z.coerce
    .number({ error: "endTimeMinutes must be a number" })
    .finite()
    .gt(0, "endTimeMinutes must be positive")
    .max(
      RUN_LIMITS.maxEndTimeMinutes,
      `endTimeMinutes is at most ${RUN_LIMITS.maxEndTimeMinutes.toLocaleString("en-US")}`,
    )
    .optional(),
  /** A saved version of the circuit; the current one when absent. */
  version: z.coerce.number({ error: "version must be a number" }).int().min(1).optional(),
});
export type ExportSbmlQuery = z.input<typeof ExportSbmlQuerySchema>;

/** Default end time (minutes) for writing a program's switches into an exported file. */
export const EXPORT_DEFAULT_END_MINUTES = 1440;
