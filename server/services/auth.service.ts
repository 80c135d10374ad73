/**
 * Accounts: credentials, sign-up, password reset and change. Sessions and
 * passport live in server/middleware/session.ts; routes in auth.routes.ts.
 */
import { queueMail } from "@/server/services/mail.service";
import { count, eq } from "drizzle-orm";
import type { AppContext } from "@/server/context";
import { inTransaction, schema } from "@/db/client";
import { newId } from "@/server/ids";
import { badRequest, conflict } from "@/server/http-error";
import type { SessionUser, MeUser } from "@/shared/schemas/api-accounts";
import { hashPassword, verifyPassword } from "./password";
import { assertPasswordAllowed } from "./password-policy";
import { createToken, findValidToken, markTokenUsed } from "./tokens.service";

/** What the account functions need (the admin CLI has no mailer or queue). */
export type AccountsCtx = Pick<AppContext, "db" | "sqlite" | "env">;

export { PASSWORD_MIN_LENGTH, PASSWORD_MAX_LENGTH } from "@/shared/schemas/auth";

/** The signed-in user as the API shows it (contract: shared/schemas/api-accounts.ts). */
export type { MeUser };

export function normalizeEmail(email: string): string {
  return email.trim().toLowerCase();
}

let dummyHash: Promise<string> | null = null;

/** The user for these credentials, or null. Takes about as long whether or not the e-mail exists. */
export async function checkCredentials(ctx: AccountsCtx, email: string, password: string): Promise<SessionUser | null> {
  const u = ctx.db
    .select()
    .from(schema.users)
    .where(eq(schema.users.email, normalizeEmail(email)))
    .get();
  if (!u || !u.passwordHash) {
    dummyHash ??= hashPassword("not-a-real-password");
    await verifyPassword(password, await dummyHash);
    return null;
  }
  if (!(await verifyPassword(password, u.passwordHash))) return null;
  return { id: u.id, email: u.email, displayName: u.displayName, isSiteAdmin: u.isSiteAdmin };
}

export function findUserByEmail(ctx: AccountsCtx, email: string) {
  return (
    ctx.db
      .select()
      .from(schema.users)
      .where(eq(schema.users.email, normalizeEmail(email)))
      .get() ?? null
  );
}

export function meUser(ctx: AccountsCtx, userId: string): MeUser | null {
  const u = ctx.db.select().from(schema.users).where(eq(schema.users.id, userId)).get();
  if (!u) return null;
  return {
    id: u.id,
    email: u.email,
    displayName: u.displayName,
    isSiteAdmin: u.isSiteAdmin,
    notifyOnRunEnd: u.notifyOnRunEnd,
  };
}

export function userCount(ctx: AccountsCtx): number {
  return ctx.db.select({ n: count() }).from(schema.users).get()?.n ?? 0;
}

/**
 * Creates an account. The first account of an instance without any users
 * (no demo data) becomes the site admin. Without an invitation the new user
 * gets a lab of their own, so there is somewhere to work.
 */
export async function createAccount(
  ctx: AccountsCtx,
  input: { email: string; password: string | null; displayName: string; ownLab: boolean; passwordHash?: string },
): Promise<MeUser> {
  const email = normalizeEmail(input.email);
  if (input.password !== null) assertPasswordAllowed(input.password, "password");
  const passwordHash = input.passwordHash ?? (input.password === null ? null : await hashPassword(input.password));
  const now = new Date();
  const id = newId("usr_");
  inTransaction(ctx, () => {
    if (findUserByEmail(ctx, email))
      throw conflict(
        "An account with this e-mail address already exists. Sign in, or reset the password.",
        "email_taken",
      );
    const first = userCount(ctx) === 0;
    ctx.db
      .insert(schema.users)
      .values({
        id,
        email,
        displayName: input.displayName.trim(),
        passwordHash,
        isSiteAdmin: first,
        notifyOnRunEnd: true,
        createdAt: now,
      })
      .run();
    if (input.ownLab) {
      const labId = newId("lab_");
      ctx.db
        .insert(schema.labs)
        .values({ id: labId, name: `${input.displayName.trim()}'s lab`, createdAt: now })
        .run();
      ctx.db.insert(schema.memberships).values({ labId, userId: id, role: "owner", createdAt: now }).run();
    }
  });
  return meUser(ctx, id)!;
}

export async function setPassword(ctx: AccountsCtx, userId: string, password: string): Promise<void> {
  ctx.db
    .update(schema.users)
    .set({ passwordHash: await hashPassword(password) })
    .where(eq(schema.users.id, userId))
    .run();
}

/**
 * Sign-up without an invitation, answered the same whether or not the address
 * has an account (no account enumeration): a new address gets a link that
 * creates the account (valid 24 hours; the password is kept only as its hash);
 * a known one gets a note that someone tried to sign up with it. Both hash the
 * password and queue one mail, so both take about as long.
 */
export async function requestSignUp(
  ctx: AppContext,
  input: { email: string; password: string; displayName: string },
): Promise<void> {
  const email = normalizeEmail(input.email);
  assertPasswordAllowed(input.password, "password");
  const passwordHash = await hashPassword(input.password);
  const u = findUserByEmail(ctx, email);
  if (u) {
    queueMail(ctx.mailer, {
      to: u.email,
      subject: "Someone tried to create a Linger account with your address",
      text: [
        `Hello ${u.displayName},`,
        "",
        "Someone asked to create a Linger account with this e-mail address, which already has one. Nothing was changed.",
        "",
        `If it was you, sign in at ${ctx.env.baseUrl}/sign-in, or choose a new password at ${ctx.env.baseUrl}/reset.`,
        "",
        "If it was not you, ignore this message.",
      ].join("\n"),
    });
    return;
  }
  const displayName = input.displayName.trim();
  const { token } = createToken(ctx, { purpose: "signup", email, payload: { displayName, passwordHash } });
  queueMail(ctx.mailer, {
    to: email,
    subject: "Finish creating your Linger account",
    text: [
      `Hello ${displayName},`,
      "",
      "To finish creating your Linger account, open this link within 24 hours:",
      "",
      `${ctx.env.baseUrl}/sign-up?token=${encodeURIComponent(token)}`,
      "",
      "If you did not ask for an account, ignore this message; none is created.",
    ].join("\n"),
  });
}

/** Creates the account of a sign-up link (with a lab of its own) and returns it. */
export async function confirmSignUp(ctx: AccountsCtx, token: string): Promise<MeUser> {
  const row = findValidToken(ctx, token, ["signup"]);
  if (!row || !row.email || !row.payload)
    throw badRequest("This sign-up link is not valid or has expired. Sign up again.", undefined, "invalid_token");
  if (findUserByEmail(ctx, row.email))
    throw conflict("The account for this address exists already: sign in.", "email_taken");
  if (!markTokenUsed(ctx, row.tokenHash))
    throw badRequest("This sign-up link has already been used.", undefined, "invalid_token");
  return createAccount(ctx, {
    email: row.email,
    password: null,
    passwordHash: row.payload.passwordHash,
    displayName: row.payload.displayName,
    ownLab: true,
  });
}

/** Sends a reset link when the address has an account; silent otherwise (the caller always answers 200). */
export async function requestPasswordReset(ctx: AppContext, email: string): Promise<boolean> {
  const u = findUserByEmail(ctx, email);
  if (!u) return false;
  const { token } = createToken(ctx, { purpose: "reset", userId: u.id, email: u.email });
  const link = `${ctx.env.baseUrl}/reset?token=${encodeURIComponent(token)}`;
  queueMail(ctx.mailer, {
    to: u.email,
    subject: "Reset your Linger password",
    text: [
      `Hello ${u.displayName},`,
      "",
      "Someone asked to reset the password of your Linger account. To choose a new password, open this link within one hour:",
      "",
      link,
      "",
      "If it was not you, ignore this message; your password stays as it is.",
    ].join("\n"),
  });
  return true;
}

/** Sets a new password with a reset or set-up token; returns the user id. */
export async function confirmPasswordReset(ctx: AccountsCtx, token: string, password: string): Promise<string> {
  // Before the token is used up, so the same link can be tried with another password.
  assertPasswordAllowed(password, "password");
  const row = findValidToken(ctx, token, ["reset", "setup"]);
  if (!row || !row.userId)
    throw badRequest("This reset link is not valid or has expired. Ask for a new one.", undefined, "invalid_token");
  if (!markTokenUsed(ctx, row.tokenHash))
    throw badRequest("This reset link has already been used.", undefined, "invalid_token");
  await setPassword(ctx, row.userId, password);
  return row.userId;
}

export async function changePassword(
  ctx: AccountsCtx,
  userId: string,
  currentPassword: string,
  newPassword: string,
): Promise<void> {
  const u = ctx.db.select().from(schema.users).where(eq(schema.users.id, userId)).get();
  if (!u || !(await verifyPassword(currentPassword, u.passwordHash))) {
    throw badRequest(
      "The current password is not right.",
      [{ path: "currentPassword", message: "Not right." }],
      "wrong_password",
    );
  }
  assertPasswordAllowed(newPassword, "newPassword");
  await setPassword(ctx, userId, newPassword);
}

export function updateProfile(
  ctx: AccountsCtx,
  userId: string,
  patch: { displayName?: string; notifyOnRunEnd?: boolean },
): MeUser {
  const set: Partial<typeof schema.users.$inferInsert> = {};
  if (patch.displayName !== undefined) set.displayName = patch.displayName.trim();
  if (patch.notifyOnRunEnd !== undefined) set.notifyOnRunEnd = patch.notifyOnRunEnd;
  if (Object.keys(set).length) ctx.db.update(schema.users).set(set).where(eq(schema.users.id, userId)).run();
  return meUser(ctx, userId)!;
}

/**
 * Creates the user if needed, makes them site admin, and returns a one-time
 * set-password link (for `npm run admin -- create <email>`).
 */
export async function createSiteAdmin(
  ctx: AccountsCtx,
  email: string,
): Promise<{ userId: string; created: boolean; link: string }> {
  let u = findUserByEmail(ctx, email);
  let created = false;
  if (!u) {
    const local = normalizeEmail(email).split("@")[0] || "Admin";
    await createAccount(ctx, { email, password: null, displayName: local, ownLab: false });
    u = findUserByEmail(ctx, email)!;
    created = true;
  }
  ctx.db.update(schema.users).set({ isSiteAdmin: true }).where(eq(schema.users.id, u.id)).run();
  const { token } = createToken(ctx, { purpose: "setup", userId: u.id, email: u.email });
  return { userId: u.id, created, link: `${ctx.env.baseUrl}/reset?token=${encodeURIComponent(token)}` };
}
