/** Runs: launch, list, detail, progress (polling or server-sent events), cancel, archive, delete with undo, data and exports. */
import { z } from "zod";
import { eq } from "drizzle-orm";
import { defineRoutes, type RouteCall, type RouteDef } from "./route-table";
import { cancelRoute, deleteRestoreRoutes } from "./lifecycle-routes";
import type { AppContext } from "@/server/context";
import type { RunSummary } from "@/shared/schemas/analysis";
import { schema } from "@/db/client";
import {
  LaunchRunSchema,
  PatchRunSchema,
  ReplicateQuerySchema,
  RunInputsCheckedSchema,
  CompareRequestSchema,
  RunListQuerySchema,
  API_LIMITS,
} from "@/shared/schemas/api-runs";
import * as runs from "@/server/services/runs.service";
import * as bundles from "@/server/services/bundles.service";
import { accelerationFor, compareLabRuns, createMatchedControl } from "@/server/services/analysis.service";
import {
  byDurationCsv,
  outputPulsesCsv,
  pulseStatsCsv,
  replicateStatsCsv,
  runDataPackage,
  RUN_EXPORT_FILES,
  summaryCsv,
} from "@/sim/analysis";
import { readReplicateRows } from "@/server/compute/run-store";
import { readPulseStats } from "@/server/compute/pulse-store";
import { conflict } from "@/server/http-error";
import { recordAudit } from "@/server/services/audit.service";
import { PAGE_SIZE, PAGE_SIZE_MAX } from "@/shared/schemas/pagination";
import { answerCache } from "@/server/services/answer-cache";
import { sendCachedAnswer } from "./cached-answer";
import type { RunListPage } from "@/shared/schemas/api-runs";

const ACTIVE_RUN_STATUS: readonly string[] = ["queued", "running"];

const csvName = (name: string) =>
  name
    .replace(/[^A-Za-z0-9_.-]+/g, "-")
    .replace(/^-+|-+$/g, "")
    .slice(0, 60) || "run";

type RunRow = ReturnType<typeof runs.getRunRow>;

/** The answer to any action that creates a run (launch, import, reproduce, control): audit it, 201 with its detail. */
function newRun({ ctx, labId, user, res }: RouteCall, id: string, action: string, detail?: Record<string, unknown>) {
  recordAudit(ctx, { labId, userId: user!.id, action, targetType: "run", targetId: id, detail: detail ?? null });
  res.status(201);
  return runs.runDetail(ctx, id);
}

const finishedSummary = (row: RunRow): RunSummary => {
  if (!row.summary) throw conflict("The run has no results yet.", "not_finished");
  return row.summary as RunSummary;
};

/** A download of one of the run's exports: GET /runs/:id/export/<file>, named after the run. */
function exportRoute(
  file: string,
  summary: string,
  make: (ctx: AppContext, row: RunRow) => { suffix: string; text: string },
): RouteDef {
  return {
    method: "get",
    path: `/runs/:id/export/${file}`,
    access: { kind: "object", resource: "run", role: "viewer" },
    summary,
    handler: ({ ctx, params, res }) => {
      const row = runs.getRunRow(ctx, params.id);
      const { suffix, text } = make(ctx, row);
      res.setHeader("Content-Type", suffix.endsWith(".csv") ? "text/csv; charset=utf-8" : "application/json");
      res.setHeader("Content-Disposition", `attachment; filename="${csvName(row.name)}-${suffix}"`);
      res.send(text);
      return undefined;
    },
  };
}

export const runRoutes = defineRoutes([
  {
    method: "get",
    path: "/labs/:labId/runs",
    access: { kind: "lab", role: "viewer" },
    query: RunListQuerySchema,
    summary: `One page of the lab's runs, running and queued first, then newest: {items, nextCursor} (?cursor=, ?limit= up to ${PAGE_SIZE_MAX}, default ${PAGE_SIZE}); ?controlOf=<run id> its matched controls; ?ids=a,b (up to ${API_LIMITS.maxRunIdsPerLookup}) exactly those runs.`,
    handler: ({ ctx, labId, query }): RunListPage =>
      runs.listRuns(ctx, labId, {
        archived: query.archived === "1",
        status: query.status,
        includeSweepPoints: query.sweepPoints === "1",
        controlOf: query.controlOf,
        ids: query.ids,
        cursor: query.cursor,
        limit: query.limit,
      }),
  },
  {
    method: "post",
    path: "/labs/:labId/runs",
    access: { kind: "lab", role: "editor" },
    body: LaunchRunSchema,
    summary: "Launch a run (queued at once).",
    handler: async (call) =>
      newRun(call, await runs.launchRun(call.ctx, call.labId, call.user!.id, call.body), "run.launched", {
        name: call.body.name,
      }),
  },
  {
    method: "post",
    path: "/labs/:labId/runs/estimate",
    access: { kind: "lab", role: "viewer" },
    body: RunInputsCheckedSchema,
    summary: "Cost estimate before launch: events from the ODE path times replicates.",
    handler: ({ ctx, labId, body }) => {
      const spec = runs.buildSpec(runs.resolveInputs(ctx, labId, body), {
        ...body.settings,
        seed: body.settings.seed ?? "estimate",
      });
      return runs.estimate(ctx, labId, spec);
    },
  },
  {
    method: "post",
    path: "/labs/:labId/compare",
    access: { kind: "lab", role: "viewer" },
    body: CompareRequestSchema,
    summary: "Compare two to four finished runs of the lab.",
    handler: ({ ctx, labId, body }) => compareLabRuns(ctx, labId, body.runIds),
  },
  {
    method: "post",
    path: "/labs/:labId/bundles/import",
    access: { kind: "lab", role: "editor" },
    body: z.object({ bundle: z.unknown(), name: z.string().trim().min(1).max(120).optional() }),
    summary: "Import a run bundle and re-run it; the run reports whether it reproduced the bundle's statistics.",
    handler: async (call) =>
      newRun(
        call,
        await bundles.importBundle(call.ctx, call.labId, call.user!.id, call.body.bundle, call.body.name),
        "run.imported",
      ),
  },
  {
    method: "get",
    path: "/runs/:id",
    access: { kind: "object", resource: "run", role: "viewer" },
    summary:
      "Run detail: status, progress, settings, summary figures, reproduction check (an ETag once the run has ended).",
    handler: async ({ ctx, params, req, res }) => {
      // An ended run's detail changes only with a database write: served from the answer cache, with an ETag.
      const cache = answerCache(ctx);
      const key = `run-detail:${params.id}`;
      const hit = cache.get(key);
      if (hit) return sendCachedAnswer(req, res, cache, hit);
      const stamp = cache.stamp();
      // One read of the run's row (its JSON columns parsed once) for the detail, the reproduction check and the acceleration.
      const row = runs.getRunRow(ctx, params.id);
      const detail = {
        ...runs.runDetail(ctx, row),
        reproduction: bundles.reproductionStatus(ctx, row),
        acceleration: await accelerationFor(ctx, row),
      };
      // A queued or running run's progress lives in the queue's memory, not in the database: never cached.
      if (ACTIVE_RUN_STATUS.includes(row.status) || ctx.queue.progress(row.id)) return detail;
      return sendCachedAnswer(req, res, cache, cache.put(key, stamp, detail));
    },
  },
  {
    method: "get",
    path: "/runs/:id/events",
    access: { kind: "object", resource: "run", role: "viewer" },
    summary: "Server-sent events: progress while the run computes, then one 'ended' event.",
    handler: ({ ctx, params, req, res }) => {
      res.writeHead(200, {
        "Content-Type": "text/event-stream",
        "Cache-Control": "no-store",
        Connection: "keep-alive",
        "X-Accel-Buffering": "no",
      });
      const send = (event: string, data: unknown) => res.write(`event: ${event}\ndata: ${JSON.stringify(data)}\n\n`);
      const row = runs.getRunRow(ctx, params.id);
      send("status", { status: row.status, replicatesDone: row.replicatesDone, replicates: row.replicates });
      if (!["queued", "running"].includes(row.status)) {
        send("ended", { runId: row.id, status: row.status });
        res.end();
        return;
      }
      const onProgress = (p: any) => p.runId === params.id && send("progress", p);
      const onEnded = (e: any) => {
        if (e.runId !== params.id) return;
        send("ended", e);
        cleanup();
        res.end();
      };
      const ping = setInterval(() => res.write(": ping\n\n"), 15_000);
      const cleanup = () => {
        clearInterval(ping);
        ctx.queue.events.off("progress", onProgress);
        ctx.queue.events.off("ended", onEnded);
      };
      ctx.queue.events.on("progress", onProgress);
      ctx.queue.events.on("ended", onEnded);
      req.on("close", cleanup);
      return undefined;
    },
  },
  cancelRoute({
    resource: "run",
    path: "/runs/:id",
    summary: "Cancel a queued or running run (stored chunks are kept).",
    cancel: (ctx, id) => {
      if (!ctx.queue.cancel(id)) throw conflict("Only a queued or running run can be cancelled.", "not_running");
    },
    detail: (ctx, id) => runs.runDetail(ctx, id),
  }),
  {
    method: "patch",
    path: "/runs/:id",
    access: { kind: "object", resource: "run", role: "editor" },
    body: PatchRunSchema,
    summary: "Rename a run or edit its notes.",
    handler: ({ ctx, params, body }) => {
      if (Object.keys(body).length) ctx.db.update(schema.runs).set(body).where(eq(schema.runs.id, params.id)).run();
      return runs.runDetail(ctx, params.id);
    },
  },
  {
    method: "post",
    path: "/runs/:id/archive",
    access: { kind: "object", resource: "run", role: "editor" },
    summary: "Archive a run (hidden from the default list).",
    handler: ({ ctx, params }) => {
      ctx.db.update(schema.runs).set({ archivedAt: new Date() }).where(eq(schema.runs.id, params.id)).run();
      return runs.runDetail(ctx, params.id);
    },
  },
  {
    method: "post",
    path: "/runs/:id/unarchive",
    access: { kind: "object", resource: "run", role: "editor" },
    summary: "Bring an archived run back.",
    handler: ({ ctx, params }) => {
      ctx.db.update(schema.runs).set({ archivedAt: null }).where(eq(schema.runs.id, params.id)).run();
      return runs.runDetail(ctx, params.id);
    },
  },
  ...deleteRestoreRoutes({
    resource: "run",
    path: "/runs/:id",
    noun: "run",
    audit: "run",
    remove: (ctx, id) => runs.softDelete(ctx, id),
    restore: (ctx, id) => {
      runs.restore(ctx, id);
      return runs.runDetail(ctx, id);
    },
  }),
  {
    method: "get",
    path: "/runs/:id/series",
    access: { kind: "object", resource: "run", role: "viewer" },
    query: z.object({ trajectories: z.coerce.number().int().min(0).max(20).optional() }),
    summary: "Grid series for charts: mean, SD, ODE overlay, sample trajectories, the input signal.",
    handler: ({ ctx, params, query }) => runs.runSeries(ctx, params.id, { maxTrajectories: query.trajectories }),
  },
  {
    method: "get",
    path: "/runs/:id/replicates",
    access: { kind: "object", resource: "run", role: "viewer" },
    query: ReplicateQuerySchema,
    summary: "Per-replicate, per-pulse statistics, sorted and paged.",
    handler: ({ ctx, params, query }) => runs.replicatePage(ctx, params.id, query),
  },
  exportRoute(
    RUN_EXPORT_FILES.pulses,
    "CSV, one row per (replicate, input pulse): pass, delays, peak, width count.",
    (ctx, row) => ({
      suffix: RUN_EXPORT_FILES.pulses,
      text: pulseStatsCsv(readPulseStats(ctx.db, row.id)),
    }),
  ),
  exportRoute(
    RUN_EXPORT_FILES.outputPulses,
    "CSV, one row per output pulse: its width and the input pulse it belongs to.",
    (ctx, row) => ({
      suffix: RUN_EXPORT_FILES.outputPulses,
      text: outputPulsesCsv(readPulseStats(ctx.db, row.id)),
    }),
  ),
  exportRoute(
    RUN_EXPORT_FILES.replicates,
    "CSV, one row per replicate: events, cap, output mean and variance, pass fraction, median delay and width.",
    (ctx, row) => ({
      suffix: RUN_EXPORT_FILES.replicates,
      text: replicateStatsCsv(
        readPulseStats(ctx.db, row.id),
        readReplicateRows(ctx.db, row.id).map((r) => ({
          replicate: r.replicate,
          events: r.events,
          capped: r.capped,
          outputMean: r.outputMean ?? NaN,
          outputVar: r.outputVar ?? NaN,
        })),
      ),
    }),
  ),
  exportRoute(
    RUN_EXPORT_FILES.aggregates,
    "CSV, one row per input pulse duration: filter curve and delays.",
    (_ctx, row) => ({
      suffix: RUN_EXPORT_FILES.aggregates,
      text: byDurationCsv(finishedSummary(row)),
    }),
  ),
  exportRoute(
    RUN_EXPORT_FILES.headline,
    "CSV of the run's headline figures as (metric, value, unit) rows: d50, false-pass rate, delays, noise.",
    (_ctx, row) => ({ suffix: RUN_EXPORT_FILES.headline, text: summaryCsv(finishedSummary(row)) }),
  ),
  exportRoute(
    "datapackage.json",
    "The data dictionary of the CSV exports (Frictionless Data Package, Table Schema): every column with its unit, the settings block and method label.",
    (ctx, row) => {
      const d = runs.runDetail(ctx, row);
      return {
        suffix: "datapackage.json",
        text: JSON.stringify(
          runDataPackage({
            title: d.name,
            filePrefix: csvName(d.name),
            settings: d.settings,
            extra: { runId: d.id, engineVersion: d.engineVersion, statsHash: d.statsHash },
          }),
          null,
          2,
        ),
      };
    },
  ),
  exportRoute("summary.json", "The JSON summary of the run, with its settings block and method label.", (ctx, row) => {
    const d = runs.runDetail(ctx, row);
    return {
      suffix: "summary.json",
      text: JSON.stringify(
        {
          id: d.id,
          name: d.name,
          status: d.status,
          seed: d.seed,
          engineVersion: d.engineVersion,
          settings: d.settings,
          method: d.settings?.method ?? null,
          threshold: d.threshold,
          summary: d.summary,
        },
        null,
        2,
      ),
    };
  }),
  exportRoute(
    "bundle.json",
    "The reproduction bundle: circuit, program, settings, seed, engine, Node and V8 versions, statistics hash.",
    (ctx, row) => ({
      suffix: "bundle.json",
      text: JSON.stringify(bundles.makeBundle(ctx, row.id), null, 2),
    }),
  ),
  {
    method: "post",
    path: "/runs/:id/reproduce",
    access: { kind: "object", resource: "run", role: "editor" },
    summary: "Re-run this run's bundle; the new run reports identical statistics or the first difference.",
    handler: (call) =>
      newRun(call, bundles.reproduceRun(call.ctx, call.params.id, call.user!.id), "run.reproduced", {
        of: call.params.id,
      }),
  },
  {
    method: "post",
    path: "/runs/:id/control",
    access: { kind: "object", resource: "run", role: "editor" },
    summary: "Create and launch the matched simple-regulation control (same steady state, program and seed scheme).",
    handler: async (call) =>
      newRun(call, await createMatchedControl(call.ctx, call.params.id, call.user!.id), "run.launched", {
        controlOf: call.params.id,
      }),
  },
]);
