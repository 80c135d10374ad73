/**
 * Reproduction: export a run as a bundle, import one, re-run it, and report
 * whether the new run stored identical statistics (same content hash) or the
 * first difference (when the original run is in this database).
 */
import { eq } from "drizzle-orm";
import type { AppContext } from "@/server/context";
import { schema } from "@/db/client";
import { BUNDLE_FORMAT, RunBundleSchema, type RunBundle } from "@/shared/schemas/bundle";
import type { RunSpec } from "@/shared/schemas/run-spec";
import { validateCircuit } from "@/sim";
import { badRequest, parseOr400 } from "@/server/http-error";
import {
  checkLimits,
  checkThresholds,
  distinctRunName,
  getRunRow,
  insertRun,
  runDetail,
  type RunRow,
} from "./runs.service";
import { methodLabel } from "@/sim/analysis/method-label";
import { firstDifference } from "@/server/compute/run-store";

export function makeBundle(ctx: AppContext, runId: string): RunBundle {
  const row = getRunRow(ctx, runId);
  const lab = ctx.db.select({ name: schema.labs.name }).from(schema.labs).where(eq(schema.labs.id, row.labId)).get();
  return {
    format: BUNDLE_FORMAT,
    formatVersion: 1,
    name: row.name,
    spec: row.spec as RunSpec,
    engineVersion: row.engineVersion,
    runtime: { node: process.versions.node, v8: process.versions.v8, platform: process.platform, arch: process.arch },
    statsHash: row.statsHash,
    status: row.status,
    source: { runId: row.id, lab: lab?.name ?? "", exportedAt: new Date().toISOString() },
    settings: runDetail(ctx, runId).settings,
    method: methodLabel((row.spec as RunSpec).method ?? "direct"),
  };
}

export async function importBundle(
  ctx: AppContext,
  labId: string,
  userId: string,
  raw: unknown,
  name?: string,
): Promise<string> {
  const bundle = parseOr400(RunBundleSchema, raw, "bundle");
  const v = validateCircuit(bundle.spec.circuit);
  if (!v.ok)
    throw badRequest(
      `The bundle's circuit is not valid: ${v.errors.map((e) => `${e.path}: ${e.message}`).join("; ")}`,
      v.errors.map((e) => ({ path: `bundle.spec.circuit.${e.path}`, message: e.message })),
    );
  checkLimits(bundle.spec);
  await checkThresholds(ctx, labId, [bundle.spec]);
  const id = insertRun(ctx, {
    labId,
    name: distinctRunName(ctx, labId, name ?? `${bundle.name} (reproduction)`),
    notes: `Imported from a bundle of run ${bundle.source.runId} (${bundle.source.lab}), engine ${bundle.engineVersion}, Node ${bundle.runtime.node}.`,
    spec: bundle.spec,
    userId,
  });
  ctx.db
    .update(schema.runs)
    .set({ reproduceOf: "bundle", expectedStatsHash: bundle.statsHash, expectedEngineVersion: bundle.engineVersion })
    .where(eq(schema.runs.id, id))
    .run();
  ctx.queue.kick();
  return id;
}

export function reproduceRun(ctx: AppContext, runId: string, userId: string): string {
  const row = getRunRow(ctx, runId);
  const id = insertRun(ctx, {
    labId: row.labId,
    name: distinctRunName(ctx, row.labId, `${row.name} (reproduction)`),
    notes: `Re-run of ${row.name} with the same bundle.`,
    spec: row.spec as RunSpec,
    userId,
    inputs: { circuitId: row.circuitId, circuitVersion: row.circuitVersion, programId: row.programId },
  });
  ctx.db
    .update(schema.runs)
    .set({ reproduceOf: row.id, expectedStatsHash: row.statsHash, expectedEngineVersion: row.engineVersion })
    .where(eq(schema.runs.id, id))
    .run();
  ctx.queue.kick();
  return id;
}

export interface ReproductionStatus {
  of: string;
  expectedHash: string | null;
  actualHash: string | null;
  /** null until both hashes are known. */
  identical: boolean | null;
  firstDifference: string | null;
  engineMatches: boolean;
  message: string;
}

/** The reproduction check of a run (its row, as read once by the caller, e.g. the run detail route). */
export function reproductionStatus(ctx: AppContext, row: RunRow): ReproductionStatus | null {
  if (!row.reproduceOf) return null;
  // The engine that computed this run against the one that computed the original.
  const engineMatches = row.engineVersion === (row.expectedEngineVersion ?? row.engineVersion);
  if (!row.statsHash)
    return {
      of: row.reproduceOf,
      expectedHash: row.expectedStatsHash,
      actualHash: null,
      identical: null,
      firstDifference: null,
      engineMatches,
      message: "The reproduction is still computing.",
    };
  if (!row.expectedStatsHash)
    return {
      of: row.reproduceOf,
      expectedHash: null,
      actualHash: row.statsHash,
      identical: null,
      firstDifference: null,
      engineMatches,
      message: "The original had no statistics hash (it had not finished), so there is nothing to compare with.",
    };
  const identical = row.statsHash === row.expectedStatsHash;
  let diff: string | null = null;
  if (!identical && row.reproduceOf !== "bundle") {
    const original = ctx.db
      .select({ id: schema.runs.id })
      .from(schema.runs)
      .where(eq(schema.runs.id, row.reproduceOf))
      .get();
    if (original) diff = firstDifference(ctx.db, row.reproduceOf, row.id);
  }
  return {
    of: row.reproduceOf,
    expectedHash: row.expectedStatsHash,
    actualHash: row.statsHash,
    identical,
    firstDifference: diff,
    engineMatches,
    message: identical
      ? "Identical: every stored statistic matches the original."
      : diff
        ? `Differs: ${diff}.`
        : `Differs: the statistics hash does not match the bundle's${engineMatches ? "" : ` (the original was computed by ${row.expectedEngineVersion}, this run by ${row.engineVersion})`}.`,
  };
}
