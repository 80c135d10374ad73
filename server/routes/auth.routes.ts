/**
 * Accounts and the session: sign-in/out, sign-up, password reset and change,
 * the current user, and invitation links. Signed-out routes are public; the
 * rest need a session.
 */
import type { Request, Response } from "express";
import { defineRoutes, type SessionUser } from "./route-table";
import { unauthorized, badRequest, conflict, HttpError } from "@/server/http-error";
import { authenticatorOf, destroyUserSessions, SESSION_COOKIE } from "@/server/middleware/session";
import {
  changePassword,
  confirmPasswordReset,
  confirmSignUp,
  requestSignUp,
  userCount,
  type MeUser,
  createAccount,
  findUserByEmail,
  meUser,
  normalizeEmail,
  requestPasswordReset,
  updateProfile,
} from "@/server/services/auth.service";
import {
  assertInvitedAddress,
  describeInvitation,
  invitationEmail,
  joinWithInvitation,
  labsOf,
} from "@/server/services/labs.service";
import { assertNotLimited, authLimitersOf, type RateLimiter, type SlowDown } from "@/server/services/rate-limit";
import type { AppContext } from "@/server/context";
import {
  AcceptInvitationBodySchema,
  ChangePasswordBodySchema,
  MePatchBodySchema,
  ResetConfirmBodySchema,
  ResetRequestBodySchema,
  SignInBodySchema,
  SignUpBodySchema,
  SignUpConfirmBodySchema,
  type SignUpResponse,
  type AcceptInvitationResponse,
  type InvitationOfferResponse,
  type Me,
  type Ok,
  type SignedIn,
} from "@/shared/schemas/api-accounts";

function authenticateLocal(req: Request, res: Response): Promise<SessionUser | null> {
  return new Promise((resolve, reject) => {
    authenticatorOf(req).authenticate("local", (err: unknown, user: SessionUser | false) =>
      err ? reject(err) : resolve(user || null),
    )(req, res, (e?: unknown) => (e ? reject(e) : resolve(null)));
  });
}

function logIn(req: Request, user: SessionUser): Promise<void> {
  return new Promise((resolve, reject) => req.logIn(user, (e) => (e ? reject(e) : resolve())));
}

function clientKey(req: Request): string {
  return req.ip ?? req.socket.remoteAddress ?? "unknown";
}

function me(ctx: AppContext, userId: string): Me {
  const user = meUser(ctx, userId);
  if (!user) throw unauthorized();
  return { user, labs: labsOf(ctx, userId).map(({ id, name, role }) => ({ id, name, role })) };
}

export const authRoutes = defineRoutes([
  {
    method: "post",
    path: "/auth/sign-in",
    access: { kind: "public" },
    body: SignInBodySchema,
    summary: "Sign in with e-mail and password; 200 {user}, 401 when either is wrong (without saying which).",
    handler: async ({ req, res, ctx, body }): Promise<SignedIn> => {
      const l = authLimitersOf(ctx);
      const email = normalizeEmail(body.email);
      const client = clientKey(req);
      // Locks only this client out of this account; other clients are slowed (never locked) by the backstop.
      const keys: [RateLimiter | SlowDown, string][] = [
        [l.signInPerPair, `${email}\n${client}`],
        [l.signInPerIp, client],
        [l.signInPerEmail, email],
      ];
      assertNotLimited(keys, "sign-in");
      const user = await authenticateLocal(req, res);
      if (!user) {
        for (const [lim, k] of keys) lim.hit(k);
        throw unauthorized("The e-mail address or the password is not right.");
      }
      l.signInPerPair.clear(`${email}\n${client}`);
      l.signInPerEmail.clear(email);
      await logIn(req, user);
      return { user: me(ctx, user.id).user };
    },
  },
  {
    method: "post",
    path: "/auth/sign-out",
    access: { kind: "signedIn" },
    summary: "End the session.",
    handler: async ({ req, res }) => {
      await new Promise<void>((resolve, reject) => req.logout((e) => (e ? reject(e) : resolve())));
      await new Promise<void>((resolve) => req.session.destroy(() => resolve()));
      res.clearCookie(SESSION_COOKIE, { path: "/" });
      return undefined;
    },
  },
  {
    method: "post",
    path: "/auth/sign-up",
    access: { kind: "public" },
    body: SignUpBodySchema,
    summary:
      "Sign up. With an invitation (or as the first account of an instance): create the account, sign in, 201 {user}. Otherwise 202 {ok, message} for a new and a known address alike: the mail holds a link to finish (new) or a note (known).",
    handler: async ({ req, res, ctx, body }): Promise<SignUpResponse> => {
      const l = authLimitersOf(ctx);
      assertNotLimited([[l.signUpPerIp, clientKey(req)]], "sign-up");
      l.signUpPerIp.hit(clientKey(req));
      // With an invitation the mail reached this address already; a first account has nobody to hide.
      if (body.invitationToken || userCount(ctx) === 0) {
        if (body.invitationToken) assertInvitedAddress(ctx, body.invitationToken, body.email);
        const user = await createAccount(ctx, {
          email: body.email,
          password: body.password,
          displayName: body.displayName,
          ownLab: !body.invitationToken,
        });
        if (body.invitationToken) joinWithInvitation(ctx, body.invitationToken, user.id);
        await logIn(req, user);
        res.status(201);
        return { user };
      }
      await requestSignUp(ctx, body);
      res.status(202);
      return {
        ok: true,
        message: `Check your mail: we sent a message to ${normalizeEmail(body.email)} with the next step.`,
      };
    },
  },
  {
    method: "post",
    path: "/auth/sign-up/confirm",
    access: { kind: "public" },
    body: SignUpConfirmBodySchema,
    summary:
      "Finish a sign-up with the link from its mail: create the account with a lab of its own, sign in; 201 {user}.",
    handler: async ({ req, res, ctx, body }): Promise<SignedIn> => {
      const l = authLimitersOf(ctx);
      assertNotLimited([[l.resetPerIp, clientKey(req)]], "sign-up confirmation");
      let user: MeUser;
      try {
        user = await confirmSignUp(ctx, body.token);
      } catch (e) {
        l.resetPerIp.hit(clientKey(req));
        throw e;
      }
      await logIn(req, user);
      res.status(201);
      return { user };
    },
  },
  {
    method: "post",
    path: "/auth/reset-request",
    access: { kind: "public" },
    body: ResetRequestBodySchema,
    summary: "Mail a password-reset link if the address has an account. Always 200.",
    handler: async ({ req, ctx, body }): Promise<Ok> => {
      const l = authLimitersOf(ctx);
      const email = normalizeEmail(body.email);
      const keys: [typeof l.resetPerEmail, string][] = [
        [l.resetPerEmail, email],
        [l.resetPerIp, clientKey(req)],
      ];
      assertNotLimited(keys, "password reset");
      for (const [lim, k] of keys) lim.hit(k);
      try {
        await requestPasswordReset(ctx, email);
      } catch (e) {
        console.error("[auth] reset mail failed:", (e as Error).message);
      }
      return { ok: true, message: "If an account uses this address, a reset link is on its way." };
    },
  },
  {
    method: "post",
    path: "/auth/reset-confirm",
    access: { kind: "public" },
    body: ResetConfirmBodySchema,
    summary: "Set a new password with a reset (or set-up) link; ends the user's other sessions.",
    handler: async ({ req, ctx, body }): Promise<Ok> => {
      const l = authLimitersOf(ctx);
      const keys: [typeof l.resetPerIp, string][] = [[l.resetPerIp, clientKey(req)]];
      assertNotLimited(keys, "password reset");
      let userId: string;
      try {
        userId = await confirmPasswordReset(ctx, body.token, body.password);
      } catch (e) {
        for (const [lim, k] of keys) lim.hit(k);
        throw e;
      }
      destroyUserSessions(ctx, userId);
      return { ok: true };
    },
  },
  {
    method: "post",
    path: "/auth/change-password",
    access: { kind: "signedIn" },
    body: ChangePasswordBodySchema,
    summary:
      "Change one's password (needs the current one; 429 after 5 wrong ones in 15 minutes; common passwords refused); ends the user's other sessions.",
    handler: async ({ req, ctx, user, body }): Promise<Ok> => {
      const l = authLimitersOf(ctx);
      assertNotLimited([[l.changePasswordPerUser, user!.id]], "password change");
      try {
        await changePassword(ctx, user!.id, body.currentPassword, body.newPassword);
      } catch (e) {
        if (e instanceof HttpError && e.code === "wrong_password") l.changePasswordPerUser.hit(user!.id);
        throw e;
      }
      destroyUserSessions(ctx, user!.id, req.sessionID);
      return { ok: true };
    },
  },
  {
    method: "get",
    path: "/me",
    access: { kind: "signedIn" },
    summary: "The signed-in user and their labs with roles.",
    handler: ({ ctx, user }): Me => me(ctx, user!.id),
  },
  {
    method: "patch",
    path: "/me",
    access: { kind: "signedIn" },
    body: MePatchBodySchema,
    summary: "Change one's display name or the run-notification setting.",
    handler: ({ ctx, user, body }): Me => {
      updateProfile(ctx, user!.id, body);
      return me(ctx, user!.id);
    },
  },
  {
    method: "get",
    path: "/invitations/:token",
    access: { kind: "public" },
    summary: "What an invitation link offers: lab name, role, invited address.",
    handler: ({ ctx, params }): InvitationOfferResponse => ({ invitation: describeInvitation(ctx, params.token) }),
  },
  {
    method: "post",
    path: "/invitations/accept",
    access: { kind: "public" },
    body: AcceptInvitationBodySchema,
    summary:
      "Accept an invitation: adds the signed-in user (400 email_mismatch unless it is their address), or creates the invited account (password, displayName) and signs in.",
    handler: async ({ req, ctx, user, body }): Promise<AcceptInvitationResponse> => {
      if (user) {
        assertInvitedAddress(ctx, body.token, user.email);
        const joined = joinWithInvitation(ctx, body.token, user.id);
        return { ...joined, ...me(ctx, user.id) };
      }
      const email = invitationEmail(ctx, body.token);
      if (findUserByEmail(ctx, email))
        throw conflict(
          `An account for ${email} exists: sign in first, then open the invitation again.`,
          "sign_in_required",
        );
      if (!body.password || !body.displayName) {
        const fields = [
          ...(!body.password ? [{ path: "password", message: "Required to create the account." }] : []),
          ...(!body.displayName ? [{ path: "displayName", message: "Required to create the account." }] : []),
        ];
        throw badRequest("Choose a display name and a password for the new account.", fields, "invalid");
      }
      const created = await createAccount(ctx, {
        email,
        password: body.password,
        displayName: body.displayName,
        ownLab: false,
      });
      const joined = joinWithInvitation(ctx, body.token, created.id);
      await logIn(req, created);
      return { ...joined, ...me(ctx, created.id) };
    },
  },
]);
