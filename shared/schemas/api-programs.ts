/**
 * Wire contract of the input-programs API (server/routes/programs.routes.ts).
 * The server validates requests with these schemas; the web app parses
 * responses with them. Times are ISO 8601 strings; program times in minutes.
 *
 * Routes (all under /api):
 *   GET  /labs/:labId/programs[?archived=1]   lab viewer -> ProgramListResponse
 *   POST /labs/:labId/programs                lab editor CreateProgramRequest -> 201 ProgramDetailResponse
 *   POST /labs/:labId/programs/preview        lab viewer PreviewProgramRequest -> PreviewProgramResponse
 *   GET  /programs/:id                        viewer     -> ProgramDetailResponse
 *   PUT  /programs/:id                        editor     UpdateProgramRequest -> ProgramDetailResponse
 *   POST /programs/:id/duplicate              editor     DuplicateProgramRequest -> 201 ProgramDetailResponse
 *   POST /programs/:id/archive                editor     -> ProgramSummary
 *   POST /programs/:id/unarchive              editor     -> ProgramSummary
 *
 * Programs are not versioned: a run stores the whole program it used.
 */
import { z } from "zod";
import { InputProgramSchema } from "./input-program";
import { RUN_LIMITS } from "./run-spec";
import { ItemNameSchema } from "./api-circuits";
import { PageQuerySchema, pageSchema } from "./pagination";

export const ProgramKindSchema = z.enum(["pulses", "periodic", "ladder", "random"]);
export type ProgramKind = z.infer<typeof ProgramKindSchema>;

export const ProgramSummarySchema = z.object({
  id: z.string(),
  labId: z.string(),
  name: z.string(),
  kind: ProgramKindSchema,
  /** One line describing the schedule, e.g. "ladder of 7 durations, 1-80 min, gap 240 min". */
  description: z.string(),
  createdByName: z.string().nullable(),
  createdAt: z.string(),
  updatedAt: z.string(),
  archivedAt: z.string().nullable(),
  demoKey: z.string().nullable(),
});
export type ProgramSummary = z.infer<typeof ProgramSummarySchema>;

/** A page of the list (`?cursor=`, `?limit=`, shared/schemas/pagination.ts). */
export const ProgramListQuerySchema = PageQuerySchema.extend({
  /** "1" or "true": list archived programs instead of active ones. */
  archived: z.enum(["0", "1", "true", "false"]).optional(),
});
/** One page of programs, most recently changed first (ties by id). */
export const ProgramListResponseSchema = pageSchema(ProgramSummarySchema);
export type ProgramListResponse = z.infer<typeof ProgramListResponseSchema>;

export const ProgramDetailResponseSchema = z.object({
  program: ProgramSummarySchema,
  body: InputProgramSchema,
});
export type ProgramDetailResponse = z.infer<typeof ProgramDetailResponseSchema>;

export const CreateProgramRequestSchema = z.object({
  name: ItemNameSchema,
  body: InputProgramSchema,
});
export type CreateProgramRequest = z.input<typeof CreateProgramRequestSchema>;

/** Replace the body and/or rename (at least one). */
export const UpdateProgramRequestSchema = z
  .object({
    name: ItemNameSchema.optional(),
    body: InputProgramSchema.optional(),
  })
  .refine((v) => v.name !== undefined || v.body !== undefined, {
    message: "give a new name or a new body",
    path: ["body"],
  });
export type UpdateProgramRequest = z.input<typeof UpdateProgramRequestSchema>;

export const DuplicateProgramRequestSchema = z.object({
  /** Name of the copy; "<name> (copy)" when absent. */
  name: ItemNameSchema.optional(),
});
export type DuplicateProgramRequest = z.input<typeof DuplicateProgramRequestSchema>;

export const PreviewProgramRequestSchema = z.object({
  program: InputProgramSchema,
  endTimeMinutes: z
    .number({ error: "end time must be a number" })
    .finite("end time must be finite")
    .gt(0, "end time must be positive")
    .max(RUN_LIMITS.maxEndTimeMinutes, `end time is at most ${RUN_LIMITS.maxEndTimeMinutes} minutes`),
});
export type PreviewProgramRequest = z.input<typeof PreviewProgramRequestSchema>;

/** A compiled pulse [on, off) in minutes; level in signal units (the signal's on level, 1, when the program sets none). */
export const PreviewPulseSchema = z.object({
  on: z.number(),
  off: z.number(),
  level: z.number(),
  /** Duration bin used for figures per pulse duration. */
  durationBin: z.number(),
});
export type PreviewPulse = z.infer<typeof PreviewPulseSchema>;

export const PreviewProgramResponseSchema = z.object({
  pulses: z.array(PreviewPulseSchema),
  /** The signal takes levels[i] from switchTimes[i] on (only times before the end). */
  switchTimes: z.array(z.number()),
  levels: z.array(z.number()),
  endTimeMinutes: z.number(),
  /** Set for random programs drawn per replicate: the preview shows one realisation. */
  note: z.string().nullable(),
});
export type PreviewProgramResponse = z.infer<typeof PreviewProgramResponseSchema>;
