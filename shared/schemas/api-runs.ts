/** Request and response shapes of the runs, sweeps and comparison API. */
import { RegimeLabelsSchema, RunRegimeSchema } from "./regime";
import { z } from "zod";
import { PageQuerySchema, pageSchema } from "./pagination";
import { CircuitSchema, NameSchema, ParameterRefSchema } from "./circuit";
import { InputProgramSchema } from "./input-program";
import { RunSpecSchema, SeedSchema } from "./run-spec";
import { AccelerationSchema, RunSettingsBlockSchema } from "./analysis";

export const RUN_STATUS = ["queued", "running", "finished", "failed", "capped", "cancelled"] as const;
export type RunStatus = (typeof RUN_STATUS)[number];
/** The statuses of a run that finished with its figures (capped: some replicates stopped at the event cap). */
export const FINISHED_RUN_STATUSES = ["finished", "capped"] as const satisfies readonly RunStatus[];
/** Whether a run (or a sweep point) with this status finished with its figures: one of FINISHED_RUN_STATUSES. */
export const isFinishedRunStatus = (status: string): boolean =>
  (FINISHED_RUN_STATUSES as readonly string[]).includes(status);
/** The statuses of a run that ended, finished or not. */
export const ENDED_RUN_STATUSES = ["finished", "capped", "failed", "cancelled"] as const satisfies readonly RunStatus[];

/** Limits enforced by the API with 4xx answers (documented in the README). */
export const API_LIMITS = {
  /** Stored (replicate, input pulse) rows per run. */
  maxPulseRowsPerRun: 2_000_000,
  /** Runs queued or running per lab (sweep points not counted). */
  maxActiveRunsPerLab: 20,
  /** Sweeps queued or running per lab. */
  maxActiveSweepsPerLab: 3,
  maxSweepPoints: 400,
  /** Replicates x points in one sweep. */
  maxSweepReplicates: 400_000,
  /** Points boundary refinement may add to one sweep or regime map (in all, over every refine request). */
  maxRefinementPoints: 200,
  /** Points of a deterministic-only regime map's grid. */
  maxRegimeMapPoints: 400,
  /** Replicates per point whose own figures are stored for design targets (the first ones). */
  maxReplicateFiguresPerPoint: 1000,
  /** Days a deleted run can be restored. */
  undoDays: 7,
  /** Largest JSON request body (a run bundle travels inside one). */
  maxJsonBodyBytes: 2 * 1024 * 1024,
  /** Run ids in one `GET /api/labs/:labId/runs?ids=` look-up. */
  maxRunIdsPerLookup: 100,
} as const;

/** Settings of a run: the RunSpec without circuit, program and input signal; the seed is optional (random when absent). */
export const RunSettingsSchema = RunSpecSchema.omit({ circuit: true, program: true, inputSignal: true }).extend({
  seed: SeedSchema.optional(),
});
export type RunSettings = z.infer<typeof RunSettingsSchema>;
export type RunSettingsInput = z.input<typeof RunSettingsSchema>;

/** What a run computes: a stored circuit (current version unless circuitVersion) or an inline one, a stored or inline program, and settings. */
export const RunInputsSchema = z.object({
  circuitId: z.string().optional(),
  circuitVersion: z.number().int().min(1).optional(),
  circuit: CircuitSchema.optional(),
  programId: z.string().optional(),
  program: InputProgramSchema.optional(),
  /** The signal the program drives; default: the circuit's first signal. */
  inputSignal: NameSchema.optional(),
  settings: RunSettingsSchema,
});
export type RunInputs = z.infer<typeof RunInputsSchema>;

const oneOfEach = <T extends z.ZodType<RunInputs>>(schema: T) =>
  schema
    .refine((v) => !!v.circuitId !== !!v.circuit, { message: "give either circuitId or circuit", path: ["circuitId"] })
    .refine((v) => !!v.programId !== !!v.program, { message: "give either programId or program", path: ["programId"] });

export const RunInputsCheckedSchema = oneOfEach(RunInputsSchema);

export const LaunchRunSchema = oneOfEach(
  RunInputsSchema.extend({
    name: z.string().trim().min(1, "name must not be empty").max(120),
    notes: z.string().max(5000).default(""),
  }),
);
export type LaunchRun = z.infer<typeof LaunchRunSchema>;
export type LaunchRunInput = z.input<typeof LaunchRunSchema>;

export const RunProgressSchema = z.object({
  replicatesDone: z.number(),
  replicates: z.number(),
  fraction: z.number(),
  eventsPerSecond: z.number().nullable(),
  secondsLeft: z.number().nullable(),
});
export type RunProgressView = z.infer<typeof RunProgressSchema>;

export const RunListItemSchema = z.object({
  id: z.string(),
  labId: z.string(),
  name: z.string(),
  status: z.enum(RUN_STATUS),
  statusReason: z.string().nullable(),
  replicates: z.number(),
  seed: z.string(),
  circuitName: z.string(),
  programName: z.string(),
  sweepId: z.string().nullable(),
  controlOf: z.string().nullable(),
  progress: RunProgressSchema,
  createdAt: z.string(),
  finishedAt: z.string().nullable(),
  archived: z.boolean(),
  createdBy: z.string().nullable(),
  /** A few headline figures for lists and phone glances. */
  headline: z
    .object({
      d50: z.number().nullable(),
      falsePassRate: z.number().nullable(),
      medianDelay: z.number().nullable(),
      /** The longest input pulse duration and its pass probability. */
      longestDuration: z.number().nullable(),
      passAtLongest: z.number().nullable(),
    })
    .nullable(),
});
export type RunListItem = z.infer<typeof RunListItemSchema>;
/**
 * GET /api/labs/:labId/runs: a page (`?cursor=`, `?limit=`) of current or archived runs, optionally only one
 * status or the matched controls of one run; or, with `?ids=a,b,c` (at most API_LIMITS.maxRunIdsPerLookup),
 * exactly those runs of the lab in that order, archived or sweep points included (ids of no run of the
 * lab are left out), in one page.
 */
export const RunListQuerySchema = PageQuerySchema.extend({
  archived: z.enum(["0", "1"]).optional(),
  status: z.string().optional(),
  sweepPoints: z.enum(["0", "1"]).optional(),
  controlOf: z.string().min(1).max(100).optional(),
  ids: z
    .string()
    .max(API_LIMITS.maxRunIdsPerLookup * 101)
    .transform((s) => [
      ...new Set(
        s
          .split(",")
          .map((x) => x.trim())
          .filter(Boolean),
      ),
    ])
    .refine((ids) => ids.length >= 1 && ids.length <= API_LIMITS.maxRunIdsPerLookup, {
      message: `give 1 to ${API_LIMITS.maxRunIdsPerLookup} run ids, separated by commas`,
    })
    .optional(),
});
export type RunListQuery = z.infer<typeof RunListQuerySchema>;

/** GET /api/labs/:labId/runs: one page (shared/schemas/pagination.ts). */
export const RunListPageSchema = pageSchema(RunListItemSchema);
export type RunListPage = z.infer<typeof RunListPageSchema>;

/** One entry of a run's history (from the audit trail), in words. */
export const RunHistoryEntrySchema = z.object({
  action: z.string(),
  at: z.string(),
  /** Who did it; null for the server itself (e.g. resuming after a crash). */
  by: z.string().nullable(),
  words: z.string(),
});
export type RunHistoryEntry = z.infer<typeof RunHistoryEntrySchema>;

export const RunDetailSchema = RunListItemSchema.extend({
  notes: z.string(),
  /** Launched, interrupted and resumed, cancelled...: oldest first. */
  history: z.array(RunHistoryEntrySchema),
  spec: RunSpecSchema,
  engineVersion: z.string(),
  eventsTotal: z.number(),
  cappedReplicates: z.number(),
  computeSeconds: z.number(),
  startedAt: z.string().nullable(),
  deletedAt: z.string().nullable(),
  circuitId: z.string().nullable(),
  circuitVersion: z.number().nullable(),
  programId: z.string().nullable(),
  statsHash: z.string().nullable(),
  /** RunSummary (shared/schemas/analysis.ts) when finished. */
  summary: z.any().nullable(),
  threshold: z
    .object({
      theta: z.number(),
      downTheta: z.number(),
      hysteresis: z.number(),
      windowMinutes: z.number(),
      outputLifetimeMinutes: z.number(),
    })
    .nullable(),
  /**
   * The run's settings block (threshold and its source, window, hysteresis, end time, grid step, method label,
   * seed, replicates, warnings): the finished summary's when it has one, else resolved from the spec; null when
   * the threshold cannot be resolved.
   */
  settings: RunSettingsBlockSchema.nullable(),
  /** Behaviour labels with their evidence (docs/regimes.md); null until the run is finalised. */
  regime: RunRegimeSchema.nullable().optional(),
  /** For a reproduction: identical statistics or the first difference. */
  reproduction: z
    .object({
      of: z.string(),
      expectedHash: z.string().nullable(),
      actualHash: z.string().nullable(),
      identical: z.boolean().nullable(),
      firstDifference: z.string().nullable(),
      engineMatches: z.boolean(),
      message: z.string(),
    })
    .nullable()
    .optional(),
  /** Against the matched control, once both runs finished. */
  acceleration: AccelerationSchema.extend({ circuitRunId: z.string(), controlRunId: z.string() }).nullable().optional(),
});
export type RunDetail = z.infer<typeof RunDetailSchema>;

export const RunSeriesSchema = z.object({
  times: z.array(z.number()),
  input: z.object({
    signal: z.string(),
    pulses: z.array(z.object({ on: z.number(), off: z.number(), level: z.number() })),
  }),
  outputSpecies: z.string(),
  species: z.array(
    z.object({
      name: z.string(),
      mean: z.array(z.number()),
      sd: z.array(z.number()),
      ode: z.array(z.number()).nullable(),
    }),
  ),
  trajectories: z.array(z.object({ replicate: z.number(), values: z.record(z.string(), z.array(z.number())) })),
  threshold: z.object({ theta: z.number(), downTheta: z.number() }).nullable(),
});
export type RunSeries = z.infer<typeof RunSeriesSchema>;

export const ReplicateQuerySchema = z.object({
  sort: z
    .enum(["replicate", "pulseIndex", "durationBin", "delay", "offDelay", "width", "peak", "timeToPeak", "fwhm"])
    .default("replicate"),
  dir: z.enum(["asc", "desc"]).default("asc"),
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(500).default(50),
  durationBin: z.coerce.number().optional(),
  /** Only pulses that passed ("yes") or that did not ("no", excluded pulses left out); both when absent. */
  passed: z.enum(["yes", "no"]).optional(),
});
export const ReplicatePageSchema = z.object({
  total: z.number(),
  page: z.number(),
  pageSize: z.number(),
  rows: z.array(
    z.object({
      replicate: z.number(),
      pulseIndex: z.number(),
      on: z.number(),
      off: z.number(),
      durationBin: z.number(),
      excluded: z.boolean(),
      passed: z.boolean(),
      delay: z.number().nullable(),
      offDelay: z.number().nullable(),
      width: z.number().nullable(),
      peak: z.number(),
      timeToPeak: z.number(),
      fwhm: z.number().nullable(),
    }),
  ),
});
export type ReplicatePage = z.infer<typeof ReplicatePageSchema>;

export const PatchRunSchema = z.object({
  name: z.string().trim().min(1).max(120).optional(),
  notes: z.string().max(5000).optional(),
});

export const EstimateSchema = z.object({
  estimatedEvents: z.number(),
  estimatedSeconds: z.number(),
  gridPoints: z.number(),
  pulses: z.number(),
  storedPulseRows: z.number(),
});
export type Estimate = z.infer<typeof EstimateSchema>;

export const CompareRequestSchema = z.object({
  runIds: z.array(z.string()).min(2, "choose at least two runs").max(4, "choose at most four runs"),
});

// ---- sweeps
export const SweepAxisSchema = z
  .object({
    parameter: ParameterRefSchema,
    values: z.array(z.number().finite()).min(1).max(400).optional(),
    grid: z
      .object({
        from: z.number().finite(),
        to: z.number().finite(),
        count: z.number().int().min(2).max(400),
        scale: z.enum(["linear", "log"]).default("linear"),
      })
      .optional(),
  })
  .refine((a) => !!a.values !== !!a.grid, { message: "give either values or grid", path: ["values"] })
  .refine((a) => !a.grid || a.grid.scale !== "log" || (a.grid.from > 0 && a.grid.to > 0), {
    message: "a log grid needs positive ends",
    path: ["grid"],
  });

export const LaunchSweepSchema = z.object({
  name: z.string().trim().min(1).max(120),
  base: RunInputsCheckedSchema,
  axes: z.array(SweepAxisSchema).min(1, "sweep one or two parameters").max(2, "sweep one or two parameters"),
});
export type LaunchSweep = z.infer<typeof LaunchSweepSchema>;
export type LaunchSweepInput = z.input<typeof LaunchSweepSchema>;

export const SweepPointSchema = z.object({
  index: z.number(),
  runId: z.string(),
  status: z.enum(RUN_STATUS),
  /** Parameter reference -> value at this point. */
  values: z.record(z.string(), z.number()),
  replicatesDone: z.number(),
  /** Added by boundary refinement (its values lie between grid rows or columns). */
  refined: z.boolean().optional(),
  /** The point's behaviour labels (docs/regimes.md); null labels until it is finalised. */
  regime: RegimeLabelsSchema.optional(),
  figures: z
    .object({
      d50: z.number().nullable(),
      falsePassRate: z.number().nullable(),
      medianDelay: z.number().nullable(),
      /** Duration (minutes, as text) -> pass probability. */
      passByDuration: z.record(z.string(), z.number().nullable()),
      peak: z.number().nullable(),
      fano: z.number().nullable(),
      /** 95% intervals where the figure has one (d50: tried durations; false-pass: Wilson; delay: Kaplan-Meier, null end = not reached). */
      intervals: z
        .object({
          d50: z.tuple([z.number(), z.number()]).nullable(),
          falsePassRate: z.tuple([z.number(), z.number()]).nullable(),
          medianDelay: z.tuple([z.number().nullable(), z.number().nullable()]).nullable(),
        })
        .optional(),
      /** Why a figure has no value at this point, in words (null when it has one). */
      reasons: z.record(z.string(), z.string().nullable()).optional(),
    })
    .nullable(),
});
export type SweepPoint = z.infer<typeof SweepPointSchema>;

export const SweepDetailSchema = z.object({
  id: z.string(),
  labId: z.string(),
  name: z.string(),
  status: z.enum(RUN_STATUS),
  statusReason: z.string().nullable(),
  axes: z.array(z.object({ parameter: z.string(), values: z.array(z.number()) })),
  pointCount: z.number(),
  pointsDone: z.number(),
  replicatesPerPoint: z.number(),
  /** The base seed of the sweep (each point derives its own from it). */
  seed: z.string().optional(),
  createdAt: z.string(),
  finishedAt: z.string().nullable(),
  baseSpec: RunSpecSchema,
  points: z.array(SweepPointSchema),
});
export type SweepDetail = z.infer<typeof SweepDetailSchema>;

export const SweepListItemSchema = z.object({
  id: z.string(),
  name: z.string(),
  status: z.enum(RUN_STATUS),
  pointCount: z.number(),
  /** Points that ended: finished, capped, failed or cancelled. */
  pointsDone: z.number(),
  /** Points that finished (finished or capped): a cancelled or failed point is done but not finished. */
  pointsFinished: z.number(),
  /** The swept parameter references. */
  axes: z.array(z.string()),
  createdAt: z.string(),
});
/** GET /api/labs/:labId/sweeps: one page. */
export const SweepListPageSchema = pageSchema(SweepListItemSchema);
export type SweepListItem = z.infer<typeof SweepListItemSchema>;
