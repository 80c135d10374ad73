/** Parameter sweeps: launch, list, detail with per-point figures, cancel, resume, delete. */
import { eq } from "drizzle-orm";
import { defineRoutes } from "./route-table";
import { schema } from "../../db/client";
import { LaunchSweepSchema } from "../../shared/schemas/api-runs";
import * as sweeps from "../services/sweeps.service";
import { recordAudit } from "../services/audit.service";
import { assertRestorable } from "../services/undo";

export const sweepRoutes = defineRoutes([
  {
    method: "get",
    path: "/labs/:labId/sweeps",
    access: { kind: "lab", role: "viewer" },
    summary: "The lab's sweeps with progress.",
    handler: ({ ctx, labId }) => sweeps.listSweeps(ctx, labId),
  },
  {
    method: "post",
    path: "/labs/:labId/sweeps",
    access: { kind: "lab", role: "editor" },
    body: LaunchSweepSchema,
    summary: "Launch a sweep of one or two parameters; each point is a child run.",
    handler: ({ ctx, labId, user, body, res }) => {
      const id = sweeps.launchSweep(ctx, labId, user!.id, body);
      recordAudit(ctx, { labId, userId: user!.id, action: "sweep.launched", targetType: "sweep", targetId: id, detail: { name: body.name } });
      res.status(201);
      return sweeps.sweepDetail(ctx, id);
    },
  },
  {
    method: "get",
    path: "/sweeps/:id",
    access: { kind: "object", resource: "sweep", role: "viewer" },
    summary: "Sweep detail: axes, points with status and figures.",
    handler: ({ ctx, params }) => sweeps.sweepDetail(ctx, params.id),
  },
  {
    method: "post",
    path: "/sweeps/:id/cancel",
    access: { kind: "object", resource: "sweep", role: "editor" },
    summary: "Cancel the sweep's queued and running points.",
    handler: ({ ctx, params, user, labId }) => {
      sweeps.cancelSweep(ctx, params.id);
      recordAudit(ctx, { labId, userId: user!.id, action: "sweep.cancelled", targetType: "sweep", targetId: params.id });
      return sweeps.sweepDetail(ctx, params.id);
    },
  },
  {
    method: "post",
    path: "/sweeps/:id/resume",
    access: { kind: "object", resource: "sweep", role: "editor" },
    summary: "Resume cancelled or failed points.",
    handler: ({ ctx, params }) => {
      sweeps.resumeSweep(ctx, params.id);
      return sweeps.sweepDetail(ctx, params.id);
    },
  },
  {
    method: "delete",
    path: "/sweeps/:id",
    access: { kind: "object", resource: "sweep", role: "editor" },
    summary: "Delete a sweep and hide its points (restorable for 7 days).",
    handler: ({ ctx, params, user, labId }) => {
      const now = new Date();
      const running = ctx.db.select({ id: schema.runs.id, status: schema.runs.status }).from(schema.runs).where(eq(schema.runs.sweepId, params.id)).all();
      for (const r of running) if (r.status === "queued" || r.status === "running") ctx.queue.cancel(r.id);
      ctx.db.update(schema.sweeps).set({ deletedAt: now }).where(eq(schema.sweeps.id, params.id)).run();
      ctx.db.update(schema.runs).set({ deletedAt: now }).where(eq(schema.runs.sweepId, params.id)).run();
      recordAudit(ctx, { labId, userId: user!.id, action: "sweep.deleted", targetType: "sweep", targetId: params.id });
      return { deleted: true, undo: `/api/sweeps/${params.id}/restore` };
    },
  },
  {
    method: "post",
    path: "/sweeps/:id/restore",
    access: { kind: "object", resource: "sweep", role: "editor" },
    summary: "Undo a sweep delete.",
    handler: ({ ctx, params }) => {
      const sweep = ctx.db.select({ deletedAt: schema.sweeps.deletedAt }).from(schema.sweeps).where(eq(schema.sweeps.id, params.id)).get();
      assertRestorable("sweep", sweep?.deletedAt ?? null);
      ctx.db.update(schema.sweeps).set({ deletedAt: null }).where(eq(schema.sweeps.id, params.id)).run();
      ctx.db.update(schema.runs).set({ deletedAt: null }).where(eq(schema.runs.sweepId, params.id)).run();
      return sweeps.sweepDetail(ctx, params.id);
    },
  },
]);
