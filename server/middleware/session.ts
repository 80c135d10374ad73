/**
 * Sessions and sign-in: express-session with a store on the `sessions` table,
 * passport + passport-local (e-mail and password). `req.user` is a SessionUser
 * (server/routes/route-table.ts).
 *
 * Cookie: HttpOnly, SameSite=Lax, Secure when LINGER_SECURE_COOKIES is on.
 * Secret: LINGER_SESSION_SECRET, or a random secret generated once and kept in
 * the app_settings table.
 */
import type { Request, Router } from "express";
import session, { type SessionData } from "express-session";
import passport from "passport";
import { Strategy as LocalStrategy } from "passport-local";
import { randomBytes } from "node:crypto";
import { eq, sql } from "drizzle-orm";
import type Database from "better-sqlite3";
import type { AppContext } from "@/server/context";
import { schema } from "@/db/client";
import type { SessionUser } from "@/server/routes/route-table";
import { checkCredentials } from "@/server/services/auth.service";
import { preparedOnce } from "@/server/services/prepared";

export const SESSION_COOKIE = "linger.sid";
const SESSION_MAX_AGE_MS = 14 * 24 * 3600 * 1000;
const PRUNE_EVERY_MS = 10 * 60 * 1000;
/**
 * express-session touches the store on every request that does not change the session; the expiry
 * is written again only when it moves by more than this, so a read is not a database write.
 */
export const TOUCH_EVERY_MS = 5 * 60 * 1000;

/**
 * express-session store over the `sessions` table. Expired rows are pruned
 * lazily on writes (at most every 10 minutes), so there is no timer to keep a
 * process alive.
 */
export class SqliteSessionStore extends session.Store {
  private lastPrune = 0;
  /** The expiry last written per session id (touches within TOUCH_EVERY_MS of it are skipped). */
  private readonly written = new Map<string, number>();
  private readonly stmts;

  constructor(
    private readonly sqlite: Database.Database,
    private readonly now: () => number = Date.now,
  ) {
    super();
    this.stmts = {
      get: sqlite.prepare<[string], { data: string; expires_at: number }>(
        "select data, expires_at from sessions where sid = ?",
      ),
      set: sqlite.prepare(
        "insert into sessions (sid, data, expires_at) values (?, ?, ?) on conflict(sid) do update set data = excluded.data, expires_at = excluded.expires_at",
      ),
      destroy: sqlite.prepare("delete from sessions where sid = ?"),
      touch: sqlite.prepare("update sessions set expires_at = ? where sid = ?"),
      prune: sqlite.prepare("delete from sessions where expires_at < ?"),
      clear: sqlite.prepare("delete from sessions"),
      length: sqlite.prepare<[number], { n: number }>("select count(*) as n from sessions where expires_at >= ?"),
    };
  }

  private expiry(sess: SessionData): number {
    const e = sess.cookie?.expires;
    if (e) return new Date(e).getTime();
    return this.now() + (sess.cookie?.maxAge ?? SESSION_MAX_AGE_MS);
  }

  private maybePrune() {
    const t = this.now();
    if (t - this.lastPrune < PRUNE_EVERY_MS) return;
    this.lastPrune = t;
    this.stmts.prune.run(t);
  }

  override get(sid: string, cb: (err: any, session?: SessionData | null) => void): void {
    try {
      const row = this.stmts.get.get(sid);
      if (!row) return cb(null, null);
      if (row.expires_at < this.now()) {
        this.stmts.destroy.run(sid);
        return cb(null, null);
      }
      cb(null, JSON.parse(row.data) as SessionData);
    } catch (e) {
      cb(e);
    }
  }

  override set(sid: string, sess: SessionData, cb?: (err?: any) => void): void {
    try {
      const expires = this.expiry(sess);
      this.stmts.set.run(sid, JSON.stringify(sess), expires);
      this.written.set(sid, expires);
      this.maybePrune();
      cb?.();
    } catch (e) {
      cb?.(e);
    }
  }

  override destroy(sid: string, cb?: (err?: any) => void): void {
    try {
      this.stmts.destroy.run(sid);
      this.written.delete(sid);
      cb?.();
    } catch (e) {
      cb?.(e);
    }
  }

  override touch(sid: string, sess: SessionData, cb?: (err?: any) => void): void {
    try {
      const expires = this.expiry(sess);
      const last = this.written.get(sid);
      if (last !== undefined && Math.abs(expires - last) < TOUCH_EVERY_MS) return cb?.();
      this.stmts.touch.run(expires, sid);
      if (this.written.size > 100_000) this.written.clear();
      this.written.set(sid, expires);
      cb?.();
    } catch (e) {
      cb?.(e);
    }
  }

  override clear(cb?: (err?: any) => void): void {
    try {
      this.stmts.clear.run();
      cb?.();
    } catch (e) {
      cb?.(e);
    }
  }

  override length(cb: (err: any, length?: number) => void): void {
    try {
      cb(null, this.stmts.length.get(this.now())?.n ?? 0);
    } catch (e) {
      cb(e);
    }
  }
}

/** Ends every session of a user (after a password change or reset), except `keepSid`. */
export function destroyUserSessions(ctx: AppContext, userId: string, keepSid?: string): number {
  const r = ctx.sqlite
    .prepare("delete from sessions where json_extract(data, '$.passport.user') = ? and sid <> ?")
    .run(userId, keepSid ?? "");
  return r.changes;
}

/** LINGER_SESSION_SECRET, or a random secret generated on first use and kept in app_settings. */
export function sessionSecret(ctx: AppContext): string {
  if (ctx.env.LINGER_SESSION_SECRET) return ctx.env.LINGER_SESSION_SECRET;
  const key = "session_secret";
  ctx.db
    .insert(schema.appSettings)
    .values({ key, value: randomBytes(32).toString("base64url") })
    .onConflictDoNothing()
    .run();
  return ctx.db.select().from(schema.appSettings).where(eq(schema.appSettings.key, key)).get()!.value;
}

export function loadSessionUser(ctx: AppContext, id: string): SessionUser | null {
  // Read on every signed-in request: prepared once per database, and read afresh each time (no cache), so
  // a deleted account, a renamed user or a changed site-admin flag takes effect on the next request.
  const u = preparedOnce(ctx, "loadSessionUser", () =>
    ctx.db
      .select({
        id: schema.users.id,
        email: schema.users.email,
        displayName: schema.users.displayName,
        isSiteAdmin: schema.users.isSiteAdmin,
      })
      .from(schema.users)
      .where(eq(schema.users.id, sql.placeholder("id")))
      .prepare(),
  ).get({ id });
  return u ?? null;
}

/** The passport instance of this app (each createApp has its own). */
export function authenticatorOf(req: Request): passport.Authenticator {
  const a = (req as any).lingerAuthenticator as passport.Authenticator | undefined;
  if (!a) throw new Error("installAuth was not applied to this router");
  return a;
}

export function installAuth(api: Router, ctx: AppContext): void {
  const auth = new passport.Authenticator();
  auth.use(
    new LocalStrategy({ usernameField: "email", passwordField: "password", session: true }, (email, password, done) => {
      checkCredentials(ctx, email, password).then(
        (user) => done(null, user ?? false),
        (err) => done(err),
      );
    }),
  );
  auth.serializeUser((user, done) => done(null, (user as SessionUser).id));
  auth.deserializeUser((id: string, done) => {
    try {
      // A deleted account simply ends the session.
      done(null, loadSessionUser(ctx, String(id)) ?? false);
    } catch (e) {
      done(e);
    }
  });

  // GET /api/health is public and reads no user: it skips the session read and the user load (about a
  // third of its CPU time per request, docs/benchmarks.md).
  const noSession = (req: Request) => req.method === "GET" && req.path === "/health";
  const skipFor =
    (mw: (req: Request, res: any, next: (e?: unknown) => void) => void) =>
    (req: Request, res: any, next: (e?: unknown) => void) => (noSession(req) ? next() : mw(req, res, next));
  const sessionMw = session({
    name: SESSION_COOKIE,
    secret: sessionSecret(ctx),
    store: new SqliteSessionStore(ctx.sqlite),
    resave: false,
    saveUninitialized: false,
    rolling: false,
    cookie: {
      httpOnly: true,
      sameSite: "lax",
      secure: ctx.env.LINGER_SECURE_COOKIES,
      maxAge: SESSION_MAX_AGE_MS,
      path: "/",
    },
  });
  api.use(skipFor(sessionMw as any));
  api.use(auth.initialize());
  api.use(skipFor(auth.session() as any));
  api.use((req, _res, next) => {
    (req as any).lingerAuthenticator = auth;
    next();
  });
}
