/** Who may see what: lab membership and the lab that owns an object. */
import { and, eq, isNull, sql } from "drizzle-orm";
import type { AppContext } from "@/server/context";
import { schema } from "@/db/client";
import type { LabRole } from "@/shared/schemas/api-accounts";
import { preparedOnce } from "./prepared";

export type ResourceKind = "run" | "circuit" | "program" | "sweep" | "traceSet" | "match" | "lab" | "regimeMap";

export function labRoleOf(ctx: AppContext, userId: string, labId: string): LabRole | null {
  if (!labId) return null;
  const row = preparedOnce(ctx, "labRoleOf", () =>
    ctx.db
      .select({ role: schema.memberships.role })
      .from(schema.memberships)
      .where(
        and(
          eq(schema.memberships.userId, sql.placeholder("userId")),
          eq(schema.memberships.labId, sql.placeholder("labId")),
        ),
      )
      .prepare(),
  ).get({ userId, labId });
  return (row?.role as LabRole | undefined) ?? null;
}

/**
 * The lab that owns an object, or null when there is no such object. A soft-deleted object (run, sweep,
 * trace set, regime map) counts as absent, so every route answers 404 for it, unless `includeDeleted` is set: only
 * the delete and restore routes set it (undo until purged; a second delete answers 409).
 */
export function resourceLab(
  ctx: AppContext,
  kind: ResourceKind,
  id: string,
  opts: { includeDeleted?: boolean } = {},
): string | null {
  if (!id) return null;
  const s = schema;
  const live = !opts.includeDeleted;
  let row: { labId: string } | undefined;
  switch (kind) {
    case "run":
      // Every run route asks this: prepared once (live and with-deleted variants).
      row = preparedOnce(ctx, live ? "resourceLab.run" : "resourceLab.run+deleted", () =>
        ctx.db
          .select({ labId: s.runs.labId })
          .from(s.runs)
          .where(and(eq(s.runs.id, sql.placeholder("id")), live ? isNull(s.runs.deletedAt) : undefined))
          .prepare(),
      ).get({ id });
      break;
    case "circuit":
      row = ctx.db.select({ labId: s.circuits.labId }).from(s.circuits).where(eq(s.circuits.id, id)).get();
      break;
    case "program":
      row = ctx.db
        .select({ labId: s.inputPrograms.labId })
        .from(s.inputPrograms)
        .where(eq(s.inputPrograms.id, id))
        .get();
      break;
    case "sweep":
      row = ctx.db
        .select({ labId: s.sweeps.labId })
        .from(s.sweeps)
        .where(and(eq(s.sweeps.id, id), live ? isNull(s.sweeps.deletedAt) : undefined))
        .get();
      break;
    case "traceSet":
      row = ctx.db
        .select({ labId: s.traceSets.labId })
        .from(s.traceSets)
        .where(and(eq(s.traceSets.id, id), live ? isNull(s.traceSets.deletedAt) : undefined))
        .get();
      break;
    case "match":
      row = ctx.db.select({ labId: s.matches.labId }).from(s.matches).where(eq(s.matches.id, id)).get();
      break;
    case "regimeMap":
      row = ctx.db
        .select({ labId: s.regimeMaps.labId })
        .from(s.regimeMaps)
        .where(and(eq(s.regimeMaps.id, id), live ? isNull(s.regimeMaps.deletedAt) : undefined))
        .get();
      break;
    case "lab":
      row = ctx.db.select({ labId: s.labs.id }).from(s.labs).where(eq(s.labs.id, id)).get();
      break;
  }
  return row?.labId ?? null;
}
