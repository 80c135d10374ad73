/**
 * What the event loop does with a finalised run (./finalise-worker.ts's result): in one transaction,
 * if the run is still "running" (not cancelled or deleted meanwhile), its series, summary, hash,
 * behaviour labels and per-replicate figures are written and its chunks' grid sums (needed only
 * until the series exist) are dropped. False when the run was no longer ours.
 */
import { eq } from "drizzle-orm";
import type Database from "better-sqlite3";
import type { Db } from "@/db/client";
import { schema } from "@/db/client";
import type { RunSpec } from "@/shared/schemas/run-spec";
import type { FinaliseResult } from "@/server/compute/finalise-worker";

export function storeFinalised(
  db: Db,
  sqlite: Database.Database,
  runId: string,
  r: FinaliseResult,
  spec: Pick<RunSpec, "eventCapPerReplicate">,
): boolean {
  const status = r.capped ? "capped" : "finished";
  return sqlite.transaction(() => {
    const cur = db.select({ status: schema.runs.status }).from(schema.runs).where(eq(schema.runs.id, runId)).get();
    if (!cur || cur.status !== "running") return false;
    db.delete(schema.runSeries).where(eq(schema.runSeries.runId, runId)).run();
    for (const s of r.series)
      db.insert(schema.runSeries)
        .values({
          runId,
          species: s.species,
          kind: s.kind,
          values: Buffer.from(s.values.buffer, s.values.byteOffset, s.values.byteLength),
        })
        .run();
    db.update(schema.runs)
      .set({
        status,
        statusReason: r.capped
          ? `Some replicates stopped at the event cap of ${spec.eventCapPerReplicate}; their figures end at the cap.`
          : null,
        summary: r.summary,
        statsHash: r.statsHash,
        regime: r.regime,
        regimeDeterministic: r.regime.deterministic.label,
        regimeStochastic: r.regime.stochastic.label,
        replicateFigures: r.replicateFigures,
        finishedAt: new Date(),
      })
      .where(eq(schema.runs.id, runId))
      .run();
    db.update(schema.runChunks)
      .set({ gridSum: null, gridSumSq: null, gridCount: null })
      .where(eq(schema.runChunks.runId, runId))
      .run();
    return true;
  })();
}
