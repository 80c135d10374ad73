/**
 * Deterministic-only regime maps (docs/regimes.md): the mean-field label at
 * every point of a one- or two-parameter grid, computed in the compute thread
 * (server/compute/compute-service.ts, parts of REGIME_MAP_POINTS_PER_TASK
 * points, each one turn of the per-lab queue under the request budget: 422
 * past it), stored in `regime_maps`; boundary refinement of maps; design
 * targets evaluated on sweeps and maps.
 */
import { and, eq, isNull } from "drizzle-orm";
import type { AppContext } from "@/server/context";
import { schema } from "@/db/client";
import { API_LIMITS, type LaunchSweep } from "@/shared/schemas/api-runs";
import type {
  RegimeMapDetail,
  RegimeMapListItem,
  RegimeMapPoint,
  TargetAnswer,
  TargetPoint,
} from "@/shared/schemas/api-regime-maps";
import type { RunSpec } from "@/shared/schemas/run-spec";
import type { RunSummary } from "@/shared/schemas/analysis";
import type { RegimeVerdictView } from "@/shared/schemas/regime";
import { REGIME_MAP_POINTS_PER_TASK } from "@/server/compute/compute-service";
import { conflict, notFound } from "@/server/http-error";
import { newId } from "@/server/ids";
import { assertRestorable } from "./undo";
import { refinementPoints, refinementSeed } from "@/sim/regimes/refine-map";
import {
  fractionMeeting,
  meetsTarget,
  MIN_REPLICATES_FOR_FRACTION,
  type DesignTarget,
} from "@/sim/regimes/design-target";
import { replicateVerdicts, type ReplicateFigures } from "@/sim/regimes/replicate-figures";
import { gridCount, planPoints, pointSpec, sweepDetail } from "./sweeps.service";
import { keyset, pageLimit } from "./pagination";
import type { Page, PageQuery } from "@/shared/schemas/pagination";

type Axes = { parameter: string; values: number[] }[];

export async function launchRegimeMap(
  ctx: AppContext,
  labId: string,
  userId: string,
  body: LaunchSweep,
): Promise<string> {
  const { base, axes, points, specs } = planPoints(ctx, labId, body, API_LIMITS.maxRegimeMapPoints, "map");
  const t0 = performance.now();
  const verdicts = await ctx.compute.regimeMap(labId, specs);
  const seconds = (performance.now() - t0) / 1000;
  const id = newId("rmp_");
  ctx.db
    .insert(schema.regimeMaps)
    .values({
      id,
      labId,
      name: body.name,
      baseSpec: base,
      axes,
      points: points.map((values, index) => ({ index, values, refined: false, verdict: verdicts[index] })),
      computeSeconds: seconds,
      createdBy: userId,
      createdAt: new Date(),
    })
    .run();
  return id;
}

function mapRow(ctx: AppContext, id: string) {
  const row = ctx.db.select().from(schema.regimeMaps).where(eq(schema.regimeMaps.id, id)).get();
  if (!row) throw notFound("That regime map");
  return row;
}

export function regimeMapDetail(ctx: AppContext, id: string): RegimeMapDetail {
  const row = mapRow(ctx, id);
  const axes = row.axes as Axes;
  const points = row.points as RegimeMapPoint[];
  const grid = gridCount(axes);
  return {
    id: row.id,
    labId: row.labId,
    name: row.name,
    axes,
    points,
    gridPoints: grid,
    refinedPoints: points.length - grid,
    refinementCap: API_LIMITS.maxRefinementPoints,
    computeSeconds: row.computeSeconds,
    baseSpec: row.baseSpec as RunSpec,
    createdAt: row.createdAt.toISOString(),
  };
}

const mapOrder = keyset([
  { col: schema.regimeMaps.createdAt, dir: "desc", type: "number" },
  { col: schema.regimeMaps.id, dir: "asc", type: "string" },
]);

/** One page of the lab's regime maps, newest first (keyset on created time descending, id). */
export function listRegimeMaps(ctx: AppContext, labId: string, q: PageQuery = {}): Page<RegimeMapListItem> {
  const t = schema.regimeMaps;
  const rows = ctx.db
    .select()
    .from(t)
    .where(and(eq(t.labId, labId), isNull(t.deletedAt), mapOrder.after(q.cursor)))
    .orderBy(...mapOrder.orderBy)
    .limit(pageLimit(q) + 1)
    .all();
  return mapOrder.page(
    rows,
    q,
    (r) => [r.createdAt.getTime(), r.id],
    (page) =>
      page.map((r) => {
        const axes = r.axes as Axes;
        const grid = gridCount(axes);
        return {
          id: r.id,
          name: r.name,
          axes: axes.map((a) => a.parameter),
          gridPoints: grid,
          refinedPoints: (r.points as unknown[]).length - grid,
          createdAt: r.createdAt.toISOString(),
        };
      }),
  );
}

/** Soft delete: the map disappears from its lab's list and every route but restore, and is purged after the undo period. */
export function deleteRegimeMap(ctx: AppContext, id: string): void {
  const row = mapRow(ctx, id);
  if (row.deletedAt) throw conflict("That regime map is already deleted.", "already_deleted");
  ctx.db.update(schema.regimeMaps).set({ deletedAt: new Date() }).where(eq(schema.regimeMaps.id, id)).run();
}

/** Undoes a delete (until the purge); 409 when the map is not deleted or the undo period has passed. */
export function restoreRegimeMap(ctx: AppContext, id: string): void {
  const row = mapRow(ctx, id);
  assertRestorable("regime map", row.deletedAt);
  ctx.db.update(schema.regimeMaps).set({ deletedAt: null }).where(eq(schema.regimeMaps.id, id)).run();
}

/**
 * Boundary refinement of a map: new points between grid neighbours whose
 * labels differ (sim/regimes/refine-map.ts), up to API_LIMITS.maxRefinementPoints
 * in all. Each part of REGIME_MAP_POINTS_PER_TASK points is stored as soon as it
 * is computed, so a request that runs out of budget (422) keeps what it did and
 * the next one resumes. Returns the number of points added.
 */
export async function refineRegimeMap(ctx: AppContext, id: string): Promise<number> {
  const row = mapRow(ctx, id);
  const axes = row.axes as Axes;
  const base = row.baseSpec as RunSpec;
  const grid = gridCount(axes);
  const existing = row.points as RegimeMapPoint[];
  const refined = existing.slice(grid);
  if (refined.length >= API_LIMITS.maxRefinementPoints)
    throw conflict(
      `This map already has the most refined points allowed (${API_LIMITS.maxRefinementPoints}).`,
      "refinement_cap",
    );
  const fresh = refinementPoints({
    axes,
    labels: existing.slice(0, grid).map((p) => p.verdict.label),
    existing: refined.map((p) => p.values),
  });
  if (!fresh.length)
    throw conflict(
      "Nothing to refine: no two neighbouring points differ, or every boundary is refined.",
      "nothing_to_refine",
    );
  const inputs = {
    circuit: base.circuit,
    circuitId: null,
    circuitVersion: null,
    program: base.program!,
    programId: null,
    inputSignal: base.inputSignal,
  };
  let added = 0;
  const t0 = performance.now();
  try {
    for (let k = 0; k < fresh.length; k += REGIME_MAP_POINTS_PER_TASK) {
      const part = fresh.slice(k, k + REGIME_MAP_POINTS_PER_TASK);
      const specs = part.map((values) =>
        pointSpec(inputs, base, values, refinementSeed(base.seed, values), "Refined point"),
      );
      const verdicts = await ctx.compute.regimeMap(row.labId, specs);
      const cur = mapRow(ctx, id);
      const pts = cur.points as RegimeMapPoint[];
      const next = [
        ...pts,
        ...part.map((values, j) => ({ index: pts.length + j, values, refined: true, verdict: verdicts[j] })),
      ];
      ctx.db.update(schema.regimeMaps).set({ points: next }).where(eq(schema.regimeMaps.id, id)).run();
      added += part.length;
    }
  } finally {
    const cur = mapRow(ctx, id);
    ctx.db
      .update(schema.regimeMaps)
      .set({ computeSeconds: cur.computeSeconds + (performance.now() - t0) / 1000 })
      .where(eq(schema.regimeMaps.id, id))
      .run();
  }
  return added;
}

const hasVariation = (spec: RunSpec) => (spec.extrinsic ?? []).length > 0;

/** The period a verdict measured (mean-field: periodMinutes; ensemble: acfPeriodMinutes). */
function periodOf(v: RegimeVerdictView | null | undefined): number | null {
  const e = v?.evidence ?? {};
  const p = e.periodMinutes ?? e.acfPeriodMinutes;
  return typeof p === "number" && Number.isFinite(p) ? p : null;
}

/**
 * Design target on a sweep: every point's figures against each limit, with
 * the margin (docs/regimes.md), and, when cell-to-cell variation is set, the
 * fraction of cells (replicates) meeting the target from the replicates' own
 * figures with a Wilson 95% interval. The oscillation limit reads the
 * stochastic label and its autocorrelation period.
 */
export function sweepTarget(ctx: AppContext, sweepId: string, target: DesignTarget): TargetAnswer {
  const detail = sweepDetail(ctx, sweepId);
  const rows = ctx.db
    .select({
      id: schema.runs.id,
      summary: schema.runs.summary,
      regime: schema.runs.regime,
      replicateFigures: schema.runs.replicateFigures,
    })
    .from(schema.runs)
    .where(eq(schema.runs.sweepId, sweepId))
    .all();
  const byRun = new Map(rows.map((r) => [r.id, r]));
  const varied = hasVariation(detail.baseSpec);
  const points: TargetPoint[] = detail.points.map((p) => {
    const r = byRun.get(p.runId);
    const s = r?.summary as RunSummary | null | undefined;
    const common = { index: p.index, runId: p.runId, values: p.values, refined: !!p.refined };
    if (!s)
      return {
        ...common,
        meets: null,
        limits: [],
        reason: "no figures yet: the point is not finished",
        fraction: null,
        fractionReason: "no figures yet",
      };
    const regime = r?.regime as { stochastic?: RegimeVerdictView } | null;
    const res = meetsTarget(target, {
      byDuration: s.byDuration.map((b) => ({ duration: b.duration, pulses: b.pulses, passed: b.passed })),
      delayCostMinutes: s.delayCost?.medianDelay ?? null,
      label: regime?.stochastic?.label ?? null,
      periodMinutes: periodOf(regime?.stochastic),
    });
    let fraction: TargetPoint["fraction"] = null;
    let fractionReason: string | null = null;
    const figs = r?.replicateFigures as ReplicateFigures | null;
    if (!varied)
      fractionReason =
        "no cell-to-cell variation is set: every replicate shares the same parameters, so the point's own figures are the answer";
    else if (target.oscillation)
      fractionReason = "the oscillation limit is a property of the ensemble, not of one replicate";
    else if (!figs) fractionReason = "this point was finalised before per-replicate figures were kept";
    else if (figs.replicates.length < MIN_REPLICATES_FOR_FRACTION)
      fractionReason = `fewer than ${MIN_REPLICATES_FOR_FRACTION} replicates with pulses`;
    else {
      fraction = fractionMeeting(replicateVerdicts(figs, target).map((v) => v.meets));
      if (!fraction) fractionReason = `fewer than ${MIN_REPLICATES_FOR_FRACTION} replicates`;
    }
    return { ...common, meets: res.meets, limits: res.limits, reason: null, fraction, fractionReason };
  });
  return {
    target,
    points,
    meeting: points.filter((p) => p.meets).length,
    minReplicatesForFraction: MIN_REPLICATES_FOR_FRACTION,
  };
}

/** Design target on a deterministic map: only the oscillation limit can be measured without pulses' statistics. */
export function regimeMapTarget(ctx: AppContext, id: string, target: DesignTarget): TargetAnswer {
  const detail = regimeMapDetail(ctx, id);
  const points: TargetPoint[] = detail.points.map((p) => {
    const res = meetsTarget(target, { label: p.verdict.label, periodMinutes: periodOf(p.verdict) });
    const limits = res.limits.map((l) =>
      l.limit === "oscillation"
        ? l
        : { ...l, reason: "a mean-field map has no pulse statistics; launch a sweep for this limit" },
    );
    return {
      index: p.index,
      runId: null,
      values: p.values,
      refined: p.refined,
      meets: res.meets,
      limits,
      reason: null,
      fraction: null,
      fractionReason: "a mean-field map has no replicates",
    };
  });
  return {
    target,
    points,
    meeting: points.filter((p) => p.meets).length,
    minReplicatesForFraction: MIN_REPLICATES_FOR_FRACTION,
  };
}
