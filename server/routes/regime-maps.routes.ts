/** Deterministic regime maps, boundary refinement (maps and sweeps) and design targets (docs/regimes.md). */
import { defineRoutes } from "./route-table";
import { LaunchRegimeMapSchema, DesignTargetSchema } from "@/shared/schemas/api-regime-maps";
import { PAGE_SIZE, PAGE_SIZE_MAX, PageQuerySchema } from "@/shared/schemas/pagination";
import { API_LIMITS } from "@/shared/schemas/api-runs";
import * as maps from "@/server/services/regime-maps.service";
import * as sweeps from "@/server/services/sweeps.service";
import { recordAudit } from "@/server/services/audit.service";
import { deleteRestoreRoutes } from "./lifecycle-routes";

export const regimeMapRoutes = defineRoutes([
  {
    method: "get",
    path: "/labs/:labId/regime-maps",
    access: { kind: "lab", role: "viewer" },
    query: PageQuerySchema,
    summary: `One page of the lab's deterministic regime maps, newest first: {items, nextCursor} (?cursor=, ?limit= up to ${PAGE_SIZE_MAX}, default ${PAGE_SIZE}).`,
    handler: ({ ctx, labId, query }) => maps.listRegimeMaps(ctx, labId, query),
  },
  {
    method: "post",
    path: "/labs/:labId/regime-maps",
    access: { kind: "lab", role: "editor" },
    body: LaunchRegimeMapSchema,
    summary: `Compute a mean-field-only behaviour map over one or two parameters (up to ${API_LIMITS.maxRegimeMapPoints} points, no stochastic simulation) in the compute thread; 422 past the compute budget.`,
    handler: async ({ ctx, labId, user, body, res }) => {
      const id = await maps.launchRegimeMap(ctx, labId, user!.id, body);
      recordAudit(ctx, {
        labId,
        userId: user!.id,
        action: "regime-map.computed",
        targetType: "regime-map",
        targetId: id,
        detail: { name: body.name },
      });
      res.status(201);
      return maps.regimeMapDetail(ctx, id);
    },
  },
  {
    method: "get",
    path: "/regime-maps/:id",
    access: { kind: "object", resource: "regimeMap", role: "viewer" },
    summary: "Regime map detail: axes, grid and refined points with their mean-field labels and evidence.",
    handler: ({ ctx, params }) => maps.regimeMapDetail(ctx, params.id),
  },
  ...deleteRestoreRoutes({
    resource: "regimeMap",
    path: "/regime-maps/:id",
    noun: "regime map",
    audit: "regime-map",
    remove: (ctx, id) => maps.deleteRegimeMap(ctx, id),
    restore: (ctx, id) => {
      maps.restoreRegimeMap(ctx, id);
      return maps.regimeMapDetail(ctx, id);
    },
  }),
  {
    method: "post",
    path: "/regime-maps/:id/refine",
    access: { kind: "object", resource: "regimeMap", role: "editor" },
    summary: `Add points between neighbours whose labels differ (at most ${API_LIMITS.maxRefinementPoints} in all; resumable); 409 when there is nothing to refine.`,
    handler: async ({ ctx, params }) => {
      await maps.refineRegimeMap(ctx, params.id);
      return maps.regimeMapDetail(ctx, params.id);
    },
  },
  {
    method: "post",
    path: "/regime-maps/:id/target",
    access: { kind: "object", resource: "regimeMap", role: "viewer" },
    body: DesignTargetSchema,
    summary:
      "Evaluate a design target on every point of the map (only the oscillation limit is measurable without pulses).",
    handler: ({ ctx, params, body }) => maps.regimeMapTarget(ctx, params.id, body),
  },
  {
    method: "post",
    path: "/sweeps/:id/refine",
    access: { kind: "object", resource: "sweep", role: "editor" },
    summary: `Queue points between neighbours whose labels differ, each seeded by its coordinates (at most ${API_LIMITS.maxRefinementPoints} in all; resumable); 409 when there is nothing to refine.`,
    handler: async ({ ctx, params, user }) => {
      await sweeps.refineSweep(ctx, params.id, user!.id);
      return sweeps.sweepDetail(ctx, params.id);
    },
  },
  {
    method: "post",
    path: "/sweeps/:id/target",
    access: { kind: "object", resource: "sweep", role: "viewer" },
    body: DesignTargetSchema,
    summary:
      "Evaluate a design target on every sweep point: meets or not, the margin to each limit, and the fraction of cells meeting it with a Wilson interval when cell-to-cell variation is set.",
    handler: ({ ctx, params, body }) => maps.sweepTarget(ctx, params.id, body),
  },
]);
