import { SeedSchema } from "@/shared/schemas/run-spec";
import { RUN_LIMITS } from "@/shared/limits";
import { parseNumber } from "./zod-errors";
import { formatCount } from "@/shared/number-format";

/** A fresh random seed (letters and digits), shown to the user and editable. */
export function randomSeed(): string {
  const alphabet = "abcdefghijkmnopqrstuvwxyz23456789";
  let s = "";
  for (let i = 0; i < 10; i++) s += alphabet[Math.floor(Math.random() * alphabet.length)];
  return s;
}

export type RunFormValues = {
  name: string;
  circuitId: string;
  programId: string;
  inputSignal: string;
  replicates: string;
  seed: string;
  endTimeMinutes: string;
  gridStepMinutes: string;
  thresholdValue: string;
  hysteresis: string;
  windowMinutes: string;
  noiseDurationMinutes: string;
};

/** Checks a run form; returns field messages (empty when valid). */
export function validateRunForm(v: RunFormValues): Partial<Record<keyof RunFormValues, string>> {
  const e: Partial<Record<keyof RunFormValues, string>> = {};
  if (!v.name.trim()) e.name = "Give the run a name.";
  if (!v.circuitId) e.circuitId = "Choose a circuit.";
  if (!v.programId) e.programId = "Choose an input program.";
  const reps = parseNumber(v.replicates);
  if (!Number.isInteger(reps) || reps < 1) e.replicates = "Replicates must be a whole number of at least 1.";
  else if (reps > RUN_LIMITS.maxReplicates)
    e.replicates = `At most ${formatCount(RUN_LIMITS.maxReplicates)} replicates.`;
  const seed = SeedSchema.safeParse(v.seed);
  if (!seed.success) e.seed = seed.error.issues[0].message;
  const end = parseNumber(v.endTimeMinutes);
  if (!(end > 0)) e.endTimeMinutes = "End time must be a positive number of minutes.";
  const grid = parseNumber(v.gridStepMinutes);
  if (!(grid > 0)) e.gridStepMinutes = "Grid step must be a positive number of minutes.";
  else if (end > 0 && end / grid + 1 > RUN_LIMITS.maxGridPoints)
    e.gridStepMinutes = `At most ${formatCount(RUN_LIMITS.maxGridPoints)} grid points: use a larger step.`;
  if (v.thresholdValue.trim() && !(parseNumber(v.thresholdValue) > 0))
    e.thresholdValue = "Threshold must be positive (or empty for the default).";
  const h = parseNumber(v.hysteresis);
  if (!(h >= 0 && h <= 0.9)) e.hysteresis = "Hysteresis must be between 0 and 0.9.";
  if (v.windowMinutes.trim() && !(parseNumber(v.windowMinutes) > 0))
    e.windowMinutes = "Window must be positive (or empty for the default).";
  if (!(parseNumber(v.noiseDurationMinutes) > 0)) e.noiseDurationMinutes = "Noise duration must be positive.";
  return e;
}

/** Request body for launch and estimate (valid values assumed). */
export function toLaunchRequest(v: RunFormValues) {
  const opt = (s: string) => (s.trim() ? parseNumber(s) : undefined);
  return {
    name: v.name.trim(),
    circuitId: v.circuitId,
    programId: v.programId,
    inputSignal: v.inputSignal || undefined,
    settings: {
      endTimeMinutes: parseNumber(v.endTimeMinutes),
      gridStepMinutes: parseNumber(v.gridStepMinutes),
      replicates: parseNumber(v.replicates),
      seed: v.seed.trim(),
      threshold: {
        value: opt(v.thresholdValue),
        hysteresis: parseNumber(v.hysteresis),
        windowMinutes: opt(v.windowMinutes),
        noiseDurationMinutes: parseNumber(v.noiseDurationMinutes),
      },
    },
  };
}
