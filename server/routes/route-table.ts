/**
 * Every API route is declared here-style: method, path, access rule, optional
 * zod schemas and a handler. The access rule is applied before the handler, and
 * the authorization test walks the same table, so a route without a rule cannot
 * be added (the type requires one) and a new route is tested automatically.
 */
import type { Request, Response, NextFunction, Router } from "express";
import type { ZodType } from "zod";
import { HttpError, forbidden, notFound, unauthorized, parseOr400 } from "@/server/http-error";
import type { AppContext } from "@/server/context";
import { labRoleOf, resourceLab, type ResourceKind } from "@/server/services/access.service";

import { roleAtLeast, type LabRole, type SessionUser } from "@/shared/schemas/api-accounts";

export { roleAtLeast, type LabRole, type SessionUser };

export type Access =
  /** Anyone, signed in or not. */
  | { kind: "public" }
  /** Any signed-in user. */
  | { kind: "signedIn" }
  /** A site admin. */
  | { kind: "siteAdmin" }
  /** A member of the lab named by the :labId path parameter, with at least this role. */
  | { kind: "lab"; role: LabRole }
  /**
   * A member of the lab that owns the object named by the :id path parameter. A soft-deleted object is
   * 404 unless `deleted: "reachable"` (only the delete and restore routes: undo until purged).
   */
  | { kind: "object"; resource: ResourceKind; role: LabRole; deleted?: "reachable" };

export interface RouteCall<B = any, Q = any> {
  req: Request;
  res: Response;
  ctx: AppContext;
  user: SessionUser | null;
  /** Set for lab and object access: the lab and the caller's role in it. */
  labId: string;
  role: LabRole | null;
  body: B;
  query: Q;
  params: Record<string, string>;
}

export interface RouteDef<B = any, Q = any> {
  method: "get" | "post" | "put" | "patch" | "delete";
  /** Path under /api, Express 5 syntax, e.g. "/runs/:id". */
  path: string;
  access: Access;
  body?: ZodType<B>;
  query?: ZodType<Q>;
  /** Short description for the API docs. */
  summary: string;
  /** Returns the JSON body, or undefined when it wrote the response itself. */
  handler: (call: RouteCall<B, Q>) => unknown | Promise<unknown>;
  /** Raw body handling (e.g. multipart): middleware run after access checks. */
  before?: ((req: Request, res: Response, next: NextFunction) => void)[];
}

export function defineRoutes(defs: RouteDef[]): RouteDef[] {
  return defs;
}

/** Resolve the caller's access for a route; throws 401/403/404 as the rule says. */
export function checkAccess(
  ctx: AppContext,
  access: Access,
  req: Request,
): { user: SessionUser | null; labId: string; role: LabRole | null } {
  const user = (req.user as SessionUser | undefined) ?? null;
  if (access.kind === "public") return { user, labId: "", role: null };
  if (!user) throw unauthorized();
  if (access.kind === "signedIn") return { user, labId: "", role: null };
  if (access.kind === "siteAdmin") {
    if (!user.isSiteAdmin) throw forbidden("Only a site admin can do this.");
    return { user, labId: "", role: null };
  }
  let labId: string | null;
  let what = "That lab";
  if (access.kind === "lab") {
    labId = String(req.params.labId ?? "");
  } else {
    what = `That ${access.resource}`;
    labId = resourceLab(ctx, access.resource, String(req.params.id ?? ""), {
      includeDeleted: access.deleted === "reachable",
    });
    if (!labId) throw notFound(what);
  }
  const role = labRoleOf(ctx, user.id, labId);
  // Not a member: the object does not exist as far as the caller can tell.
  if (!role) throw notFound(what);
  if (!roleAtLeast(role, access.role))
    throw forbidden(
      `This needs the ${access.role} role in the lab; you are ${role === "viewer" ? "a viewer" : `an ${role}`}.`,
    );
  return { user, labId, role };
}

export function mountRoutes(router: Router, ctx: AppContext, defs: RouteDef[]): void {
  for (const def of defs) {
    const access = (req: Request, _res: Response, next: NextFunction) => {
      try {
        (req as any).lingerAccess = checkAccess(ctx, def.access, req);
        next();
      } catch (e) {
        next(e);
      }
    };
    router[def.method](def.path, access, ...(def.before ?? []), async (req: Request, res: Response) => {
      const a = (req as any).lingerAccess as ReturnType<typeof checkAccess>;
      const body = def.body ? parseOr400(def.body, req.body ?? {}, "body") : req.body;
      const query = def.query ? parseOr400(def.query, req.query ?? {}, "query") : req.query;
      const out = await def.handler({
        req,
        res,
        ctx,
        user: a.user,
        labId: a.labId,
        role: a.role,
        body,
        query,
        params: req.params as Record<string, string>,
      });
      if (!res.headersSent && !res.writableEnded) {
        if (out === undefined) res.status(204).end();
        else res.json(out);
      }
    });
  }
}

export { HttpError };
