/**
 * Finalising a run off the HTTP event loop: reads the run's stored chunks and
 * rows from SQLite (a read-only connection; WAL lets the server keep writing),
 * reduces the grid sums in chunk order, solves the ODE overlay, summarises the
 * pulse statistics, labels the circuit's behaviour (deterministic and
 * stochastic, docs/regimes.md) and hashes everything. The server writes the
 * result in one transaction.
 */
import Database from "better-sqlite3";
import { drizzle } from "drizzle-orm/better-sqlite3";
import { eq } from "drizzle-orm";
import * as schema from "@/db/schema";
import type { Db } from "@/db/client";
import type { RunSpec } from "@/shared/schemas/run-spec";
import type { RunSummary } from "@/shared/schemas/analysis";
import { OdeBudget, reduceChunks, withOdeBudget } from "@/sim";
import type { ReplicateFigures } from "@/sim/regimes/replicate-figures";
import type { RunRegime } from "@/sim/regimes";
import { finaliseRun } from "@/sim/analysis";
import {
  computeStatsHash,
  fromBlob,
  gridSeries,
  readChunks,
  readPulseStats,
  readReplicateRows,
} from "@/server/compute/run-store";

export interface FinaliseTask {
  dbPath: string;
  runId: string;
}

export interface FinaliseResult {
  series: { species: string; kind: "mean" | "sd" | "ode"; values: Uint8Array }[];
  summary: RunSummary;
  statsHash: string;
  capped: boolean;
  odeNote: string | null;
  regime: RunRegime;
  replicateFigures: ReplicateFigures;
}

/** Computing time and ODE steps the ODE work of one finalisation (overlay, threshold, regime) may take. */
const FINALISE_ODE_WALL_MS = 120_000;
const FINALISE_ODE_STEPS = 20_000_000;

export default function finalise(task: FinaliseTask): FinaliseResult {
  const sqlite = new Database(task.dbPath, { readonly: true, fileMustExist: true });
  try {
    sqlite.pragma("busy_timeout = 5000");
    const db = drizzle(sqlite, { schema }) as unknown as Db;
    const run = db.select().from(schema.runs).where(eq(schema.runs.id, task.runId)).get();
    if (!run) throw new Error(`run ${task.runId} not found`);
    const spec = run.spec as RunSpec;
    const chunks = readChunks(db, task.runId);
    const { mean, sd } = reduceChunks(
      spec,
      chunks.map((c) => ({
        gridSum: fromBlob(c.gridSum as Buffer),
        gridSumSq: fromBlob(c.gridSumSq as Buffer),
        gridCount: fromBlob(c.gridCount as Buffer),
      })),
    );
    const replicates = readReplicateRows(db, task.runId);
    const pulses = readPulseStats(db, task.runId);
    const deadline = Date.now() + FINALISE_ODE_WALL_MS;
    const budget = new OdeBudget({
      maxSteps: FINALISE_ODE_STEPS,
      checkpoint: () => Date.now() < deadline,
      wallSeconds: FINALISE_ODE_WALL_MS / 1000,
    });
    const { ode, odeNote, summary, regime, replicateFigures } = withOdeBudget(budget, () =>
      finaliseRun({
        spec,
        pulses,
        replicates: replicates.map((r) => ({
          replicate: r.replicate,
          events: r.events,
          capped: r.capped,
          outputMean: r.outputMean ?? NaN,
          outputVar: r.outputVar ?? NaN,
        })),
      }),
    );
    const series = gridSeries(spec, mean, sd, ode);
    return {
      series,
      summary,
      regime,
      replicateFigures,
      statsHash: computeStatsHash(replicates, pulses, series),
      capped: replicates.some((r) => r.capped),
      odeNote,
    };
  } finally {
    sqlite.close();
  }
}
