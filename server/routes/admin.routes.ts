/** Site-admin routes: compute status, the fake SMTP outbox, database backup, the user list. */
import { mkdirSync, statSync } from "node:fs";
import { dirname, join, resolve } from "node:path";
import { and, count, eq } from "drizzle-orm";
import { defineRoutes } from "./route-table";
import { restrictFile, schema } from "@/db/client";
import { recordAudit } from "@/server/services/audit.service";
import { keyset, pageLimit } from "@/server/services/pagination";
import { PAGE_SIZE, PAGE_SIZE_MAX, PageQuerySchema } from "@/shared/schemas/pagination";
import type { AppContext } from "@/server/context";
import { computeStatus } from "./health.routes";
import type { ComputeStatus } from "@/shared/schemas/api-health";
import { OutboxQuerySchema, type AdminUsers, type BackupResult, type Outbox } from "@/shared/schemas/api-accounts";

const outboxOrder = keyset([{ col: schema.outbox.id, dir: "desc", type: "number" }]);
const userOrder = keyset([
  { col: schema.users.email, dir: "asc", type: "string" },
  { col: schema.users.id, dir: "asc", type: "string" },
]);

/** Folder for backups: `backups/` beside the database file (data/backups by default). */
export function backupDir(ctx: AppContext): string {
  const dbFile = ctx.sqlite.name;
  const base = dbFile && dbFile !== ":memory:" ? dirname(resolve(dbFile)) : resolve("data");
  return join(base, "backups");
}

/** A consistent copy of the live database through SQLite's online backup API. */
export async function backupDatabase(ctx: AppContext): Promise<{ file: string; path: string; bytes: number }> {
  const dir = backupDir(ctx);
  mkdirSync(dir, { recursive: true, mode: 0o700 });
  const stamp = new Date().toISOString().replace(/[:.]/g, "-");
  const file = `linger-${stamp}.db`;
  const path = join(dir, file);
  restrictFile(path); // owner-only before the first byte is written (the copy holds password hashes)
  await ctx.sqlite.backup(path);
  return { file, path, bytes: statSync(path).size };
}

export const adminRoutes = defineRoutes([
  {
    method: "get",
    path: "/admin/compute",
    access: { kind: "siteAdmin" },
    summary:
      "Where chunks run: embedded pool or Redis workers (each with host, threads, last heartbeat), queue depth, chunks per second.",
    handler: ({ ctx }): ComputeStatus => computeStatus(ctx),
  },
  {
    method: "get",
    path: "/admin/outbox",
    access: { kind: "siteAdmin" },
    query: OutboxQuerySchema,
    summary: `One page of the mail kept by the local fake SMTP server, newest first: {items, nextCursor} (?cursor=, ?limit= up to ${PAGE_SIZE_MAX}, default ${PAGE_SIZE}); ?to= one address (empty when a real SMTP server is configured).`,
    handler: ({ ctx, query }): Outbox => {
      const o = schema.outbox;
      const rows = ctx.db
        .select()
        .from(o)
        .where(and(query.to ? eq(o.to, query.to.trim().toLowerCase()) : undefined, outboxOrder.after(query.cursor)))
        .orderBy(...outboxOrder.orderBy)
        .limit(pageLimit(query) + 1)
        .all();
      const page = outboxOrder.page(
        rows,
        query,
        (r) => [r.id],
        (p) => p.map((r) => ({ ...r, receivedAt: r.receivedAt.toISOString() })),
      );
      return { mailer: ctx.mailer.kind ?? "smtp", ...page };
    },
  },
  {
    method: "post",
    path: "/admin/backup",
    access: { kind: "siteAdmin" },
    summary: "Write a consistent backup of the database (SQLite online backup) to data/backups; returns the file name.",
    handler: async ({ ctx, res, user }): Promise<BackupResult> => {
      const b = await backupDatabase(ctx);
      recordAudit(ctx, {
        labId: null,
        userId: user!.id,
        action: "admin.backup",
        targetType: "file",
        targetId: b.file,
        detail: { bytes: b.bytes },
      });
      res.status(201);
      return { file: b.file, bytes: b.bytes };
    },
  },
  {
    method: "get",
    path: "/admin/users",
    access: { kind: "siteAdmin" },
    query: PageQuerySchema,
    summary: `One page of the accounts on the instance by e-mail address, with their number of labs: {items, nextCursor} (?cursor=, ?limit= up to ${PAGE_SIZE_MAX}, default ${PAGE_SIZE}).`,
    handler: ({ ctx, query }): AdminUsers => {
      const u = schema.users;
      const m = schema.memberships;
      const rows = ctx.db
        .select({
          id: u.id,
          email: u.email,
          displayName: u.displayName,
          isSiteAdmin: u.isSiteAdmin,
          createdAt: u.createdAt,
          labCount: count(m.labId),
        })
        .from(u)
        .leftJoin(m, eq(m.userId, u.id))
        .where(userOrder.after(query.cursor))
        .groupBy(u.id)
        .orderBy(...userOrder.orderBy)
        .limit(pageLimit(query) + 1)
        .all();
      return userOrder.page(
        rows,
        query,
        (r) => [r.email, r.id],
        (p) => p.map((r) => ({ ...r, createdAt: r.createdAt.toISOString() })),
      );
    },
  },
]);
