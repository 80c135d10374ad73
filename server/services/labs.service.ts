/**
 * Labs, members and invitations. Roles: owner (members, roles, delete),
 * editor (create and run), viewer (read and export). A lab always keeps at
 * least one owner.
 */
import { and, asc, count, eq, gt, isNull, sql } from "drizzle-orm";
import type { AppContext } from "@/server/context";
import { inTransaction, schema } from "@/db/client";
import { newId } from "@/server/ids";
import { badRequest, conflict, forbidden, notFound } from "@/server/http-error";
import {
  roleAtLeast,
  type LabRole,
  InvitationOffer,
  InvitationSent,
  JoinedLab,
  LabDetail,
  LabSummary,
  PendingInvitation,
} from "@/shared/schemas/api-accounts";
import { recordAudit } from "./audit.service";
import { keyset, pageLimit } from "./pagination";
import type { Page, PageQuery } from "@/shared/schemas/pagination";
import { normalizeEmail } from "./auth.service";
import { createToken, findValidToken, markTokenUsed, type TokenRow } from "./tokens.service";

export type { LabSummary };

export function labsOf(ctx: AppContext, userId: string): LabSummary[] {
  const m = schema.memberships;
  const rows = ctx.db
    .select({ id: schema.labs.id, name: schema.labs.name, role: m.role })
    .from(m)
    .innerJoin(schema.labs, eq(schema.labs.id, m.labId))
    .where(eq(m.userId, userId))
    .orderBy(asc(schema.labs.name))
    .all();
  return rows.map((r) => ({ ...r, memberCount: memberCount(ctx, r.id) }));
}

const labOrder = keyset([
  { col: schema.labs.name, dir: "asc", type: "string" },
  { col: schema.labs.id, dir: "asc", type: "string" },
]);

/** One page of the caller's labs by name (ties by id); keyset on (name, id). */
export function labsPage(ctx: AppContext, userId: string, q: PageQuery = {}): Page<LabSummary> {
  const m = schema.memberships;
  const rows = ctx.db
    .select({ id: schema.labs.id, name: schema.labs.name, role: m.role })
    .from(m)
    .innerJoin(schema.labs, eq(schema.labs.id, m.labId))
    .where(and(eq(m.userId, userId), labOrder.after(q.cursor)))
    .orderBy(...labOrder.orderBy)
    .limit(pageLimit(q) + 1)
    .all();
  return labOrder.page(
    rows,
    q,
    (r) => [r.name, r.id],
    (page) => page.map((r) => ({ ...r, memberCount: memberCount(ctx, r.id) })),
  );
}

function memberCount(ctx: AppContext, labId: string): number {
  return (
    ctx.db.select({ n: count() }).from(schema.memberships).where(eq(schema.memberships.labId, labId)).get()?.n ?? 0
  );
}

function ownerCount(ctx: AppContext, labId: string): number {
  const m = schema.memberships;
  return (
    ctx.db
      .select({ n: count() })
      .from(m)
      .where(and(eq(m.labId, labId), eq(m.role, "owner")))
      .get()?.n ?? 0
  );
}

export function createLab(ctx: AppContext, userId: string, name: string): LabSummary {
  const id = newId("lab_");
  const now = new Date();
  inTransaction(ctx, () => {
    ctx.db.insert(schema.labs).values({ id, name: name.trim(), createdAt: now }).run();
    ctx.db.insert(schema.memberships).values({ labId: id, userId, role: "owner", createdAt: now }).run();
    recordAudit(ctx, {
      labId: id,
      userId,
      action: "lab.created",
      targetType: "lab",
      targetId: id,
      detail: { name: name.trim() },
    });
  });
  return { id, name: name.trim(), role: "owner", memberCount: 1 };
}

export function labDetail(ctx: AppContext, labId: string): LabDetail {
  const lab = ctx.db.select().from(schema.labs).where(eq(schema.labs.id, labId)).get();
  if (!lab) throw notFound("That lab");
  const m = schema.memberships;
  const members = ctx.db
    .select({
      userId: m.userId,
      email: schema.users.email,
      displayName: schema.users.displayName,
      role: m.role,
      joinedAt: m.createdAt,
    })
    .from(m)
    .innerJoin(schema.users, eq(schema.users.id, m.userId))
    .where(eq(m.labId, labId))
    .orderBy(asc(schema.users.displayName))
    .all();
  return {
    id: lab.id,
    name: lab.name,
    isDemo: lab.demoKey !== null,
    createdAt: lab.createdAt.toISOString(),
    members: members.map((x) => ({ ...x, joinedAt: x.joinedAt.toISOString() })),
  };
}

export function renameLab(ctx: AppContext, userId: string, labId: string, name: string): void {
  const before = ctx.db.select().from(schema.labs).where(eq(schema.labs.id, labId)).get();
  if (!before) throw notFound("That lab");
  ctx.db.update(schema.labs).set({ name: name.trim() }).where(eq(schema.labs.id, labId)).run();
  recordAudit(ctx, {
    labId,
    userId,
    action: "lab.renamed",
    targetType: "lab",
    targetId: labId,
    detail: { from: before.name, to: name.trim() },
  });
}

/** Deletes the lab and everything in it (foreign keys cascade). */
export function deleteLab(ctx: AppContext, userId: string, labId: string): void {
  const lab = ctx.db.select().from(schema.labs).where(eq(schema.labs.id, labId)).get();
  if (!lab) throw notFound("That lab");
  inTransaction(ctx, () => {
    ctx.db.delete(schema.labs).where(eq(schema.labs.id, labId)).run();
    recordAudit(ctx, {
      labId,
      userId,
      action: "lab.deleted",
      targetType: "lab",
      targetId: labId,
      detail: { name: lab.name },
    });
  });
}

// ------------------------------------------------------------ invitations

export async function inviteMember(
  ctx: AppContext,
  inviter: { id: string; displayName: string },
  labId: string,
  emailIn: string,
  role: LabRole,
): Promise<InvitationSent> {
  const lab = ctx.db.select().from(schema.labs).where(eq(schema.labs.id, labId)).get();
  if (!lab) throw notFound("That lab");
  const email = normalizeEmail(emailIn);
  const existing = ctx.db
    .select({ role: schema.memberships.role })
    .from(schema.memberships)
    .innerJoin(schema.users, eq(schema.users.id, schema.memberships.userId))
    .where(and(eq(schema.memberships.labId, labId), eq(schema.users.email, email)))
    .get();
  if (existing) throw conflict(`${email} is already a member of this lab (${existing.role}).`, "already_member");
  const { token, expiresAt } = createToken(ctx, { purpose: "invite", labId, email, role, createdBy: inviter.id });
  recordAudit(ctx, {
    labId,
    userId: inviter.id,
    action: "member.invited",
    targetType: "invitation",
    targetId: email,
    detail: { email, role },
  });
  const link = `${ctx.env.baseUrl}/invite?token=${encodeURIComponent(token)}`;
  await ctx.mailer.send({
    to: email,
    subject: `You are invited to ${lab.name} on Linger`,
    text: [
      "Hello,",
      "",
      `${inviter.displayName} invites you to the lab "${lab.name}" on Linger as ${role === "viewer" ? "a viewer" : `an ${role}`}.`,
      "",
      `To accept, open this link before ${expiresAt.toUTCString()}:`,
      "",
      link,
      "",
      "If you do not know what this is about, ignore this message.",
    ].join("\n"),
  });
  return { email, role, expiresAt: expiresAt.toISOString() };
}

const invitationOrder = keyset([
  { col: schema.tokens.createdAt, dir: "asc", type: "number" },
  // the public id (a prefix of the hash) breaks ties, so a cursor never carries a whole token hash
  { col: sql`substr(${schema.tokens.tokenHash}, 1, 20)`, dir: "asc", type: "string" },
]);

/** One page of the lab's pending invitations, oldest first (ties by id). */
export function pendingInvitations(ctx: AppContext, labId: string, q: PageQuery = {}): Page<PendingInvitation> {
  const t = schema.tokens;
  const rows = ctx.db
    .select({
      tokenHash: t.tokenHash,
      email: t.email,
      role: t.role,
      expiresAt: t.expiresAt,
      createdAt: t.createdAt,
      invitedBy: schema.users.displayName,
    })
    .from(t)
    .leftJoin(schema.users, eq(schema.users.id, t.createdBy))
    .where(
      and(
        eq(t.purpose, "invite"),
        eq(t.labId, labId),
        isNull(t.usedAt),
        gt(t.expiresAt, new Date()),
        invitationOrder.after(q.cursor),
      ),
    )
    .orderBy(...invitationOrder.orderBy)
    .limit(pageLimit(q) + 1)
    .all();
  return invitationOrder.page(
    rows,
    q,
    (r) => [r.createdAt.getTime(), invitationId(r.tokenHash)],
    (page) =>
      page.map(({ tokenHash, ...r }) => ({
        id: invitationId(tokenHash),
        ...r,
        expiresAt: r.expiresAt.toISOString(),
        createdAt: r.createdAt.toISOString(),
      })),
  );
}

/** A public id for a pending invitation: a prefix of its token's hash (reveals nothing about the token). */
function invitationId(tokenHash: string): string {
  return tokenHash.slice(0, 20);
}

/** Withdraws a pending invitation (its link stops working). */
export function revokeInvitation(ctx: AppContext, actorId: string, labId: string, id: string): void {
  const t = schema.tokens;
  const found = /^[0-9a-f]{20}$/.test(id)
    ? ctx.db
        .select()
        .from(t)
        .where(and(eq(t.purpose, "invite"), eq(t.labId, labId), isNull(t.usedAt)))
        .all()
        .find((row) => invitationId(row.tokenHash) === id)
    : undefined;
  if (!found) throw notFound("That invitation");
  ctx.db.delete(t).where(eq(t.tokenHash, found.tokenHash)).run();
  recordAudit(ctx, {
    labId,
    userId: actorId,
    action: "member.invitation_revoked",
    targetType: "invitation",
    targetId: found.email,
    detail: { email: found.email, role: found.role },
  });
}

function validInvitation(ctx: AppContext, token: string): TokenRow & { labId: string; role: LabRole; email: string } {
  const row = findValidToken(ctx, token, ["invite"]);
  if (!row || !row.labId || !row.role || !row.email)
    throw notFound("That invitation (it may have expired or been used)");
  return row as TokenRow & { labId: string; role: LabRole; email: string };
}

/** What a public invitation page shows. */
export function describeInvitation(ctx: AppContext, token: string): InvitationOffer {
  const row = validInvitation(ctx, token);
  const lab = ctx.db.select().from(schema.labs).where(eq(schema.labs.id, row.labId)).get();
  if (!lab) throw notFound("That invitation");
  const hasAccount = !!ctx.db
    .select({ id: schema.users.id })
    .from(schema.users)
    .where(eq(schema.users.email, row.email))
    .get();
  return { labName: lab.name, role: row.role, email: row.email, expiresAt: row.expiresAt.toISOString(), hasAccount };
}

/** Adds the user to the invitation's lab (a higher existing role is kept) and uses up the token. */
export function joinWithInvitation(ctx: AppContext, token: string, userId: string): JoinedLab {
  const row = validInvitation(ctx, token);
  let role: LabRole = row.role;
  inTransaction(ctx, () => {
    if (!markTokenUsed(ctx, row.tokenHash))
      throw badRequest("This invitation has already been used.", undefined, "invalid_token");
    const m = schema.memberships;
    const current = ctx.db
      .select()
      .from(m)
      .where(and(eq(m.labId, row.labId), eq(m.userId, userId)))
      .get();
    if (!current) {
      ctx.db.insert(m).values({ labId: row.labId, userId, role: row.role, createdAt: new Date() }).run();
    } else if (roleAtLeast(current.role, row.role)) {
      role = current.role;
    } else {
      ctx.db
        .update(m)
        .set({ role: row.role })
        .where(and(eq(m.labId, row.labId), eq(m.userId, userId)))
        .run();
    }
    recordAudit(ctx, {
      labId: row.labId,
      userId,
      action: "member.joined",
      targetType: "user",
      targetId: userId,
      detail: { invitedEmail: row.email, role, invitedBy: row.createdBy },
    });
  });
  return { labId: row.labId, role };
}

export function invitationEmail(ctx: AppContext, token: string): string {
  return validInvitation(ctx, token).email;
}

/** An invitation may only be used by its invited address (sign-up and accept-while-signed-in alike): 400 otherwise. */
export function assertInvitedAddress(ctx: AppContext, token: string, email: string): void {
  const invited = invitationEmail(ctx, token);
  if (invited !== normalizeEmail(email)) {
    throw badRequest(
      `This invitation is for ${invited}.`,
      [{ path: "email", message: "Use the invited address." }],
      "email_mismatch",
    );
  }
}

// ------------------------------------------------------------ members

function membership(ctx: AppContext, labId: string, userId: string) {
  const m = schema.memberships;
  return (
    ctx.db
      .select()
      .from(m)
      .where(and(eq(m.labId, labId), eq(m.userId, userId)))
      .get() ?? null
  );
}

export function changeRole(ctx: AppContext, actorId: string, labId: string, userId: string, role: LabRole): void {
  const current = membership(ctx, labId, userId);
  if (!current) throw notFound("That member");
  if (current.role === role) return;
  inTransaction(ctx, () => {
    if (current.role === "owner" && ownerCount(ctx, labId) <= 1) {
      throw conflict("A lab needs at least one owner. Make someone else an owner first.", "last_owner");
    }
    const m = schema.memberships;
    ctx.db
      .update(m)
      .set({ role })
      .where(and(eq(m.labId, labId), eq(m.userId, userId)))
      .run();
    recordAudit(ctx, {
      labId,
      userId: actorId,
      action: "member.role_changed",
      targetType: "user",
      targetId: userId,
      detail: { from: current.role, to: role },
    });
  });
}

/** An owner removes a member, or a member leaves (actor = target). */
export function removeMember(
  ctx: AppContext,
  actor: { id: string; role: LabRole },
  labId: string,
  userId: string,
): void {
  const self = actor.id === userId;
  if (!self && actor.role !== "owner") throw forbidden("Only an owner can remove other members.");
  const current = membership(ctx, labId, userId);
  if (!current) throw notFound("That member");
  inTransaction(ctx, () => {
    if (current.role === "owner" && ownerCount(ctx, labId) <= 1) {
      throw conflict(
        "A lab needs at least one owner. Make someone else an owner first, or delete the lab.",
        "last_owner",
      );
    }
    const m = schema.memberships;
    ctx.db
      .delete(m)
      .where(and(eq(m.labId, labId), eq(m.userId, userId)))
      .run();
    recordAudit(ctx, {
      labId,
      userId: actor.id,
      action: self ? "member.left" : "member.removed",
      targetType: "user",
      targetId: userId,
      detail: { role: current.role },
    });
  });
}
