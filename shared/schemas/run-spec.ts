/**
 * A run: one circuit + one input program + settings + seed. Stored whole at
 * launch so later edits never change history. The CLI reads the same JSON.
 */
import { z } from "zod";
import { CircuitSchema, NameSchema, ParameterRefSchema } from "./circuit";
import { InputProgramSchema } from "./input-program";

export const RUN_LIMITS = {
  maxReplicates: 100_000,
  /** grid points x species x replicates kept as trajectories is capped separately (first 20 replicates). */
  maxGridPoints: 20_001,
  maxEndTimeMinutes: 100_000,
  maxEventCapPerReplicate: 50_000_000,
  maxRecordedEventReplicates: 5,
} as const;

export const ThresholdSettingsSchema = z.object({
  /** Threshold theta in molecules of the output; default: half the ODE steady state under constant ON input. */
  value: z.number().finite().gt(0).optional(),
  /** Hysteresis fraction h: cross up at theta, down at theta*(1-h). */
  hysteresis: z.number().min(0).max(0.9).default(0.2),
  /** Response window after a pulse ends, minutes; default 3 output lifetimes. */
  windowMinutes: z.number().finite().gt(0).optional(),
  /** Output lifetime in minutes when the output has no first-order removal. */
  outputLifetimeMinutes: z.number().finite().gt(0).optional(),
  /** Pulses shorter than this count as noise for the false-pass rate. */
  noiseDurationMinutes: z.number().finite().gt(0).default(10),
});
export type ThresholdSettings = z.infer<typeof ThresholdSettingsSchema>;

export const ExtrinsicVariationSchema = z.object({
  parameter: ParameterRefSchema,
  /** Coefficient of variation of a lognormal factor with mean 1, drawn per replicate. */
  cv: z.number().min(0).max(2),
});
export type ExtrinsicVariation = z.infer<typeof ExtrinsicVariationSchema>;

export const SeedSchema = z
  .string()
  .min(1, "seed must not be empty")
  .max(64, "seed is at most 64 characters")
  .regex(/^[A-Za-z0-9_.:-]+$/, "seed uses letters, digits and _ . : - only");

export const RunSpecSchema = z.object({
  circuit: CircuitSchema,
  /** The input program; absent for a run without input pulses (an imported model run as is). */
  program: InputProgramSchema.optional(),
  /** The circuit signal the program drives; absent exactly when the program is. */
  inputSignal: NameSchema.optional(),
  endTimeMinutes: z.number().finite().gt(0).max(RUN_LIMITS.maxEndTimeMinutes),
  gridStepMinutes: z.number().finite().gt(0),
  replicates: z.number().int().min(1).max(RUN_LIMITS.maxReplicates),
  seed: SeedSchema,
  /** Molecules per concentration unit: scales counts, K and zero-order rates up and second-order constants down. */
  systemSize: z.number().finite().gt(0).max(1e4).default(1),
  /** Start from the given counts, or from the OFF steady state after a burn-in. */
  start: z.enum(["given", "offSteadyState"]).default("given"),
  /** Burn-in with the input off, minutes (used with start = offSteadyState). */
  burnInMinutes: z.number().finite().min(0).max(100_000).default(500),
  threshold: ThresholdSettingsSchema.default({ hysteresis: 0.2, noiseDurationMinutes: 10 }),
  extrinsic: z.array(ExtrinsicVariationSchema).max(20).default([]),
  /** Deterministic per-replicate cap on reaction firings ("stopped at cap", never "finished"). */
  eventCapPerReplicate: z.number().int().min(1).max(RUN_LIMITS.maxEventCapPerReplicate).default(10_000_000),
  /** Full event recording for the first k replicates. */
  recordEventsFor: z.number().int().min(0).max(RUN_LIMITS.maxRecordedEventReplicates).default(0),
  /** Exact direct method, or approximate tau-leaping (Cao, Gillespie & Petzold 2006). */
  method: z.enum(["direct", "tauLeap"]).default("direct"),
});
export type RunSpec = z.infer<typeof RunSpecSchema>;
export type RunSpecInput = z.input<typeof RunSpecSchema>;

/**
 * Per replicate and input pulse, the figures of docs/metrics.md (detected
 * online on the exact event path for simulations, on the sampled trace for
 * uploaded data). Times in minutes; null where not defined.
 */
export const PulseStatSchema = z.object({
  replicate: z.number().int(),
  pulseIndex: z.number().int(),
  /** Input pulse [on, off). */
  on: z.number(),
  off: z.number(),
  /** Duration used for per-duration figures (binned when continuous). */
  durationBin: z.number(),
  /** Output was already above threshold at on: excluded from pass and delay figures. */
  excluded: z.boolean(),
  passed: z.boolean(),
  /** First up-crossing at or after on minus on; null = censored (no response in the window). */
  delay: z.number().nullable(),
  /** First down-crossing at or after off minus off; null when none in the window. */
  offDelay: z.number().nullable(),
  /** Widths of output pulses (up-crossing of theta to next down-crossing of theta*(1-h)) starting in the window. */
  widths: z.array(z.number()),
  peak: z.number(),
  timeToPeak: z.number(),
  /** Full width at half maximum above the baseline (output at on); null when not measurable. */
  fwhm: z.number().nullable(),
  baseline: z.number(),
});
export type PulseStat = z.infer<typeof PulseStatSchema>;
