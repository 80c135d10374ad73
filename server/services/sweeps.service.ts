/**
 * Parameter sweeps: one or two parameters over a list or a linear/log grid.
 * Each point is a child run (its own derived seed) that the queue computes in
 * order; the sweep's per-point aggregates are the child runs' stored summaries.
 * A cancelled or interrupted sweep resumes from the points (and chunks) it has.
 */
import type { RegimeLabelValue } from "@/shared/schemas/regime";
import { and, asc, count, eq, inArray, isNull, sql } from "drizzle-orm";
import type { AppContext } from "@/server/context";
import { inTransaction, schema } from "@/db/client";
import {
  API_LIMITS,
  ENDED_RUN_STATUSES,
  FINISHED_RUN_STATUSES,
  type LaunchSweep,
  type SweepDetail,
  type SweepListItem,
} from "@/shared/schemas/api-runs";
import type { RunSpec } from "@/shared/schemas/run-spec";
import { listParameters, setParameter } from "@/sim";
import { badRequest, conflict, notFound, tooMany } from "@/server/http-error";
import { newId } from "@/server/ids";
import { buildSpec, checkThresholds, insertRun, resolveInputs } from "./runs.service";
import { assertRestorable } from "./undo";
import { refinementPoints, refinementSeed } from "@/sim/regimes/refine-map";
import { keyset, pageLimit } from "./pagination";
import type { Page, PageQuery } from "@/shared/schemas/pagination";

export function axisValues(axis: LaunchSweep["axes"][number]): number[] {
  if (axis.values) return axis.values;
  const g = axis.grid!;
  const out: number[] = [];
  for (let i = 0; i < g.count; i++) {
    const f = i / (g.count - 1);
    out.push(
      g.scale === "log"
        ? Math.exp(Math.log(g.from) + f * (Math.log(g.to) - Math.log(g.from)))
        : g.from + f * (g.to - g.from),
    );
  }
  return out;
}

/** The seed of sweep point i: the base seed with the point index appended (documented in docs/engine.md). */
export const pointSeed = (base: string, i: number) => `${base}.p${i}`;

/**
 * The points of a one- or two-parameter grid and each point's checked spec
 * (seed pointSeed(base, i)): shared by sweeps and deterministic regime maps.
 */
export function planPoints(ctx: AppContext, labId: string, body: LaunchSweep, maxPoints: number, noun: string) {
  const inputs = resolveInputs(ctx, labId, body.base);
  const base = buildSpec(inputs, body.base.settings);
  const known = new Set(listParameters(base.circuit).map((p: { ref: string }) => p.ref));
  const axes = body.axes.map((a, i) => {
    if (!known.has(a.parameter))
      throw badRequest(`The circuit has no parameter ${a.parameter}.`, [
        { path: `axes.${i}.parameter`, message: "unknown parameter" },
      ]);
    return { parameter: a.parameter, values: axisValues(a) };
  });
  if (axes.length === 2 && axes[0].parameter === axes[1].parameter)
    throw badRequest(noun === "sweep" ? "Sweep two different parameters." : "Map two different parameters.", [
      { path: "axes.1.parameter", message: "same as the first axis" },
    ]);
  const points: Record<string, number>[] = [];
  for (const v0 of axes[0].values) {
    if (axes.length === 1) points.push({ [axes[0].parameter]: v0 });
    else for (const v1 of axes[1].values) points.push({ [axes[0].parameter]: v0, [axes[1].parameter]: v1 });
  }
  if (points.length > maxPoints)
    throw badRequest(
      `The ${noun} has ${points.length} points; the limit is ${maxPoints}.`,
      [{ path: "axes", message: "too many points" }],
      "limit",
    );
  const specs = points.map((p, i) => pointSpec(inputs, base, p, pointSeed(base.seed, i), `Point ${i}`));
  return { inputs, base, axes, points, specs };
}

/** The spec of one point: the base with the point's parameter values and the given seed (400 naming the point). */
export function pointSpec(
  inputs: ReturnType<typeof resolveInputs>,
  base: RunSpec,
  values: Record<string, number>,
  seed: string,
  where: string,
): RunSpec {
  let circuit = base.circuit;
  for (const [ref, value] of Object.entries(values)) {
    try {
      circuit = setParameter(circuit, ref, value);
    } catch (e) {
      throw badRequest(`${where}: ${(e as Error).message}`, [{ path: "axes", message: (e as Error).message }]);
    }
  }
  return buildSpec({ ...inputs, circuit, inputSignal: base.inputSignal }, { ...base, seed });
}

export async function launchSweep(ctx: AppContext, labId: string, userId: string, body: LaunchSweep): Promise<string> {
  const active = ctx.db
    .select({ n: count() })
    .from(schema.sweeps)
    .where(
      and(
        eq(schema.sweeps.labId, labId),
        inArray(schema.sweeps.status, ["queued", "running"]),
        isNull(schema.sweeps.deletedAt),
      ),
    )
    .get()!.n;
  if (active >= API_LIMITS.maxActiveSweepsPerLab)
    throw tooMany(
      `This lab already has ${API_LIMITS.maxActiveSweepsPerLab} sweeps running; wait for one to finish or cancel one.`,
    );
  const { inputs, base, axes, points, specs } = planPoints(ctx, labId, body, API_LIMITS.maxSweepPoints, "sweep");
  if (points.length * base.replicates > API_LIMITS.maxSweepReplicates) {
    throw badRequest(
      `${points.length} points x ${base.replicates} replicates exceeds ${API_LIMITS.maxSweepReplicates}; use fewer replicates per point.`,
      [{ path: "base.settings.replicates", message: "too many replicates in all" }],
      "limit",
    );
  }
  // Every point's threshold in the compute thread, under one budget for the whole sweep.
  await checkThresholds(ctx, labId, specs);
  const id = newId("swp_");
  inTransaction(ctx, () => {
    ctx.db
      .insert(schema.sweeps)
      .values({
        id,
        labId,
        name: body.name,
        baseSpec: base,
        axes,
        status: "queued",
        pointCount: points.length,
        createdBy: userId,
        createdAt: new Date(),
      })
      .run();
    specs.forEach((spec, i) => {
      const label = Object.entries(points[i])
        .map(([k, v]) => `${k}=${formatNumber(v)}`)
        .join(", ");
      insertRun(ctx, { labId, name: `${body.name} · ${label}`, spec, userId, sweepId: id, sweepPoint: i, inputs });
    });
  });
  ctx.queue.kick();
  return id;
}

export const formatNumber = (v: number) =>
  Math.abs(v) >= 1000 || Math.abs(v) < 0.01 ? v.toPrecision(3) : String(Math.round(v * 1000) / 1000);

/** Derive the sweep's status from its points and store it; returns the new status when it changed. */
export function refreshSweepStatus(ctx: AppContext, sweepId: string): string | null {
  const sweep = ctx.db.select().from(schema.sweeps).where(eq(schema.sweeps.id, sweepId)).get();
  if (!sweep) return null;
  const rows = ctx.db
    .select({ status: schema.runs.status })
    .from(schema.runs)
    .where(eq(schema.runs.sweepId, sweepId))
    .all();
  const st = rows.map((r) => r.status);
  let status: typeof sweep.status;
  if (st.some((s) => s === "running")) status = "running";
  else if (st.some((s) => s === "queued")) status = st.some((s) => s !== "queued") ? "running" : "queued";
  else if (st.some((s) => s === "failed")) status = "failed";
  else if (st.some((s) => s === "cancelled")) status = "cancelled";
  else if (st.some((s) => s === "capped")) status = "capped";
  else status = "finished";
  if (status === sweep.status) return null;
  const ended = !["queued", "running"].includes(status);
  ctx.db
    .update(schema.sweeps)
    .set({ status, finishedAt: ended ? new Date() : null })
    .where(eq(schema.sweeps.id, sweepId))
    .run();
  return status;
}

export function cancelSweep(ctx: AppContext, sweepId: string) {
  const rows = ctx.db
    .select({ id: schema.runs.id })
    .from(schema.runs)
    .where(and(eq(schema.runs.sweepId, sweepId), inArray(schema.runs.status, ["queued", "running"])))
    .all();
  if (!rows.length) throw conflict("The sweep has no queued or running points.", "not_running");
  for (const r of rows) ctx.queue.cancel(r.id);
  refreshSweepStatus(ctx, sweepId);
}

/** Re-queue points that were cancelled or failed; finished points and stored chunks are kept. */
export function resumeSweep(ctx: AppContext, sweepId: string) {
  const res = ctx.db
    .update(schema.runs)
    .set({ status: "queued", statusReason: "Resumed.", finishedAt: null })
    .where(and(eq(schema.runs.sweepId, sweepId), inArray(schema.runs.status, ["cancelled", "failed"])))
    .run();
  if (res.changes === 0)
    throw conflict("Nothing to resume: every point is finished, queued or running.", "nothing_to_resume");
  ctx.db.update(schema.sweeps).set({ status: "running", finishedAt: null }).where(eq(schema.sweeps.id, sweepId)).run();
  ctx.queue.kick();
}

/** Delete a sweep and hide its points (cancelling any still computing); restorable for the undo period. */
export function deleteSweep(ctx: AppContext, sweepId: string) {
  const sweep = ctx.db
    .select({ deletedAt: schema.sweeps.deletedAt })
    .from(schema.sweeps)
    .where(eq(schema.sweeps.id, sweepId))
    .get();
  if (!sweep) throw notFound("That sweep");
  if (sweep.deletedAt) throw conflict("That sweep is already deleted.", "already_deleted");
  const active = ctx.db
    .select({ id: schema.runs.id })
    .from(schema.runs)
    .where(and(eq(schema.runs.sweepId, sweepId), inArray(schema.runs.status, ["queued", "running"])))
    .all();
  for (const r of active) ctx.queue.cancel(r.id);
  const now = new Date();
  inTransaction(ctx, () => {
    ctx.db.update(schema.sweeps).set({ deletedAt: now }).where(eq(schema.sweeps.id, sweepId)).run();
    ctx.db.update(schema.runs).set({ deletedAt: now }).where(eq(schema.runs.sweepId, sweepId)).run();
  });
}

/** Undo a sweep delete (409 when it is not deleted or the undo period has passed). */
export function restoreSweep(ctx: AppContext, sweepId: string) {
  const sweep = ctx.db
    .select({ deletedAt: schema.sweeps.deletedAt })
    .from(schema.sweeps)
    .where(eq(schema.sweeps.id, sweepId))
    .get();
  if (!sweep) throw notFound("That sweep");
  assertRestorable("sweep", sweep.deletedAt);
  inTransaction(ctx, () => {
    ctx.db.update(schema.sweeps).set({ deletedAt: null }).where(eq(schema.sweeps.id, sweepId)).run();
    ctx.db.update(schema.runs).set({ deletedAt: null }).where(eq(schema.runs.sweepId, sweepId)).run();
  });
}

export function sweepDetail(ctx: AppContext, sweepId: string): SweepDetail {
  const sweep = ctx.db.select().from(schema.sweeps).where(eq(schema.sweeps.id, sweepId)).get();
  if (!sweep) throw notFound("That sweep");
  const runs = ctx.db
    .select()
    .from(schema.runs)
    .where(eq(schema.runs.sweepId, sweepId))
    .orderBy(asc(schema.runs.sweepPoint))
    .all();
  const axes = sweep.axes as { parameter: string; values: number[] }[];
  const refinedAt = new Map(refinedOf(sweep).map((r) => [r.index, r.values]));
  const points = runs.map((r) => {
    const i = r.sweepPoint ?? 0;
    let values: Record<string, number> = {};
    const refinedValues = refinedAt.get(i);
    if (refinedValues) values = refinedValues;
    else if (axes.length === 1) values[axes[0].parameter] = axes[0].values[i];
    else {
      values[axes[0].parameter] = axes[0].values[Math.floor(i / axes[1].values.length)];
      values[axes[1].parameter] = axes[1].values[i % axes[1].values.length];
    }
    const s = r.summary as any;
    return {
      index: i,
      runId: r.id,
      status: r.status,
      values,
      replicatesDone: r.replicatesDone,
      refined: !!refinedValues,
      regime: {
        deterministic: (r.regimeDeterministic as RegimeLabelValue | null) ?? null,
        stochastic: (r.regimeStochastic as RegimeLabelValue | null) ?? null,
      },
      figures: s
        ? {
            d50: s.d50 ?? null,
            falsePassRate: s.falsePassRate ?? null,
            medianDelay: s.delay?.median ?? null,
            passByDuration: Object.fromEntries(
              (s.byDuration ?? []).map((b: any) => [String(b.duration), b.passProbability]),
            ),
            peak: s.pulseGeneration?.peak?.median ?? null,
            fano: s.noise?.fano ?? null,
            intervals: {
              d50: s.d50Ci ?? null,
              falsePassRate: s.falsePass?.ci ?? null,
              medianDelay:
                s.delay?.median === null || s.delay?.median === undefined ? null : (s.delay?.medianCi ?? null),
            },
            reasons: {
              d50: s.d50 === null || s.d50 === undefined ? (s.d50Note ?? "not estimable") : null,
              falsePassRate:
                s.falsePassRate === null || s.falsePassRate === undefined
                  ? "no pulses shorter than the noise duration"
                  : null,
              medianDelay:
                s.delay?.median === null || s.delay?.median === undefined
                  ? "median not reached: fewer than half the pulses responded"
                  : null,
              peak:
                s.pulseGeneration?.peak?.median === null || s.pulseGeneration?.peak?.median === undefined
                  ? "no evaluable pulses"
                  : null,
              fano: s.noise?.fano === null || s.noise?.fano === undefined ? "no output moments recorded" : null,
            },
          }
        : null,
    };
  });
  const done = runs.filter((r) => !["queued", "running"].includes(r.status)).length;
  return {
    id: sweep.id,
    labId: sweep.labId,
    name: sweep.name,
    status: sweep.status,
    statusReason: sweep.statusReason,
    axes,
    pointCount: sweep.pointCount,
    pointsDone: done,
    replicatesPerPoint: (sweep.baseSpec as RunSpec).replicates,
    seed: (sweep.baseSpec as RunSpec).seed,
    createdAt: sweep.createdAt.toISOString(),
    finishedAt: sweep.finishedAt?.toISOString() ?? null,
    baseSpec: sweep.baseSpec as RunSpec,
    points,
  };
}

const sweepOrder = keyset([
  { col: schema.sweeps.createdAt, dir: "desc", type: "number" },
  { col: schema.sweeps.id, dir: "asc", type: "string" },
]);

/**
 * How many points of each sweep ended (`done`: finished, capped, failed or cancelled) and how many finished
 * (`finished`: finished or capped), for a page of sweeps in one grouped query. A sweep with no ended point has
 * no entry.
 */
function pointCounts(ctx: AppContext, sweepIds: string[]): Map<string, { done: number; finished: number }> {
  if (sweepIds.length === 0) return new Map();
  const r = schema.runs;
  const rows = ctx.db
    .select({
      sweepId: r.sweepId,
      done: count(),
      finished: sql<number>`sum(${inArray(r.status, [...FINISHED_RUN_STATUSES])})`.mapWith(Number),
    })
    .from(r)
    .where(and(inArray(r.sweepId, sweepIds), inArray(r.status, [...ENDED_RUN_STATUSES])))
    .groupBy(r.sweepId)
    .all();
  return new Map(rows.map((x) => [x.sweepId!, { done: x.done, finished: x.finished }]));
}

/** One page of the lab's sweeps, newest first (ties by id); keyset on (created time descending, id). */
export function listSweeps(ctx: AppContext, labId: string, q: PageQuery = {}): Page<SweepListItem> {
  const sw = schema.sweeps;
  const rows = ctx.db
    .select()
    .from(sw)
    .where(and(eq(sw.labId, labId), isNull(sw.deletedAt), sweepOrder.after(q.cursor)))
    .orderBy(...sweepOrder.orderBy)
    .limit(pageLimit(q) + 1)
    .all();
  return sweepOrder.page(
    rows,
    q,
    (s) => [s.createdAt.getTime(), s.id],
    (page) => {
      const ids = page.map((s) => s.id);
      const counts = pointCounts(ctx, ids);
      return page.map((s) => ({
        id: s.id,
        name: s.name,
        status: s.status,
        pointCount: s.pointCount,
        pointsDone: counts.get(s.id)?.done ?? 0,
        pointsFinished: counts.get(s.id)?.finished ?? 0,
        axes: (s.axes as any[]).map((a) => a.parameter),
        createdAt: s.createdAt.toISOString(),
      }));
    },
  );
}

export type RefinedPoint = { index: number; values: Record<string, number> };
export const refinedOf = (sweep: { refinedPoints: unknown }): RefinedPoint[] =>
  (sweep.refinedPoints as RefinedPoint[] | null) ?? [];

/** Number of grid points of one or two axes. */
export const gridCount = (axes: { values: number[] }[]) => axes.reduce((n, a) => n * a.values.length, 1);

/**
 * Boundary refinement of a sweep (docs/regimes.md): new points between grid
 * neighbours whose stochastic labels differ (the mean-field label where a point
 * has no stochastic one), each a child run seeded from the sweep's seed and
 * its coordinates alone (refinementSeed), up to API_LIMITS.maxRefinementPoints
 * in all. Resumable: points already added are not proposed again, and their
 * runs resume like any sweep point.
 */
export async function refineSweep(ctx: AppContext, sweepId: string, userId: string): Promise<number> {
  const sweep = ctx.db.select().from(schema.sweeps).where(eq(schema.sweeps.id, sweepId)).get();
  if (!sweep || sweep.deletedAt) throw notFound("That sweep");
  const axes = sweep.axes as { parameter: string; values: number[] }[];
  const base = sweep.baseSpec as RunSpec;
  const grid = gridCount(axes);
  const runs = ctx.db
    .select({
      sweepPoint: schema.runs.sweepPoint,
      det: schema.runs.regimeDeterministic,
      sto: schema.runs.regimeStochastic,
    })
    .from(schema.runs)
    .where(eq(schema.runs.sweepId, sweepId))
    .all();
  const labels: (string | null)[] = Array.from({ length: grid }, () => null);
  for (const r of runs) if (r.sweepPoint !== null && r.sweepPoint < grid) labels[r.sweepPoint] = r.sto ?? r.det ?? null;
  const already = refinedOf(sweep);
  if (already.length >= API_LIMITS.maxRefinementPoints)
    throw conflict(
      `This sweep already has the most refined points allowed (${API_LIMITS.maxRefinementPoints}).`,
      "refinement_cap",
    );
  let fresh = refinementPoints({ axes, labels, existing: already.map((r) => r.values) });
  const roomForReplicates = Math.floor(API_LIMITS.maxSweepReplicates / base.replicates) - sweep.pointCount;
  fresh = fresh.slice(0, Math.max(0, roomForReplicates));
  if (!fresh.length)
    throw conflict(
      labels.every((l) => l === null)
        ? "No point has a behaviour label yet; refine once some points are finished."
        : roomForReplicates <= 0
          ? `More points would exceed ${API_LIMITS.maxSweepReplicates} replicates in all.`
          : "Nothing to refine: no two neighbouring points with labels differ, or every boundary is refined.",
      "nothing_to_refine",
    );
  const wasActive = sweep.status === "queued" || sweep.status === "running";
  if (!wasActive) {
    const active = ctx.db
      .select({ n: count() })
      .from(schema.sweeps)
      .where(
        and(
          eq(schema.sweeps.labId, sweep.labId),
          inArray(schema.sweeps.status, ["queued", "running"]),
          isNull(schema.sweeps.deletedAt),
        ),
      )
      .get()!.n;
    if (active >= API_LIMITS.maxActiveSweepsPerLab)
      throw tooMany(
        `This lab already has ${API_LIMITS.maxActiveSweepsPerLab} sweeps running; wait for one to finish or cancel one.`,
      );
  }
  const sibling = ctx.db.select().from(schema.runs).where(eq(schema.runs.sweepId, sweepId)).limit(1).get();
  const inputs: ReturnType<typeof resolveInputs> = {
    circuit: base.circuit,
    circuitId: sibling?.circuitId ?? null,
    circuitVersion: sibling?.circuitVersion ?? null,
    program: base.program!,
    programId: sibling?.programId ?? null,
    inputSignal: base.inputSignal,
  };
  const added: RefinedPoint[] = fresh.map((values, k) => ({ index: sweep.pointCount + k, values }));
  const specs = added.map((p) =>
    pointSpec(inputs, base, p.values, refinementSeed(base.seed, p.values), `Refined point ${p.index}`),
  );
  await checkThresholds(ctx, sweep.labId, specs);
  inTransaction(ctx, () => {
    ctx.db
      .update(schema.sweeps)
      .set({
        refinedPoints: [...already, ...added],
        pointCount: sweep.pointCount + added.length,
        status: "running",
        finishedAt: null,
      })
      .where(eq(schema.sweeps.id, sweepId))
      .run();
    specs.forEach((spec, k) => {
      const label = Object.entries(added[k].values)
        .map(([name, v]) => `${name}=${formatNumber(v)}`)
        .join(", ");
      insertRun(ctx, {
        labId: sweep.labId,
        name: `${sweep.name} · refined · ${label}`,
        spec,
        userId,
        sweepId,
        sweepPoint: added[k].index,
        inputs,
      });
    });
  });
  ctx.queue.kick();
  return added.length;
}
