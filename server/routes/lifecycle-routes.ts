/**
 * The lifecycle routes (cancel; delete with undo; restore) alike for every resource
 * that has them. Delete and restore: one pair of routes per soft-deletable resource, so the access rule (editor, reachable
 * while deleted), the answers and the wording cannot drift apart. DELETE answers
 * `{ deleted: true, undo }` with the restore path; POST .../restore answers what the
 * resource's restore returns (its detail or list item). A second delete and a restore
 * of something not deleted answer 409 (the services check), and after the undo period
 * the object is purged. Cancel (runs and sweeps): POST .../cancel, editor, audited as
 * `<resource>.cancelled`, answering the resource's detail.
 */
import type { AppContext } from "@/server/context";
import { API_LIMITS } from "@/shared/limits";
import { recordAudit } from "@/server/services/audit.service";
import type { RouteDef } from "./route-table";

type Resource = "run" | "sweep" | "traceSet" | "regimeMap";

export interface DeleteRestoreSpec {
  resource: Resource;
  /** The object's path under /api, e.g. "/runs/:id". */
  path: `/${string}/:id`;
  /** How the docs name it: "run", "sweep", "trace set", "regime map". */
  noun: string;
  /** What is hidden with it, for the docs (e.g. "and hide its points"). */
  alsoHides?: string;
  /** The audit trail's prefix ("run" records run.deleted and run.restored); leave out when the service audits. */
  audit?: "run" | "sweep" | "regime-map";
  remove: (ctx: AppContext, id: string, userId: string) => void;
  restore: (ctx: AppContext, id: string, userId: string) => unknown;
}

export function deleteRestoreRoutes(spec: DeleteRestoreSpec): RouteDef[] {
  const access = { kind: "object", resource: spec.resource, role: "editor", deleted: "reachable" } as const;
  const days = API_LIMITS.undoDays;
  return [
    {
      method: "delete",
      path: spec.path,
      access,
      summary: `Delete a ${spec.noun}${spec.alsoHides ? ` ${spec.alsoHides}` : ""}; it can be restored for ${days} days, then it is purged. Every other route answers 404 for it meanwhile; 409 when already deleted.`,
      handler: ({ ctx, params, user, labId }) => {
        spec.remove(ctx, params.id, user!.id);
        if (spec.audit)
          recordAudit(ctx, {
            labId,
            userId: user!.id,
            action: `${spec.audit}.deleted`,
            targetType: spec.audit,
            targetId: params.id,
          });
        return { deleted: true, undo: `/api${spec.path.replace(":id", params.id)}/restore` };
      },
    },
    {
      method: "post",
      path: `${spec.path}/restore`,
      access,
      summary: `Undo a ${spec.noun} delete (within ${days} days). 409 when it is not deleted.`,
      handler: ({ ctx, params, user, labId }) => {
        const answer = spec.restore(ctx, params.id, user!.id);
        if (spec.audit)
          recordAudit(ctx, {
            labId,
            userId: user!.id,
            action: `${spec.audit}.restored`,
            targetType: spec.audit,
            targetId: params.id,
          });
        return answer;
      },
    },
  ];
}

export interface CancelSpec {
  resource: "run" | "sweep";
  path: `/${string}/:id`;
  summary: string;
  /** Cancels, or throws the 409 that says why it cannot (the services check). */
  cancel: (ctx: AppContext, id: string) => void;
  /** The answer after cancelling (the resource's detail). */
  detail: (ctx: AppContext, id: string) => unknown;
}

export function cancelRoute(spec: CancelSpec): RouteDef {
  return {
    method: "post",
    path: `${spec.path}/cancel`,
    access: { kind: "object", resource: spec.resource, role: "editor" },
    summary: spec.summary,
    handler: ({ ctx, params, user, labId }) => {
      spec.cancel(ctx, params.id);
      recordAudit(ctx, {
        labId,
        userId: user!.id,
        action: `${spec.resource}.cancelled`,
        targetType: spec.resource,
        targetId: params.id,
      });
      return spec.detail(ctx, params.id);
    },
  };
}
