/**
 * One-time tokens (password reset, invitation, first-admin set-up): random
 * 256-bit values sent by mail or printed once; only their SHA-256 hash is
 * stored. Each expires and can be used once.
 */
import { createHash, randomBytes } from "node:crypto";
import { and, eq, isNull, gt } from "drizzle-orm";
import type { AppContext } from "@/server/context";
import { schema } from "@/db/client";

export type TokenPurpose = "reset" | "invite" | "setup" | "signup";
export type TokenRow = typeof schema.tokens.$inferSelect;

export const TOKEN_TTL_MS = {
  reset: 60 * 60 * 1000,
  invite: 7 * 24 * 3600 * 1000,
  setup: 24 * 3600 * 1000,
  signup: 24 * 3600 * 1000,
} as const;

export function hashToken(raw: string): string {
  return createHash("sha256").update(raw, "utf8").digest("hex");
}

export function createToken(
  ctx: Pick<AppContext, "db">,
  t: {
    purpose: TokenPurpose;
    userId?: string | null;
    labId?: string | null;
    email?: string | null;
    role?: "owner" | "editor" | "viewer" | null;
    createdBy?: string | null;
    payload?: { displayName: string; passwordHash: string } | null;
    ttlMs?: number;
  },
): { token: string; expiresAt: Date } {
  const token = randomBytes(32).toString("base64url");
  const now = new Date();
  const expiresAt = new Date(now.getTime() + (t.ttlMs ?? TOKEN_TTL_MS[t.purpose]));
  ctx.db
    .insert(schema.tokens)
    .values({
      tokenHash: hashToken(token),
      purpose: t.purpose,
      userId: t.userId ?? null,
      labId: t.labId ?? null,
      email: t.email ?? null,
      role: t.role ?? null,
      createdBy: t.createdBy ?? null,
      payload: t.payload ?? null,
      expiresAt,
      createdAt: now,
    })
    .run();
  return { token, expiresAt };
}

/** The unused, unexpired token row for this raw token and one of the purposes, or null. */
export function findValidToken(ctx: Pick<AppContext, "db">, raw: string, purposes: TokenPurpose[]): TokenRow | null {
  if (!raw || raw.length > 200) return null;
  const t = schema.tokens;
  const row = ctx.db
    .select()
    .from(t)
    .where(and(eq(t.tokenHash, hashToken(raw)), isNull(t.usedAt), gt(t.expiresAt, new Date())))
    .get();
  return row && purposes.includes(row.purpose) ? row : null;
}

/** Marks a token used; false when it was used meanwhile (so a race cannot use it twice). */
export function markTokenUsed(ctx: Pick<AppContext, "db">, tokenHash: string): boolean {
  const t = schema.tokens;
  const r = ctx.db
    .update(t)
    .set({ usedAt: new Date() })
    .where(and(eq(t.tokenHash, tokenHash), isNull(t.usedAt)))
    .run();
  return r.changes === 1;
}
