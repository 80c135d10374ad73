/**
 * Reads a run spec file for the CLI and the benchmark (the one code path both
 * use): JSON, parsed with RunSpecSchema, overrides applied, then the engine's
 * semantic checks. Part of the CLI shell, the only place under sim/ with I/O.
 */
import { readFileSync } from "node:fs";
import { RunSpecSchema, type RunSpec } from "@/shared/schemas/run-spec";
import { runSpecErrors } from "@/sim/engine/run-setup";

export interface SpecOverrides {
  replicates?: number;
  seed?: string;
}

export function loadSpecFile(file: string, overrides: SpecOverrides = {}): RunSpec {
  let raw: unknown;
  try {
    raw = JSON.parse(readFileSync(file, "utf8"));
  } catch (e) {
    throw new Error(`cannot read ${file}: ${(e as Error).message}`);
  }
  const obj = { ...(raw as Record<string, unknown>) };
  if (overrides.replicates !== undefined) obj.replicates = overrides.replicates;
  if (overrides.seed !== undefined) obj.seed = overrides.seed;
  const parsed = RunSpecSchema.safeParse(obj);
  if (!parsed.success)
    throw new Error(
      `${file} is not a valid run spec:\n` +
        parsed.error.issues
          .map(
            (i) =>
              `  ${i.path
                .map((p) => (typeof p === "number" ? `[${p}]` : `.${String(p)}`))
                .join("")
                .replace(/^\./, "")}: ${i.message}`,
          )
          .join("\n"),
    );
  const errors = runSpecErrors(parsed.data);
  if (errors.length > 0) throw new Error(`${file}:\n${errors.map((e) => `  ${e.message}`).join("\n")}`);
  return parsed.data;
}
