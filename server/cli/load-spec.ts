/**
 * Reads a run spec file for the CLI and the benchmark (the one code path both
 * use): JSON, parsed with RunSpecSchema, overrides applied, then the engine's
 * semantic checks. An SBML model (recognised by its <sbml> document element,
 * whatever the file is called) is imported (sim/sbml, docs/sbml.md) and run
 * without input pulses; it needs the end time and grid step. Part of the CLI
 * shell, the only place with I/O.
 */
import { readFileSync } from "node:fs";
import { RunSpecSchema, type RunSpec } from "@/shared/schemas/run-spec";
import { runSpecErrors } from "@/sim/engine/run-setup";
import { formatSbmlProblems, importSbml } from "@/sim/sbml";

export interface SpecOverrides {
  replicates?: number;
  seed?: string;
  /** Minutes; required for SBML, overriding a JSON spec's value. */
  endTimeMinutes?: number;
  /** Minutes; required for SBML, overriding a JSON spec's value. */
  gridStepMinutes?: number;
}

/** Replicates and seed of an SBML run when the command line gives none. */
export const SBML_DEFAULTS = { replicates: 100, seed: "1" } as const;

/** True when the text is an XML document whose document element is <sbml>. */
export function looksLikeSbml(text: string): boolean {
  const body = text
    .replace(/^\uFEFF/, "")
    .replace(/<\?xml[^>]*\?>/, "")
    .replace(/<!--[\s\S]*?-->/g, "")
    .trimStart();
  return /^<([A-Za-z_][\w.-]*:)?sbml[\s>]/.test(body);
}

export function loadSpecFile(file: string, overrides: SpecOverrides = {}): RunSpec {
  let text: string;
  try {
    text = readFileSync(file, "utf8");
  } catch (e) {
    throw new Error(`cannot read ${file}: ${(e as Error).message}`);
  }
  let obj: Record<string, unknown>;
  if (looksLikeSbml(text)) {
    const imported = importSbml(text);
    if (!imported.ok)
      throw new Error(
        `${file}: SBML model not imported:\n${formatSbmlProblems(imported.problems).replace(/^/gm, "  ")}`,
      );
    if (overrides.endTimeMinutes === undefined || overrides.gridStepMinutes === undefined)
      throw new Error(`${file} is an SBML model: --end-time and --grid-step (minutes) are required`);
    obj = {
      circuit: imported.circuit,
      replicates: SBML_DEFAULTS.replicates,
      seed: SBML_DEFAULTS.seed,
    };
  } else {
    let raw: unknown;
    try {
      raw = JSON.parse(text);
    } catch (e) {
      throw new Error(`cannot read ${file}: ${(e as Error).message}`);
    }
    obj = { ...(raw as Record<string, unknown>) };
  }
  if (overrides.replicates !== undefined) obj.replicates = overrides.replicates;
  if (overrides.seed !== undefined) obj.seed = overrides.seed;
  if (overrides.endTimeMinutes !== undefined) obj.endTimeMinutes = overrides.endTimeMinutes;
  if (overrides.gridStepMinutes !== undefined) obj.gridStepMinutes = overrides.gridStepMinutes;
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
