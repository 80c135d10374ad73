/** Parameter sweeps: launch, list, detail with per-point figures, cancel, resume, delete. */
import { defineRoutes } from "./route-table";
import { cancelRoute, deleteRestoreRoutes } from "./lifecycle-routes";
import { LaunchSweepSchema } from "@/shared/schemas/api-runs";
import * as sweeps from "@/server/services/sweeps.service";
import { recordAudit } from "@/server/services/audit.service";

import { PAGE_SIZE, PAGE_SIZE_MAX, PageQuerySchema } from "@/shared/schemas/pagination";

export const sweepRoutes = defineRoutes([
  {
    method: "get",
    path: "/labs/:labId/sweeps",
    access: { kind: "lab", role: "viewer" },
    query: PageQuerySchema,
    summary: `One page of the lab's sweeps with progress (pointsDone: points that ended; pointsFinished: those that finished, not cancelled or failed), newest first: {items, nextCursor} (?cursor=, ?limit= up to ${PAGE_SIZE_MAX}, default ${PAGE_SIZE}).`,
    handler: ({ ctx, labId, query }) => sweeps.listSweeps(ctx, labId, query),
  },
  {
    method: "post",
    path: "/labs/:labId/sweeps",
    access: { kind: "lab", role: "editor" },
    body: LaunchSweepSchema,
    summary: "Launch a sweep of one or two parameters; each point is a child run.",
    handler: async ({ ctx, labId, user, body, res }) => {
      const id = await sweeps.launchSweep(ctx, labId, user!.id, body);
      recordAudit(ctx, {
        labId,
        userId: user!.id,
        action: "sweep.launched",
        targetType: "sweep",
        targetId: id,
        detail: { name: body.name },
      });
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
  cancelRoute({
    resource: "sweep",
    path: "/sweeps/:id",
    summary: "Cancel the sweep's queued and running points.",
    cancel: (ctx, id) => sweeps.cancelSweep(ctx, id),
    detail: (ctx, id) => sweeps.sweepDetail(ctx, id),
  }),

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
  ...deleteRestoreRoutes({
    resource: "sweep",
    path: "/sweeps/:id",
    noun: "sweep",
    alsoHides: "and hide its points",
    audit: "sweep",
    remove: (ctx, id) => sweeps.deleteSweep(ctx, id),
    restore: (ctx, id) => {
      sweeps.restoreSweep(ctx, id);
      return sweeps.sweepDetail(ctx, id);
    },
  }),
]);
