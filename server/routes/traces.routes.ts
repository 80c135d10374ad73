/** Single-cell traces and matching (contract: shared/schemas/api-traces.ts). Logic in services/traces.service.ts and match.service.ts. */
import { defineRoutes, type RouteDef } from "./route-table";
import { inTransaction } from "@/db/client";
import { traceDataPackage, traceOutputPulsesCsv } from "@/sim/analysis/trace-export";
import { deleteRestoreRoutes } from "./lifecycle-routes";
import {
  MatchRequestSchema,
  TraceSetPatchSchema,
  type TraceSetListItem,
  type TraceSetListPage,
} from "@/shared/schemas/api-traces";
import { PAGE_SIZE, PAGE_SIZE_MAX, PageQuerySchema } from "@/shared/schemas/pagination";
import {
  analyseStored,
  buildTraceSet,
  deleteTraceSet,
  listTraceSets,
  metricsCsv,
  previewOf,
  readUpload,
  restoreTraceSet,
  saveTraceSet,
  sendTraceError,
  traceSetDetail,
  traceUpload,
  updateTraceSet,
} from "@/server/services/traces.service";
import { matchDetail, runMatch } from "@/server/services/match.service";

export const traceRoutes = defineRoutes([
  {
    method: "post",
    path: "/labs/:labId/traces/preview",
    access: { kind: "lab", role: "editor" },
    before: [traceUpload],
    summary:
      "Parse, check and analyse an uploaded CSV/TSV (multipart: file + options JSON) without storing anything; 400 names the line and column of the first problems.",
    handler: ({ ctx, req, res, labId }) => {
      try {
        return previewOf(buildTraceSet(ctx, labId, readUpload(req)));
      } catch (e) {
        if (sendTraceError(e, res)) return undefined;
        throw e;
      }
    },
  },
  {
    method: "post",
    path: "/labs/:labId/traces",
    access: { kind: "lab", role: "editor" },
    before: [traceUpload],
    summary:
      "Upload a trace set (multipart: file + options JSON); stored in one transaction only when the whole file is accepted.",
    handler: ({ ctx, req, res, labId, user }) => {
      try {
        const up = readUpload(req);
        const built = buildTraceSet(ctx, labId, up);
        const name =
          up.options.name ?? (up.fileName ? up.fileName.replace(/\.(csv|tsv|txt)$/i, "") : "Uploaded traces");
        const id = saveTraceSet(ctx, labId, user!.id, {
          ...built,
          name,
          timeUnit: up.options.timeUnit,
          settings: up.options.settings,
        });
        res.status(201);
        return traceSetDetail(ctx, id);
      } catch (e) {
        if (sendTraceError(e, res)) return undefined;
        throw e;
      }
    },
  },
  {
    method: "get",
    path: "/labs/:labId/traces",
    access: { kind: "lab", role: "viewer" },
    query: PageQuerySchema,
    summary: `One page of the lab's trace sets, newest first: {items, nextCursor} (?cursor=, ?limit= up to ${PAGE_SIZE_MAX}, default ${PAGE_SIZE}).`,
    handler: ({ ctx, labId, query }): TraceSetListPage => listTraceSets(ctx, labId, query),
  },
  {
    method: "get",
    path: "/traces/:id",
    access: { kind: "object", resource: "traceSet", role: "viewer" },
    summary: "A trace set: cells (downsampled for charts), per-cell pulse figures and the pooled summary.",
    handler: ({ ctx, params }) => traceSetDetail(ctx, params.id),
  },
  {
    method: "patch",
    path: "/traces/:id",
    access: { kind: "object", resource: "traceSet", role: "editor" },
    body: TraceSetPatchSchema,
    summary: "Rename, or change preprocessing and threshold settings (figures are recomputed).",
    // One transaction: if the figures cannot be recomputed the answer is an error and nothing is kept.
    handler: ({ ctx, params, body, user }) =>
      inTransaction(ctx, () => {
        updateTraceSet(ctx, user!.id, params.id, body);
        return traceSetDetail(ctx, params.id);
      }),
  },
  ...deleteRestoreRoutes({
    resource: "traceSet",
    path: "/traces/:id",
    noun: "trace set",
    remove: (ctx, id, userId) => deleteTraceSet(ctx, userId, id),
    restore: (ctx, id, userId): TraceSetListItem => restoreTraceSet(ctx, userId, id),
  }),
  ...(
    [
      ["metrics.csv", "Per cell and pulse figures as CSV (one row per cell and analysed pulse)."],
      ["output-pulses.csv", "CSV, one row per output pulse of every cell: its width and input pulse."],
      [
        "datapackage.json",
        "The data dictionary of the trace set's CSV exports (Frictionless Data Package, Table Schema).",
      ],
    ] as const
  ).map(([file, summary]): RouteDef => ({
    method: "get",
    path: `/traces/:id/export/${file}`,
    access: { kind: "object", resource: "traceSet", role: "viewer" },
    summary,
    handler: ({ ctx, params, res }) => {
      const { row, analysis } = analyseStored(ctx, params.id);
      const base = row.name.replace(/[^A-Za-z0-9_.-]+/g, "-").replace(/^-+|-+$/g, "") || "traces";
      res.setHeader("Content-Type", file.endsWith(".csv") ? "text/csv; charset=utf-8" : "application/json");
      res.setHeader("Content-Disposition", `attachment; filename="${base}-${file}"`);
      res.send(
        file === "metrics.csv"
          ? metricsCsv(analysis, row.synthetic)
          : file === "output-pulses.csv"
            ? traceOutputPulsesCsv(analysis)
            : JSON.stringify(
                traceDataPackage({ title: row.name, filePrefix: base, synthetic: row.synthetic }),
                null,
                2,
              ),
      );
      return undefined;
    },
  })),
  {
    method: "post",
    path: "/traces/:id/match",
    access: { kind: "object", resource: "traceSet", role: "editor" },
    body: MatchRequestSchema,
    summary:
      "Match the traces against a finished run ({runId}) or every finished point of a sweep ({sweepId}); tolerance fixed in the request (default: closest 5%). Stores the match.",
    handler: ({ ctx, params, body, user, res }) => {
      const id = runMatch(ctx, user!.id, params.id, body);
      res.status(201);
      return matchDetail(ctx, id);
    },
  },
  {
    method: "get",
    path: "/matches/:id",
    access: { kind: "object", resource: "match", role: "viewer" },
    summary: "A stored match: ranked points, accept set, parameter ranges and the distributions for overlay charts.",
    handler: ({ ctx, params }) => matchDetail(ctx, params.id),
  },
]);
