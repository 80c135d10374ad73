/**
 * Input programs: piecewise-constant schedules for one signal. Every kind
 * compiles (sim/inputs) to a sorted list of pulses [on, off) and switch times.
 * Overlapping pulses are merged. Times in minutes.
 */
import { z } from "zod";

export const PROGRAM_LIMITS = { maxPulses: 5000, maxLadderSteps: 50 } as const;

const time = (what: string) =>
  z
    .number({ error: `${what} must be a number` })
    .finite()
    .min(0, `${what} must not be negative`);
const duration = (what: string) =>
  z
    .number({ error: `${what} must be a number` })
    .finite()
    .gt(0, `${what} must be positive`);

export const PulseSchema = z.object({
  start: time("pulse start"),
  duration: duration("pulse duration"),
  /** Signal level while on; the signal's onLevel when absent. */
  level: z.number().finite().min(0).optional(),
});
export type Pulse = z.infer<typeof PulseSchema>;

export const DurationDistributionSchema = z.discriminatedUnion("dist", [
  z.object({ dist: z.literal("exponential"), mean: duration("mean duration") }),
  z.object({ dist: z.literal("gamma"), mean: duration("mean duration"), shape: duration("shape") }),
  z.object({ dist: z.literal("uniform"), min: duration("shortest duration"), max: duration("longest duration") }),
]);
export type DurationDistribution = z.infer<typeof DurationDistributionSchema>;

export const InputProgramSchema = z.discriminatedUnion("kind", [
  /** An explicit list of pulses. */
  z.object({ kind: z.literal("pulses"), pulses: z.array(PulseSchema).min(1).max(PROGRAM_LIMITS.maxPulses) }),
  /** A periodic train: on for onDuration, off for offDuration, from start until `count` pulses or the end. */
  z.object({
    kind: z.literal("periodic"),
    start: time("start"),
    onDuration: duration("on duration"),
    offDuration: duration("off duration"),
    count: z.number().int().min(1).max(PROGRAM_LIMITS.maxPulses).optional(),
    level: z.number().finite().min(0).optional(),
  }),
  /** A duration ladder: each duration repeated `repeats` times, separated by a recovery gap. */
  z.object({
    kind: z.literal("ladder"),
    start: time("start"),
    durations: z.array(duration("ladder duration")).min(1).max(PROGRAM_LIMITS.maxLadderSteps),
    repeats: z.number().int().min(1).max(100).default(1),
    gap: duration("recovery gap"),
    level: z.number().finite().min(0).optional(),
  }),
  /**
   * A random train: Poisson arrivals (mean interval between pulse starts) with
   * random durations, itself seeded. By default one realisation is shared by every
   * replicate; perReplicate draws one per replicate from the replicate's stream.
   * extraPulses are added as given (for example one long true exposure).
   */
  z.object({
    kind: z.literal("random"),
    start: time("start"),
    meanInterval: duration("mean interval"),
    durations: DurationDistributionSchema,
    seed: z.string().min(1).max(64).default("program"),
    perReplicate: z.boolean().default(false),
    extraPulses: z.array(PulseSchema).max(100).default([]),
    level: z.number().finite().min(0).optional(),
  }),
]);
export type InputProgram = z.infer<typeof InputProgramSchema>;
export type InputProgramInput = z.input<typeof InputProgramSchema>;

/** Width (minutes) of the bins used for figures per pulse duration when durations are continuous. */
export const DURATION_BIN_MINUTES = 1;
