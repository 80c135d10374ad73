/**
 * Matching a trace set against a finished run or every finished point of a
 * sweep (method in sim/traces/match.ts and docs/traces.md). Simulated figures
 * are read from the runs' stored pulses (server/compute/pulse-store.ts); the observed ones are recomputed
 * from the trace set with its current settings. The result is stored in
 * `matches` so it can be reopened; the tolerance is fixed by the request,
 * before any distance is computed.
 */
import { and, asc, eq, isNull } from "drizzle-orm";
import type { AppContext } from "@/server/context";
import { inTransaction, schema } from "@/db/client";
import { newId } from "@/server/ids";
import { HttpError, conflict, notFound } from "@/server/http-error";
import { recordAudit } from "./audit.service";
import { firstReplicateSchedule, forEachPulseFigure } from "@/server/compute/pulse-store";
import { analyseStored } from "./traces.service";
import { getParameter } from "@/sim/circuit/parameters";
import { thresholdOnLoop } from "./runs.service";
import { RunSpecSchema, type RunSpec } from "@/shared/schemas/run-spec";
import { isFinishedRunStatus } from "@/shared/schemas/api-runs";
import {
  MatchResultSchema,
  type MatchDetail,
  type MatchRequest,
  type MatchResult,
  type TracePulse,
  type TraceSettings,
} from "@/shared/schemas/api-traces";
import { addRecord, matchPoints, summarizeFigures, type CandidatePoint, type FigureSummary } from "@/sim/traces/match";
import { pooledPulses } from "@/sim/traces/trace-metrics";

/** Figures of a run from its stored pulses (streamed chunk by chunk; excluded pulses left out). */
export function runFigures(ctx: AppContext, runId: string): FigureSummary {
  const s = summarizeFigures([]);
  forEachPulseFigure(ctx.db, runId, (p) => addRecord(s, p));
  // Bins in ascending order whatever order the pulses came in (the order pulse_stats rows always gave them).
  s.bins = new Map([...s.bins.entries()].sort((a, b) => a[0] - b[0]));
  return s;
}

/** The input pulses of a run (from its first replicate's pulses). */
function runPulses(ctx: AppContext, runId: string): { on: number; off: number }[] {
  return firstReplicateSchedule(ctx.db, runId);
}

function cautions(
  ctx: AppContext,
  settings: TraceSettings,
  schedule: TracePulse[],
  runs: { id: string; spec: RunSpec }[],
): string[] {
  const notes: string[] = [];
  const thetas = new Set<string>();
  const windows = new Set<string>();
  for (const r of runs) {
    try {
      const th = thresholdOnLoop(r.spec, r.id);
      thetas.add(th.theta.toPrecision(4));
      windows.add(th.windowMinutes.toPrecision(4));
    } catch {
      /* a run whose threshold cannot be resolved ran with an explicit one */
    }
  }
  const own = settings.thresholdMolecules.toPrecision(4);
  if ([...thetas].some((t) => Math.abs(Number(t) - settings.thresholdMolecules) > 0.01 * settings.thresholdMolecules)) {
    notes.push(
      `The simulations used threshold ${[...thetas].join(", ")} molecules; the traces use ${own}. Pass, delay and width depend on it: set the same value on both sides.`,
    );
  }
  if ([...windows].some((w) => Math.abs(Number(w) - settings.windowMinutes) > 0.01 * settings.windowMinutes)) {
    notes.push(
      `The simulations used a response window of ${[...windows].join(", ")} min; the traces use ${settings.windowMinutes} min.`,
    );
  }
  if (runs.length > 0) {
    const sim = runPulses(ctx, runs[0].id);
    const same =
      sim.length === schedule.length &&
      sim.every((p, i) => Math.abs(p.on - schedule[i].on) < 0.5 && Math.abs(p.off - schedule[i].off) < 0.5);
    if (!same)
      notes.push(
        `The simulated input (${sim.length} pulses) differs from the traces' schedule (${schedule.length} pulses); pass rates are compared per pulse duration.`,
      );
  }
  return notes;
}

export function runMatch(ctx: AppContext, userId: string, traceSetId: string, req: MatchRequest): string {
  const { row, settings, analysis } = analyseStored(ctx, traceSetId);
  const observed = summarizeFigures(pooledPulses(analysis));
  if (observed.pulses === 0)
    throw conflict(
      "The trace set has no scored pulse (check its schedule and settings) so there is nothing to match.",
      "nothing_to_match",
    );

  const candidates: CandidatePoint[] = [];
  const skipped: MatchResult["skippedRuns"] = [];
  const used: { id: string; spec: RunSpec }[] = [];
  let axes: string[] = [];
  const r = schema.runs;
  if ("runId" in req) {
    const run = ctx.db
      .select()
      .from(r)
      .where(and(eq(r.id, req.runId), isNull(r.deletedAt)))
      .get();
    if (!run || run.labId !== row.labId) throw notFound("That run");
    if (!isFinishedRunStatus(run.status))
      throw conflict(`That run is ${run.status}; match against a finished run.`, "run_not_finished");
    const spec = RunSpecSchema.parse(run.spec);
    used.push({ id: run.id, spec });
    candidates.push({ runId: run.id, sweepPoint: null, parameters: {}, figures: runFigures(ctx, run.id) });
  } else {
    const sweep = ctx.db
      .select()
      .from(schema.sweeps)
      .where(and(eq(schema.sweeps.id, req.sweepId), isNull(schema.sweeps.deletedAt)))
      .get();
    if (!sweep || sweep.labId !== row.labId) throw notFound("That sweep");
    axes = (sweep.axes as { parameter: string }[]).map((a) => a.parameter);
    const points = ctx.db
      .select()
      .from(r)
      .where(and(eq(r.sweepId, sweep.id), isNull(r.deletedAt)))
      .orderBy(asc(r.sweepPoint))
      .all();
    for (const p of points) {
      if (!isFinishedRunStatus(p.status)) {
        skipped.push({ runId: p.id, reason: `point ${p.sweepPoint} is ${p.status}` });
        continue;
      }
      const spec = RunSpecSchema.parse(p.spec);
      const parameters: Record<string, number> = {};
      for (const a of axes) {
        try {
          parameters[a] = getParameter(spec.circuit, a);
        } catch {
          /* not a parameter of this point's circuit: left out of the ranges */
        }
      }
      used.push({ id: p.id, spec });
      candidates.push({ runId: p.id, sweepPoint: p.sweepPoint, parameters, figures: runFigures(ctx, p.id) });
    }
    if (candidates.length === 0)
      throw conflict("No point of that sweep has finished yet; match when some have.", "sweep_not_finished");
  }

  const result = matchPoints(observed, candidates, req.tolerance, axes, skipped);
  result.notes = cautions(ctx, settings, row.schedule as TracePulse[], used);
  const id = newId("mat_");
  const tol = req.tolerance.kind === "fraction" ? req.tolerance.fraction : req.tolerance.distance;
  inTransaction(ctx, () => {
    ctx.db
      .insert(schema.matches)
      .values({
        id,
        labId: row.labId,
        traceSetId,
        runId: "runId" in req ? req.runId : null,
        sweepId: "sweepId" in req ? req.sweepId : null,
        tolerance: tol,
        result,
        createdBy: userId,
        createdAt: new Date(),
      })
      .run();
    recordAudit(ctx, {
      labId: row.labId,
      userId,
      action: "traces.matched",
      targetType: "match",
      targetId: id,
      detail: { traceSetId, points: result.pointCount },
    });
  });
  return id;
}

export function matchDetail(ctx: AppContext, id: string): MatchDetail {
  const m = ctx.db.select().from(schema.matches).where(eq(schema.matches.id, id)).get();
  if (!m) throw notFound("That match");
  // A match goes with its trace set: hidden while the set is deleted (restorable), gone when it is purged.
  const set = ctx.db
    .select({ deletedAt: schema.traceSets.deletedAt })
    .from(schema.traceSets)
    .where(eq(schema.traceSets.id, m.traceSetId))
    .get();
  if (!set || set.deletedAt) throw notFound("That match");
  const parsed = MatchResultSchema.safeParse(m.result);
  if (!parsed.success) throw new HttpError(409, "bad_match", "This match was stored in an older form; run it again.");
  return {
    id: m.id,
    labId: m.labId,
    traceSetId: m.traceSetId,
    runId: m.runId,
    sweepId: m.sweepId,
    createdAt: m.createdAt.getTime(),
    result: parsed.data,
  };
}
