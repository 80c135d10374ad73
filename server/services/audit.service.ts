/**
 * The audit trail: who launched, cancelled, deleted, invited, changed roles.
 * One row per event in `audit_events`; lab owners read their lab's trail.
 */
import { and, asc, desc, eq, lt } from "drizzle-orm";
import type { AppContext } from "@/server/context";
import { schema } from "@/db/client";
import { keyset, pageLimit } from "./pagination";
import type { Page, PageQuery } from "@/shared/schemas/pagination";

/** Actions in use; others may be added (the column is free text). */
export type AuditAction =
  | "run.launched"
  | "run.cancelled"
  | "run.deleted"
  | "run.restored"
  | "run.resumed"
  | "sweep.launched"
  | "sweep.cancelled"
  | "sweep.deleted"
  | "lab.created"
  | "lab.renamed"
  | "lab.deleted"
  | "member.invited"
  | "member.invitation_revoked"
  | "member.joined"
  | "member.role_changed"
  | "member.removed"
  | "member.left"
  | "admin.backup"
  | (string & {});

export interface AuditInput {
  labId: string | null;
  userId: string | null;
  action: AuditAction;
  targetType?: string | null;
  targetId?: string | null;
  detail?: Record<string, unknown> | null;
}

export interface AuditEvent {
  id: number;
  labId: string | null;
  userId: string | null;
  userName: string | null;
  action: string;
  targetType: string | null;
  targetId: string | null;
  detail: unknown;
  at: string;
}

/** Records one event (synchronous; call it inside the same transaction as the change when there is one). */
export function recordAudit(ctx: Pick<AppContext, "db">, e: AuditInput): void {
  ctx.db
    .insert(schema.auditEvents)
    .values({
      labId: e.labId ?? null,
      userId: e.userId ?? null,
      action: e.action,
      targetType: e.targetType ?? null,
      targetId: e.targetId ?? null,
      detail: e.detail ?? null,
      at: new Date(),
    })
    .run();
}

/** Audit events with the acting user's display name, ready for a where clause. */
function eventsWithNames(ctx: Pick<AppContext, "db">) {
  const a = schema.auditEvents;
  return ctx.db
    .select({
      id: a.id,
      labId: a.labId,
      userId: a.userId,
      userName: schema.users.displayName,
      action: a.action,
      targetType: a.targetType,
      targetId: a.targetId,
      detail: a.detail,
      at: a.at,
    })
    .from(a)
    .leftJoin(schema.users, eq(schema.users.id, a.userId));
}

/** The events about one object (e.g. a run: launched, resumed after a crash, cancelled), oldest first. */
export function objectHistory(ctx: Pick<AppContext, "db">, targetType: string, targetId: string): AuditEvent[] {
  const a = schema.auditEvents;
  const rows = eventsWithNames(ctx)
    .where(and(eq(a.targetType, targetType), eq(a.targetId, targetId)))
    .orderBy(asc(a.id))
    .limit(200)
    .all();
  return rows.map((r) => ({ ...r, at: r.at.toISOString() }));
}

const auditOrder = keyset([{ col: schema.auditEvents.id, dir: "desc", type: "number" }]);

/** One page of a lab's events, newest first; keyset on the event id. */
export function auditPage(ctx: Pick<AppContext, "db">, labId: string, q: PageQuery = {}): Page<AuditEvent> {
  const a = schema.auditEvents;
  const rows = eventsWithNames(ctx)
    .where(and(eq(a.labId, labId), auditOrder.after(q.cursor)))
    .orderBy(...auditOrder.orderBy)
    .limit(pageLimit(q) + 1)
    .all();
  return auditOrder.page(
    rows,
    q,
    (r) => [r.id],
    (page) => page.map((r) => ({ ...r, at: r.at.toISOString() })),
  );
}

/** A lab's events, newest first; `beforeId` pages back. */
export function listAudit(
  ctx: Pick<AppContext, "db">,
  labId: string,
  opts: { limit?: number; beforeId?: number } = {},
): AuditEvent[] {
  const a = schema.auditEvents;
  const rows = eventsWithNames(ctx)
    .where(opts.beforeId ? and(eq(a.labId, labId), lt(a.id, opts.beforeId)) : eq(a.labId, labId))
    .orderBy(desc(a.id))
    .limit(Math.min(Math.max(opts.limit ?? 100, 1), 500))
    .all();
  return rows.map((r) => ({ ...r, at: r.at.toISOString() }));
}
