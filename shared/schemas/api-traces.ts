/**
 * Single-cell traces: upload options, preprocessing settings, preview, trace set
 * detail, and matching against simulations (docs/traces.md).
 *
 * Times on the wire are minutes (converted from the unit chosen at upload);
 * reporter values are in the file's own units ("trace units") unless said.
 */
import { z } from "zod";
import { PulseStatSchema } from "./run-spec";
import { RunSummarySchema } from "./analysis";
import { pageSchema } from "./pagination";

export const TRACE_LIMITS = {
  /** Upload size in bytes. */
  maxFileBytes: 5 * 1024 * 1024,
  /** Data rows (lines after the header). */
  maxRows: 200_000,
  maxCells: 2_000,
  /** A cell needs at least this many valid values. */
  minPointsPerCell: 3,
  /** Errors listed before parsing stops. */
  maxErrors: 20,
  /** Points per cell sent to charts (longer cells are downsampled). */
  maxChartPointsPerCell: 400,
  /** Cells sent to charts in the detail (the first ones, in upload order); figures cover every cell. */
  maxChartCells: 60,
} as const;

export const TraceLayoutSchema = z.enum(["long", "wide"]);
export type TraceLayout = z.infer<typeof TraceLayoutSchema>;
export const TimeUnitSchema = z.enum(["s", "min", "h"]);
export type TimeUnit = z.infer<typeof TimeUnitSchema>;
export const DelimiterSchema = z.enum(["comma", "tab", "semicolon"]);
export type Delimiter = z.infer<typeof DelimiterSchema>;

/** Where the input (inducer) schedule comes from. */
export const ScheduleSourceSchema = z.discriminatedUnion("source", [
  /** A column of the file: input level per time point; above `onAbove` is ON. */
  z.object({
    source: z.literal("column"),
    column: z.string().min(1).max(100),
    onAbove: z.number().finite().default(0),
  }),
  /** A saved input program of the lab (compiled over the trace time span). */
  z.object({ source: z.literal("program"), programId: z.string().min(1).max(64) }),
]);
export type ScheduleSource = z.infer<typeof ScheduleSourceSchema>;

/** An input pulse [on, off) in minutes. */
export const TracePulseSchema = z.object({
  on: z.number().finite(),
  off: z.number().finite(),
  /** Duration used for per-duration figures; off - on when absent (binned for random programs). */
  durationBin: z.number().finite().optional(),
});
export type TracePulse = z.infer<typeof TracePulseSchema>;

export const BackgroundSchema = z.discriminatedUnion("mode", [
  z.object({ mode: z.literal("none") }),
  /** One value for every cell, in trace units. */
  z.object({ mode: z.literal("value"), value: z.number().finite() }),
  /** Per cell: the median of its values before the first input pulse (cells without any: the median over cells). */
  z.object({ mode: z.literal("preInput") }),
]);
export type Background = z.infer<typeof BackgroundSchema>;

export const ScaleSchema = z.discriminatedUnion("mode", [
  /** Trace units per molecule of reporter, entered. */
  z.object({ mode: z.literal("entered"), unitsPerMolecule: z.number().finite().gt(0) }),
  /**
   * Fitted from the plateau of long pulses: (median plateau above background) /
   * onSteadyStateMolecules, where the plateau of a cell is the median of its
   * values over the last half of each pulse at least minPulseMinutes long.
   */
  z.object({
    mode: z.literal("fitPlateau"),
    onSteadyStateMolecules: z.number().finite().gt(0),
    minPulseMinutes: z.number().finite().gt(0).default(30),
  }),
]);
export type Scale = z.infer<typeof ScaleSchema>;

export const SmoothingSchema = z.discriminatedUnion("mode", [
  z.object({ mode: z.literal("none") }),
  /** Centred moving average over `widthFrames` frames (odd), never across a gap. */
  z.object({
    mode: z.literal("movingAverage"),
    widthFrames: z
      .number()
      .int()
      .min(3)
      .max(51)
      .refine((w) => w % 2 === 1, "width must be odd"),
  }),
]);
export type Smoothing = z.infer<typeof SmoothingSchema>;

/** Preprocessing and threshold settings of a trace set. */
export const TraceSettingsSchema = z.object({
  background: BackgroundSchema.default({ mode: "none" }),
  scale: ScaleSchema.default({ mode: "entered", unitsPerMolecule: 1 }),
  smoothing: SmoothingSchema.default({ mode: "none" }),
  /** Threshold theta in molecules; in trace units it is background + scale x theta. */
  thresholdMolecules: z.number().finite().gt(0),
  hysteresis: z.number().min(0).max(0.9).default(0.2),
  /** Response window after a pulse ends, minutes. */
  windowMinutes: z.number().finite().gt(0).default(30),
  /** A spacing between frames above this many typical frame intervals is a gap (never interpolated across). */
  gapFactor: z.number().finite().min(1).max(100).default(1.5),
  /** Pulses shorter than this count as noise for the false-pass rate (minutes). */
  noiseDurationMinutes: z.number().finite().gt(0).default(10),
  /** Pulses whose window holds a gap longer than this are left out of the figures (absent: kept, gap reported). */
  maxGapMinutes: z.number().finite().gt(0).optional(),
});
export type TraceSettings = z.infer<typeof TraceSettingsSchema>;
export type TraceSettingsInput = z.input<typeof TraceSettingsSchema>;

/** Multipart field `options` (JSON text) of the preview and upload requests. */
export const TraceUploadOptionsSchema = z.object({
  name: z.string().trim().min(1).max(120).optional(),
  layout: z.enum(["auto", "long", "wide"]).default("auto"),
  delimiter: z.enum(["auto", "comma", "tab", "semicolon"]).default("auto"),
  timeUnit: TimeUnitSchema,
  /** Long layout with a channel column: the reporter channel to keep. */
  channel: z.string().min(1).max(100).optional(),
  schedule: ScheduleSourceSchema,
  settings: TraceSettingsSchema,
});
export type TraceUploadOptions = z.infer<typeof TraceUploadOptionsSchema>;
export type TraceUploadOptionsInput = z.input<typeof TraceUploadOptionsSchema>;

export const TraceParseErrorSchema = z.object({
  /** 1-based line of the file (the header is line 1). */
  line: z.number().int(),
  /** 1-based column; 0 when the problem is the whole line. */
  column: z.number().int(),
  message: z.string(),
});
export type TraceParseError = z.infer<typeof TraceParseErrorSchema>;

/** One cell's series for charts (minutes; values in trace units after smoothing). */
export const ChartCellSchema = z.object({
  cell: z.string(),
  times: z.array(z.number()),
  values: z.array(z.number().nullable()),
});

/** Per cell figures: the section-5 pulse records plus coverage. */
export const CellMetricsSchema = z.object({
  cell: z.string(),
  points: z.number().int(),
  firstMinute: z.number(),
  lastMinute: z.number(),
  gaps: z.number().int(),
  background: z.number(),
  thresholdTraceUnits: z.number(),
  /** Pulses of the schedule fully inside this cell's observed span (and not dropped for gaps). */
  pulses: z.array(PulseStatSchema.extend({ longestGapMinutes: z.number() })),
  /** Pulse indices not analysed for this cell, with the reason. */
  skipped: z.array(z.object({ pulseIndex: z.number().int(), reason: z.enum(["notCovered", "gap"]) })),
});
export type CellMetrics = z.infer<typeof CellMetricsSchema>;

/** Pooled figures of a trace set: summarizeRun over cells as replicates (shared/schemas/analysis.ts). */
export const TraceSummarySchema = z.object({
  cells: z.number().int(),
  /** Pulse records analysed (cell x pulse, excluded ones included). */
  pulsesAnalysed: z.number().int(),
  /** Cell x pulse pairs not analysed: outside the cell's observed span, or dropped for a gap. */
  skippedNotCovered: z.number().int(),
  skippedGap: z.number().int(),
  analysis: RunSummarySchema,
});
export type TraceSummary = z.infer<typeof TraceSummarySchema>;

export const TraceAnalysisSchema = z.object({
  frameIntervalMinutes: z.number(),
  scaleUnitsPerMolecule: z.number(),
  /** How the scale was obtained, in words. */
  scaleNote: z.string(),
  cells: z.array(CellMetricsSchema),
  summary: TraceSummarySchema,
});
export type TraceAnalysis = z.infer<typeof TraceAnalysisSchema>;

export const TracePreviewSchema = z.object({
  fileName: z.string().nullable(),
  layout: TraceLayoutSchema,
  delimiter: DelimiterSchema,
  timeUnit: TimeUnitSchema,
  rows: z.number().int(),
  cellCount: z.number().int(),
  timeRangeMinutes: z.tuple([z.number(), z.number()]),
  schedule: z.array(TracePulseSchema),
  warnings: z.array(z.string()),
  /** First few cells, for a chart. */
  sample: z.array(ChartCellSchema),
  analysis: TraceAnalysisSchema,
});
export type TracePreview = z.infer<typeof TracePreviewSchema>;

export const TraceSetListItemSchema = z.object({
  id: z.string(),
  labId: z.string(),
  name: z.string(),
  synthetic: z.boolean(),
  fileName: z.string().nullable(),
  layout: TraceLayoutSchema,
  timeUnit: TimeUnitSchema,
  cellCount: z.number().int(),
  uploadedBy: z.string().nullable(),
  uploadedByName: z.string().nullable(),
  createdAt: z.number(),
});
export type TraceSetListItem = z.infer<typeof TraceSetListItemSchema>;
/** GET /api/labs/:labId/traces: one page of trace sets, newest first (ties by id). */
export const TraceSetListPageSchema = pageSchema(TraceSetListItemSchema);
export type TraceSetListPage = z.infer<typeof TraceSetListPageSchema>;

export const TraceSetDetailSchema = TraceSetListItemSchema.extend({
  schedule: z.array(TracePulseSchema),
  settings: TraceSettingsSchema,
  /** Cells for charts: the first TRACE_LIMITS.maxChartCells, downsampled when long (figures cover every cell). */
  cells: z.array(ChartCellSchema),
  analysis: TraceAnalysisSchema,
  matches: z.array(
    z.object({ id: z.string(), runId: z.string().nullable(), sweepId: z.string().nullable(), createdAt: z.number() }),
  ),
});
export type TraceSetDetail = z.infer<typeof TraceSetDetailSchema>;

export const TraceSetPatchSchema = z.object({
  name: z.string().trim().min(1).max(120).optional(),
  settings: TraceSettingsSchema.optional(),
});
export type TraceSetPatch = z.infer<typeof TraceSetPatchSchema>;

/** ABC rejection tolerance, fixed before matching. */
export const ToleranceSchema = z.discriminatedUnion("kind", [
  /** Accept the closest fraction of points (default 5%). */
  z.object({ kind: z.literal("fraction"), fraction: z.number().gt(0).max(1).default(0.05) }),
  /** Accept every point with combined distance at most `distance`. */
  z.object({ kind: z.literal("distance"), distance: z.number().min(0) }),
]);
export type Tolerance = z.infer<typeof ToleranceSchema>;

export const MatchRequestSchema = z.union([
  z
    .object({ runId: z.string().min(1), tolerance: ToleranceSchema.default({ kind: "fraction", fraction: 0.05 }) })
    .strict(),
  z
    .object({ sweepId: z.string().min(1), tolerance: ToleranceSchema.default({ kind: "fraction", fraction: 0.05 }) })
    .strict(),
]);
export type MatchRequest = z.infer<typeof MatchRequestSchema>;

/** Distances between observed and simulated figures (docs/traces.md). */
export const DistancesSchema = z.object({
  /** |pass rate observed - simulated|, weighted over duration bins present in both. */
  pass: z.number(),
  delayKs: z.number(),
  delayW1Minutes: z.number().nullable(),
  widthKs: z.number(),
  widthW1Minutes: z.number().nullable(),
  /** pass + delayKs + widthKs, in [0, 3]. */
  combined: z.number(),
});
export type Distances = z.infer<typeof DistancesSchema>;

/** Empirical distributions for overlay charts (sorted values). */
export const DistributionSetSchema = z.object({
  passRate: z.number().nullable(),
  delays: z.array(z.number()),
  widths: z.array(z.number()),
  n: z.number().int(),
});

export const MatchPointSchema = z.object({
  runId: z.string(),
  sweepPoint: z.number().int().nullable(),
  /** Swept parameter values of this point. */
  parameters: z.record(z.string(), z.number()),
  distances: DistancesSchema,
  rank: z.number().int(),
  accepted: z.boolean(),
});
export type MatchPoint = z.infer<typeof MatchPointSchema>;

export const MatchResultSchema = z.object({
  tolerance: ToleranceSchema,
  /** The combined distance at or below which points were accepted (null with no points). */
  acceptDistance: z.number().nullable(),
  pointCount: z.number().int(),
  acceptedCount: z.number().int(),
  /** Ranked, closest first. */
  points: z.array(MatchPointSchema),
  /** Parameter ranges of the accept set, and of the whole sweep for context. */
  ranges: z.array(
    z.object({
      parameter: z.string(),
      acceptedMin: z.number().nullable(),
      acceptedMax: z.number().nullable(),
      sweptMin: z.number().nullable(),
      sweptMax: z.number().nullable(),
    }),
  ),
  observed: DistributionSetSchema,
  /** Simulated distributions of the closest point (overlay). */
  bestSimulated: DistributionSetSchema.nullable(),
  /** Plain-words cautions (threshold or schedule differing between the traces and the simulations). */
  notes: z.array(z.string()),
  /** Points without finished statistics, left out. */
  skippedRuns: z.array(z.object({ runId: z.string(), reason: z.string() })),
});
export type MatchResult = z.infer<typeof MatchResultSchema>;

export const MatchDetailSchema = z.object({
  id: z.string(),
  labId: z.string(),
  traceSetId: z.string(),
  runId: z.string().nullable(),
  sweepId: z.string().nullable(),
  createdAt: z.number(),
  result: MatchResultSchema,
});
export type MatchDetail = z.infer<typeof MatchDetailSchema>;
