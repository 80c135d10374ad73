/**
 * A run bundle: everything needed to reproduce a run exactly, and the hash of
 * the statistics it produced. JSON, versioned.
 */
import { z } from "zod";
import { RunSpecSchema } from "./run-spec";
import { MethodLabelSchema, RunSettingsBlockSchema } from "./analysis";

export const BUNDLE_FORMAT = "linger-run-bundle";

export const RunBundleSchema = z.object({
  format: z.literal(BUNDLE_FORMAT, { error: `format must be "${BUNDLE_FORMAT}"` }),
  formatVersion: z.literal(1, { error: "formatVersion must be 1" }),
  name: z.string().min(1).max(120),
  spec: RunSpecSchema,
  engineVersion: z.string(),
  runtime: z.object({ node: z.string(), v8: z.string(), platform: z.string(), arch: z.string() }),
  /** sha256 of the stored statistics (null when the run had not finished). */
  statsHash: z.string().nullable(),
  status: z.string(),
  source: z.object({ runId: z.string(), lab: z.string(), exportedAt: z.string() }),
  /**
   * For people reading the bundle: the settings block (resolved threshold, window, method...) and the method
   * label. Informative only: an import reproduces from `spec`, never from these.
   */
  settings: RunSettingsBlockSchema.nullable().optional(),
  method: MethodLabelSchema.optional(),
});
export type RunBundle = z.infer<typeof RunBundleSchema>;
