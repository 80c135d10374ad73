/**
 * Accounts through the HTTP API: sign-in and sessions, cookies, CSRF, rate
 * limits, sign-up (first account = site admin), password reset through the
 * fake SMTP outbox, change password, profile settings, the admin set-up link.
 * Every successful answer is checked against its shared schema
 * (shared/schemas/api-accounts.ts), the one the web app parses it with.
 */
import { describe, test, before, after } from "node:test";
import assert from "node:assert/strict";
import request from "supertest";
import { eq } from "drizzle-orm";
import {
  makeTestContext,
  signIn,
  tokenFromMail,
  DEMO_PASSWORD,
  TEST_BASE_URL,
  type TestApp,
} from "@/tests/helpers/test-app";
import { schema } from "@/db/client";
import { defaultAuthLimiters, resetAuthLimiters, setAuthLimiters, SlowDown } from "@/server/services/rate-limit";
import { createSiteAdmin } from "@/server/services/auth.service";
import { isCommonPassword } from "@/server/services/password-policy";
import { assertContract } from "@/tests/helpers/contract";
import { AdminUsersSchema, MeSchema, OkSchema, SignedInSchema } from "@/shared/schemas/api-accounts";

const OWNER = "owner@example.org";
const VIEWER = "viewer@example.org";

describe("sign-in, session and sign-out", () => {
  let t: TestApp;
  before(async () => (t = await makeTestContext()));
  after(async () => t.close());

  test("the demo owner signs in with the demo password: 200 with the user, and /api/me works with the cookie", async () => {
    const agent = request.agent(t.app);
    const r = await agent.post("/api/auth/sign-in").send({ email: OWNER, password: DEMO_PASSWORD }).expect(200);
    assertContract(SignedInSchema, r.body, "POST /api/auth/sign-in");
    assert.equal(r.body.user.email, OWNER);
    assert.equal(r.body.user.isSiteAdmin, false);
    assert.equal(r.body.user.passwordHash, undefined, "no hash on the wire");
    const me = await agent.get("/api/me").expect(200);
    assertContract(MeSchema, me.body, "GET /api/me");
    assert.equal(me.body.user.email, OWNER);
    assert.deepEqual(
      me.body.labs.map((l: any) => [l.name, l.role]),
      [["Tank Sensor Group", "owner"]],
    );
  });

  test("the e-mail is matched case-insensitively", async () => {
    await request(t.app)
      .post("/api/auth/sign-in")
      .send({ email: "  Owner@Example.ORG ", password: DEMO_PASSWORD })
      .expect(200);
  });

  test("a wrong password and an unknown e-mail answer the same 401", async () => {
    const wrong = await request(t.app)
      .post("/api/auth/sign-in")
      .send({ email: OWNER, password: "not-the-password" })
      .expect(401);
    const unknown = await request(t.app)
      .post("/api/auth/sign-in")
      .send({ email: "nobody@example.org", password: "whatever-123" })
      .expect(401);
    assert.equal(wrong.body.error.message, unknown.body.error.message);
    assert.equal(wrong.body.error.code, "unauthorized");
    assert.doesNotMatch(wrong.body.error.message, /unknown|no account|not found/i);
  });

  test("a missing password is a 400 naming the field", async () => {
    const r = await request(t.app).post("/api/auth/sign-in").send({ email: OWNER }).expect(400);
    assert.ok(r.body.error.fields.some((f: any) => f.path === "password"));
  });

  test("GET /api/me is 401 signed out", async () => {
    await request(t.app).get("/api/me").expect(401);
  });

  test("sign-out ends the session (the old cookie no longer works) and clears the cookie", async () => {
    const agent = await signIn(t.app, OWNER);
    const cookie = (await request(t.app).post("/api/auth/sign-in").send({ email: OWNER, password: DEMO_PASSWORD }))
      .headers["set-cookie"];
    const out = await agent.post("/api/auth/sign-out").expect(204);
    assert.match(String(out.headers["set-cookie"]), /linger\.sid=;/);
    await agent.get("/api/me").expect(401);
    // A second, independent session of the same user is unaffected.
    await request(t.app).get("/api/me").set("Cookie", cookie).expect(200);
  });

  test("sessions are stored in the sessions table", async () => {
    await signIn(t.app, VIEWER);
    const rows = t.ctx.sqlite.prepare("select data from sessions").all() as { data: string }[];
    assert.ok(rows.some((r) => JSON.parse(r.data).passport?.user));
  });

  test("the session cookie is HttpOnly and SameSite=Lax, without Secure over plain HTTP", async () => {
    const r = await request(t.app)
      .post("/api/auth/sign-in")
      .send({ email: OWNER, password: DEMO_PASSWORD })
      .expect(200);
    const c = String(r.headers["set-cookie"]);
    assert.match(c, /linger\.sid=/);
    assert.match(c, /HttpOnly/);
    assert.match(c, /SameSite=Lax/);
    assert.doesNotMatch(c, /Secure/);
  });

  test("a cross-site Origin or Sec-Fetch-Site gets 403; same-origin passes without a token", async () => {
    const evil = await request(t.app)
      .post("/api/auth/sign-in")
      .set("Origin", "https://evil.example")
      .send({ email: OWNER, password: DEMO_PASSWORD });
    assert.equal(evil.status, 403);
    assert.equal(evil.body.error.code, "cross_site");
    await request(t.app)
      .post("/api/auth/sign-in")
      .set("Sec-Fetch-Site", "cross-site")
      .send({ email: OWNER, password: DEMO_PASSWORD })
      .expect(403);
    const agent = request.agent(t.app);
    const ok = await agent
      .post("/api/auth/sign-in")
      .set("Sec-Fetch-Site", "same-origin")
      .send({ email: OWNER, password: DEMO_PASSWORD });
    assert.equal(ok.status, 200);
    await agent.post("/api/auth/sign-out").set("Host", "linger.test").set("Origin", "http://linger.test").expect(204);
  });
});

describe("secure cookies", () => {
  test("with LINGER_SECURE_COOKIES the cookie is Secure (behind an HTTPS proxy on loopback)", async () => {
    const t = await makeTestContext({ env: { LINGER_SECURE_COOKIES: "1" } });
    try {
      const r = await request(t.app)
        .post("/api/auth/sign-in")
        .set("X-Forwarded-Proto", "https")
        .send({ email: OWNER, password: DEMO_PASSWORD })
        .expect(200);
      assert.match(String(r.headers["set-cookie"]), /; Secure/);
    } finally {
      await t.close();
    }
  });
});

describe("rate limiting", () => {
  let t: TestApp;
  before(async () => (t = await makeTestContext()));
  after(async () => t.close());

  test("10 failed sign-ins lock that client out of that address only; the window lifts it", async () => {
    let now = 1_000_000;
    setAuthLimiters(
      t.ctx,
      defaultAuthLimiters(() => now),
    );
    const from = (ip: string) => ({ "X-Forwarded-For": ip });
    for (let i = 0; i < 10; i++)
      await request(t.app)
        .post("/api/auth/sign-in")
        .set(from("198.51.100.7"))
        .send({ email: VIEWER, password: `wrong-${i}-password` })
        .expect(401);
    const blocked = await request(t.app)
      .post("/api/auth/sign-in")
      .set(from("198.51.100.7"))
      .send({ email: VIEWER, password: DEMO_PASSWORD })
      .expect(429);
    assert.match(blocked.body.error.message, /Too many sign-in attempts.*15 minutes/);
    assert.equal(blocked.headers["retry-after"], String(15 * 60), "Retry-After in seconds");
    // Before the fix the address was locked for everyone: the owner, on another client, still signs in.
    await request(t.app)
      .post("/api/auth/sign-in")
      .set(from("203.0.113.20"))
      .send({ email: VIEWER, password: DEMO_PASSWORD })
      .expect(200);
    // Another address from the same client is not blocked (the per-client limit is higher).
    await request(t.app)
      .post("/api/auth/sign-in")
      .set(from("198.51.100.7"))
      .send({ email: OWNER, password: DEMO_PASSWORD })
      .expect(200);
    now += 15 * 60 * 1000;
    await request(t.app)
      .post("/api/auth/sign-in")
      .set(from("198.51.100.7"))
      .send({ email: VIEWER, password: DEMO_PASSWORD })
      .expect(200);
  });

  test("guesses from many clients at one address are slowed (429 with a short Retry-After), never locked", async () => {
    let now = 5_000_000;
    setAuthLimiters(
      t.ctx,
      defaultAuthLimiters(() => now),
    );
    // 20 failures from 20 clients (one each): the free allowance of the backstop.
    for (let i = 0; i < 20; i++)
      await request(t.app)
        .post("/api/auth/sign-in")
        .set({ "X-Forwarded-For": `198.51.100.${i + 1}` })
        .send({ email: OWNER, password: `guess-${i}-password` })
        .expect(401);
    // Now each attempt must wait 1 s after the previous failure, doubling per failure (cap 30 s).
    now += 1000;
    await request(t.app)
      .post("/api/auth/sign-in")
      .set({ "X-Forwarded-For": "198.51.100.99" })
      .send({ email: OWNER, password: "guess-x-password" })
      .expect(401);
    const slowed = await request(t.app)
      .post("/api/auth/sign-in")
      .set({ "X-Forwarded-For": "203.0.113.5" })
      .send({ email: OWNER, password: DEMO_PASSWORD })
      .expect(429);
    assert.equal(slowed.headers["retry-after"], "2");
    assert.match(slowed.body.error.message, /Try again in 2 seconds/);
    // After the wait the owner, from a fresh client, gets in: slowed, not locked.
    now += 2000;
    await request(t.app)
      .post("/api/auth/sign-in")
      .set({ "X-Forwarded-For": "203.0.113.5" })
      .send({ email: OWNER, password: DEMO_PASSWORD })
      .expect(200);
  });

  test("the backstop's spacing doubles per failure and stops at its cap", () => {
    const now = 0;
    const s = new SlowDown(3, 60_000, 1000, 8000, () => now);
    const spacings: number[] = [];
    for (let i = 0; i < 8; i++) {
      spacings.push(s.spacingMs("a"));
      s.hit("a");
    }
    assert.deepEqual(spacings, [0, 0, 0, 1000, 2000, 4000, 8000, 8000]);
    assert.equal(s.spacingMs("b"), 0, "keys are independent");
  });

  test("password change: 5 wrong current passwords in 15 minutes give 429, even for the right one", async () => {
    let now = 9_000_000;
    setAuthLimiters(
      t.ctx,
      defaultAuthLimiters(() => now),
    );
    const agent = await signIn(t.app, VIEWER);
    for (let i = 0; i < 5; i++)
      await agent
        .post("/api/auth/change-password")
        .send({ currentPassword: `wrong-${i}-password`, newPassword: "viewer-new-password" })
        .expect(400);
    const limited = await agent
      .post("/api/auth/change-password")
      .send({ currentPassword: DEMO_PASSWORD, newPassword: "viewer-new-password" })
      .expect(429);
    assert.match(limited.body.error.message, /Too many password change attempts/);
    assert.ok(Number(limited.headers["retry-after"]) > 0);
    now += 15 * 60 * 1000;
    await agent
      .post("/api/auth/change-password")
      .send({ currentPassword: DEMO_PASSWORD, newPassword: DEMO_PASSWORD })
      .expect(200);
  });

  test("reset requests are limited per address; resetting the limiters lifts it", async () => {
    resetAuthLimiters(t.ctx);
    for (let i = 0; i < 5; i++)
      await request(t.app).post("/api/auth/reset-request").send({ email: "nobody@example.org" }).expect(200);
    await request(t.app).post("/api/auth/reset-request").send({ email: "nobody@example.org" }).expect(429);
    resetAuthLimiters(t.ctx);
    await request(t.app).post("/api/auth/reset-request").send({ email: "nobody@example.org" }).expect(200);
  });
});

describe("common passwords are refused (NIST SP 800-63B section 5.1.1.2: check new passwords against a list of commonly used ones)", () => {
  let t: TestApp;
  before(async () => (t = await makeTestContext()));
  after(async () => t.close());

  test("the shipped list has the well-known ones and not the test passwords", () => {
    // "12345678" and "password1" are near the top of every published leaked-password ranking (from memory).
    assert.equal(isCommonPassword("12345678"), true);
    assert.equal(isCommonPassword("  PassWord1 "), true, "case and surrounding spaces ignored");
    assert.equal(isCommonPassword(DEMO_PASSWORD), false);
    assert.equal(isCommonPassword("editor-new-password"), false);
  });

  test("at sign-up: 400 naming the password field, no account created", async () => {
    const r = await request(t.app)
      .post("/api/auth/sign-up")
      .send({ email: "common@example.org", password: "12345678", displayName: "Common" })
      .expect(400);
    assert.equal(r.body.error.code, "common_password");
    assert.deepEqual(
      r.body.error.fields.map((f: any) => f.path),
      ["password"],
    );
    assert.equal(
      t.ctx.db.select().from(schema.users).where(eq(schema.users.email, "common@example.org")).get(),
      undefined,
    );
  });

  test("at password change: 400 naming newPassword, the old password still works", async () => {
    const agent = await signIn(t.app, VIEWER);
    const r = await agent
      .post("/api/auth/change-password")
      .send({ currentPassword: DEMO_PASSWORD, newPassword: "password1" })
      .expect(400);
    assert.equal(r.body.error.code, "common_password");
    assert.equal(r.body.error.fields[0].path, "newPassword");
    await signIn(t.app, VIEWER);
  });

  test("at reset: 400 and the link stays usable for a better password", async () => {
    await request(t.app).post("/api/auth/reset-request").send({ email: OWNER }).expect(200);
    await t.settleMail();
    const token = tokenFromMail(t.outbox(OWNER).at(-1)!.text, "/reset");
    const r = await request(t.app).post("/api/auth/reset-confirm").send({ token, password: "qwertyuiop" }).expect(400);
    assert.equal(r.body.error.code, "common_password");
    await request(t.app).post("/api/auth/reset-confirm").send({ token, password: "owner-fresh-password" }).expect(200);
    await signIn(t.app, OWNER, "owner-fresh-password");
  });
});

describe("sign-up", () => {
  test("a new and a known address get the same 202 'check your mail'; the new one's link creates the account", async () => {
    const t = await makeTestContext();
    try {
      const fresh = await request(t.app)
        .post("/api/auth/sign-up")
        .send({ email: "Ada@Example.org", password: "a-long-password", displayName: "Ada" })
        .expect(202);
      // Before the fix a known address answered 409 email_taken, which told anyone the account exists.
      const known = await request(t.app)
        .post("/api/auth/sign-up")
        .send({ email: VIEWER, password: "a-long-password", displayName: "Ada" })
        .expect(202);
      assertContract(OkSchema, fresh.body, "POST /api/auth/sign-up");
      const shape = (b: any) => ({ ...b, message: b.message.replace(/\S+@\S+/, "ADDRESS") });
      assert.deepEqual(shape(known.body), shape(fresh.body), "same answer apart from the echoed address");
      assert.equal(fresh.headers["set-cookie"], undefined, "not signed in before the mail is answered");
      await t.settleMail();
      // The known address is told that someone tried, and nothing changed.
      const note = t.outbox(VIEWER).at(-1)!;
      assert.match(note.subject, /Someone tried to create a Linger account/);
      assert.doesNotMatch(note.text, /token=/);
      await signIn(t.app, VIEWER);
      // No account yet for the new address.
      assert.equal(
        t.ctx.db.select().from(schema.users).where(eq(schema.users.email, "ada@example.org")).get(),
        undefined,
      );
      const token = tokenFromMail(t.outbox("ada@example.org").at(-1)!.text, "/sign-up");
      const agent = request.agent(t.app);
      const r = await agent.post("/api/auth/sign-up/confirm").send({ token }).expect(201);
      assertContract(SignedInSchema, r.body, "POST /api/auth/sign-up/confirm");
      assert.equal(r.body.user.email, "ada@example.org");
      assert.equal(r.body.user.isSiteAdmin, false);
      const me = await agent.get("/api/me").expect(200);
      assert.deepEqual(
        me.body.labs.map((l: any) => [l.name, l.role]),
        [["Ada's lab", "owner"]],
      );
      await signIn(t.app, "ada@example.org", "a-long-password");
      // the link works once
      await request(t.app).post("/api/auth/sign-up/confirm").send({ token }).expect(400);
      await request(t.app).post("/api/auth/sign-up/confirm").send({ token: "made-up" }).expect(400);
      const short = await request(t.app)
        .post("/api/auth/sign-up")
        .send({ email: "bo@example.org", password: "short", displayName: "Bo" })
        .expect(400);
      assert.ok(short.body.error.fields.some((f: any) => f.path === "password"));
      await request(t.app)
        .post("/api/auth/sign-up")
        .send({ email: "not-an-address", password: "a-long-password", displayName: "X" })
        .expect(400);
    } finally {
      await t.close();
    }
  });

  test("a sign-up link for an address that got an account meanwhile answers 409, creating nothing", async () => {
    const t = await makeTestContext();
    try {
      for (const displayName of ["First try", "Second try"])
        await request(t.app)
          .post("/api/auth/sign-up")
          .send({ email: "twice@example.org", password: "a-long-password", displayName })
          .expect(202);
      await t.settleMail();
      const [first, second] = t.outbox("twice@example.org").map((m) => tokenFromMail(m.text, "/sign-up"));
      await request(t.app).post("/api/auth/sign-up/confirm").send({ token: second }).expect(201);
      const r = await request(t.app).post("/api/auth/sign-up/confirm").send({ token: first }).expect(409);
      assert.equal(r.body.error.code, "email_taken");
      const u = t.ctx.db.select().from(schema.users).where(eq(schema.users.email, "twice@example.org")).all();
      assert.deepEqual(
        u.map((x) => x.displayName),
        ["Second try"],
      );
    } finally {
      await t.close();
    }
  });

  test("on an instance without demo data, the first account becomes site admin and the second does not", async () => {
    const t = await makeTestContext({ seed: "none" });
    try {
      const first = await request(t.app)
        .post("/api/auth/sign-up")
        .send({ email: "first@example.org", password: "first-password", displayName: "First" })
        .expect(201);
      assert.equal(first.body.user.isSiteAdmin, true);
      // Once an account exists, sign-up goes through the mail like on any instance.
      await request(t.app)
        .post("/api/auth/sign-up")
        .send({ email: "second@example.org", password: "second-password", displayName: "Second" })
        .expect(202);
      await t.settleMail();
      const token = tokenFromMail(t.outbox("second@example.org").at(-1)!.text, "/sign-up");
      const second = await request(t.app).post("/api/auth/sign-up/confirm").send({ token }).expect(201);
      assert.equal(second.body.user.isSiteAdmin, false);
    } finally {
      await t.close();
    }
  });
});

test("reset-request answers a known address without waiting for the mail (same answer as an unknown one)", async () => {
  let release!: () => void;
  const held = new Promise<void>((r) => (release = r));
  const sent: string[] = [];
  const t = await makeTestContext({
    mailer: { kind: "null", send: async (m) => (sent.push(m.to), held), close: async () => {} },
  });
  try {
    // Before the fix the known address waited for the mail, so this request would not answer until release().
    const known = await request(t.app).post("/api/auth/reset-request").send({ email: VIEWER }).expect(200);
    assert.deepEqual(sent, [VIEWER], "the mail was handed to the mailer");
    const unknown = await request(t.app).post("/api/auth/reset-request").send({ email: "nobody@example.org" });
    assert.equal(unknown.status, 200);
    assert.deepEqual(unknown.body, known.body);
  } finally {
    release();
    await t.close();
  }
});

describe("password reset through the outbox, and change password", () => {
  let t: TestApp;
  before(async () => (t = await makeTestContext()));
  after(async () => t.close());

  test("reset-request mails a link with LINGER_BASE_URL; the token sets a new password once and ends old sessions", async () => {
    const oldSession = await signIn(t.app, VIEWER);
    const r = await request(t.app).post("/api/auth/reset-request").send({ email: "Viewer@example.org" }).expect(200);
    assertContract(OkSchema, r.body, "POST /api/auth/reset-request");
    assert.equal(r.body.ok, true);
    await t.settleMail();
    const mail = t.outbox(VIEWER);
    assert.equal(mail.length, 1);
    assert.equal(mail[0].subject, "Reset your Linger password");
    assert.ok(mail[0].text.includes(`${TEST_BASE_URL}/reset?token=`));
    const token = tokenFromMail(mail[0].text, "/reset");
    // Only the hash is stored.
    assert.equal(
      t.ctx.db
        .select()
        .from(schema.tokens)
        .all()
        .some((row) => row.tokenHash === token),
      false,
    );

    await request(t.app).post("/api/auth/reset-confirm").send({ token, password: "short" }).expect(400);
    const confirmed = await request(t.app)
      .post("/api/auth/reset-confirm")
      .send({ token, password: "brand-new-password" })
      .expect(200);
    assertContract(OkSchema, confirmed.body, "POST /api/auth/reset-confirm");
    await request(t.app).post("/api/auth/sign-in").send({ email: VIEWER, password: DEMO_PASSWORD }).expect(401);
    await signIn(t.app, VIEWER, "brand-new-password");
    await oldSession.get("/api/me").expect(401);
    // One-time.
    const again = await request(t.app)
      .post("/api/auth/reset-confirm")
      .send({ token, password: "another-new-password" })
      .expect(400);
    assert.equal(again.body.error.code, "invalid_token");
  });

  test("an unknown address answers the same 200 and sends nothing", async () => {
    const before = t.outbox().length;
    const r = await request(t.app).post("/api/auth/reset-request").send({ email: "nobody@example.org" }).expect(200);
    assert.equal(r.body.ok, true);
    await t.settleMail();
    assert.equal(t.outbox().length, before);
  });

  test("an expired reset link is refused", async () => {
    await request(t.app).post("/api/auth/reset-request").send({ email: OWNER }).expect(200);
    await t.settleMail();
    const token = tokenFromMail(t.outbox(OWNER).at(-1)!.text, "/reset");
    t.ctx.db
      .update(schema.tokens)
      .set({ expiresAt: new Date(Date.now() - 1000) })
      .where(eq(schema.tokens.purpose, "reset"))
      .run();
    await request(t.app).post("/api/auth/reset-confirm").send({ token, password: "brand-new-password" }).expect(400);
    await signIn(t.app, OWNER);
  });

  test("change password needs the current one, keeps this session and ends the others", async () => {
    const other = await signIn(t.app, "editor@example.org");
    const agent = await signIn(t.app, "editor@example.org");
    await agent
      .post("/api/auth/change-password")
      .send({ currentPassword: "wrong-password", newPassword: "editor-new-password" })
      .expect(400);
    const changed = await agent
      .post("/api/auth/change-password")
      .send({ currentPassword: DEMO_PASSWORD, newPassword: "editor-new-password" })
      .expect(200);
    assertContract(OkSchema, changed.body, "POST /api/auth/change-password");
    await agent.get("/api/me").expect(200);
    await other.get("/api/me").expect(401);
    await signIn(t.app, "editor@example.org", "editor-new-password");
    await request(t.app)
      .post("/api/auth/change-password")
      .send({ currentPassword: "x", newPassword: "yyyyyyyyyy" })
      .expect(401);
  });

  test("PATCH /api/me changes the display name and the run-notification setting", async () => {
    const agent = await signIn(t.app, OWNER);
    const r = await agent.patch("/api/me").send({ displayName: "  Tank owner ", notifyOnRunEnd: false }).expect(200);
    assertContract(MeSchema, r.body, "PATCH /api/me");
    assert.equal(r.body.user.displayName, "Tank owner");
    assert.equal(r.body.user.notifyOnRunEnd, false);
    await agent.patch("/api/me").send({ notifyOnRunEnd: "no" }).expect(400);
  });
});

describe("first site admin by set-up link", () => {
  test("createSiteAdmin (npm run admin -- create) creates an admin whose one-time link sets the password", async () => {
    const t = await makeTestContext({ seed: "none" });
    try {
      const r = await createSiteAdmin(t.ctx, "Boss@example.org");
      assert.equal(r.created, true);
      assert.ok(r.link.startsWith(`${TEST_BASE_URL}/reset?token=`));
      const token = tokenFromMail(r.link, "/reset");
      // no password yet: cannot sign in
      await request(t.app)
        .post("/api/auth/sign-in")
        .send({ email: "boss@example.org", password: "anything-at-all" })
        .expect(401);
      await request(t.app).post("/api/auth/reset-confirm").send({ token, password: "boss-password" }).expect(200);
      const agent = await signIn(t.app, "boss@example.org", "boss-password");
      const me = await agent.get("/api/me").expect(200);
      assert.equal(me.body.user.isSiteAdmin, true);
      const users = await agent.get("/api/admin/users").expect(200);
      assertContract(AdminUsersSchema, users.body, "GET /api/admin/users");
      // promoting an existing account
      const again = await createSiteAdmin(t.ctx, "boss@example.org");
      assert.equal(again.created, false);
    } finally {
      await t.close();
    }
  });
});
