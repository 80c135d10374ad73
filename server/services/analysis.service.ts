/**
 * Analysis actions over stored runs: comparisons of two to four runs, the
 * matched simple-regulation control.
 */
import { and, desc, eq, inArray, isNull, sql } from "drizzle-orm";
import type { AppContext } from "@/server/context";
import { schema } from "@/db/client";
import type { RunSpec } from "@/shared/schemas/run-spec";
import type { RunSummary } from "@/shared/schemas/analysis";
import { accelerationFigures, compareRuns, delaysOf, widthsOf, runSettingsBlock } from "@/sim/analysis";
import { badRequest, conflict, notFound } from "@/server/http-error";
import { checkLimits, getRunRow, insertRun, thresholdOnLoop, type RunRow } from "./runs.service";
import { readPulseStats } from "@/server/compute/pulse-store";

export function compareLabRuns(ctx: AppContext, labId: string, runIds: string[]) {
  if (new Set(runIds).size !== runIds.length)
    throw badRequest("Choose different runs to compare.", [{ path: "runIds", message: "duplicates" }]);
  const rows = ctx.db
    .select()
    .from(schema.runs)
    .where(and(eq(schema.runs.labId, labId), inArray(schema.runs.id, runIds), isNull(schema.runs.deletedAt)))
    .all();
  for (const id of runIds) if (!rows.some((r) => r.id === id)) throw notFound(`Run ${id}`);
  const ordered = runIds.map((id) => rows.find((r) => r.id === id)!);
  const unfinished = ordered.filter((r) => !r.summary);
  if (unfinished.length)
    throw conflict(`These runs have no results yet: ${unfinished.map((r) => r.name).join(", ")}.`, "not_finished");
  return compareRuns(
    ordered.map((r) => {
      const pulses = readPulseStats(ctx.db, r.id);
      return {
        id: r.id,
        name: r.name,
        summary: r.summary as RunSummary,
        delays: delaysOf(pulses),
        widths: widthsOf(pulses),
        settings: settingsOf(r),
      };
    }),
  );
}

/** The stored summary's settings block, else one resolved from the spec; null when the threshold cannot be resolved. */
function settingsOf(row: { id: string; spec: unknown; summary: unknown }) {
  const stored = (row.summary as RunSummary | null)?.settings;
  if (stored) return stored;
  try {
    const spec = row.spec as RunSpec;
    return runSettingsBlock(spec, thresholdOnLoop(spec, row.id));
  } catch {
    return null;
  }
}

/** Creates and queues the matched simple-regulation control of a run. */
export async function createMatchedControl(ctx: AppContext, runId: string, userId: string): Promise<string> {
  const row = getRunRow(ctx, runId);
  const spec = row.spec as RunSpec;
  // built (steady states by ODE) and threshold-checked in the compute thread
  const control = await ctx.compute.matchedControl(row.labId, spec);
  checkLimits(control);
  const id = insertRun(ctx, {
    labId: row.labId,
    name: `${row.name}: simple-regulation control`,
    notes: `Simple regulation with the same ON steady state as "${row.name}", the same input program and seed scheme.`,
    spec: control,
    userId,
    controlOf: row.id,
  });
  ctx.queue.kick();
  return id;
}

/**
 * Acceleration and delay against the matched control, when the run has a
 * finished control (or is one): T1/2 ratio and median delays, circuit minus control. `row` is the
 * run's row as the caller read it (the run detail reads it once for everything it shows).
 */
export async function accelerationFor(ctx: AppContext, row: RunRow) {
  if (!row.summary) return null;
  // The other run of the pair: its id and whether it has results first, its full row (large JSON) only then.
  const other = row.controlOf
    ? ctx.db
        .select({ id: schema.runs.id, finished: sql<number>`${schema.runs.summary} IS NOT NULL` })
        .from(schema.runs)
        .where(eq(schema.runs.id, row.controlOf))
        .get()
    : ctx.db
        .select({ id: schema.runs.id, finished: sql<number>`${schema.runs.summary} IS NOT NULL` })
        .from(schema.runs)
        .where(and(eq(schema.runs.controlOf, row.id), isNull(schema.runs.deletedAt)))
        .orderBy(desc(schema.runs.createdAt))
        .get();
  if (!other?.finished) return null;
  const otherRow = ctx.db.select().from(schema.runs).where(eq(schema.runs.id, other.id)).get();
  if (!otherRow?.summary) return null;
  const pair = row.controlOf ? { circuit: otherRow, control: row } : { circuit: row, control: otherRow };
  return {
    circuitRunId: pair.circuit.id,
    controlRunId: pair.control.id,
    // ODE step responses: in the compute thread
    ...((await ctx.compute.acceleration(row.labId, {
      circuitSpec: pair.circuit.spec as RunSpec,
      circuitSummary: pair.circuit.summary as RunSummary,
      controlSpec: pair.control.spec as RunSpec,
      controlSummary: pair.control.summary as RunSummary,
    })) as ReturnType<typeof accelerationFigures>),
  };
}
