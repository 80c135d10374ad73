/**
 * Labs and roles through the HTTP API: creating and renaming labs, members
 * and roles (a lab always keeps an owner), invitations by e-mail (through the
 * fake SMTP outbox), the audit trail, and the site-admin routes (users, outbox,
 * online backup). Every successful answer is checked against its shared schema
 * (shared/schemas/api-accounts.ts), the one the web app parses it with.
 */
import { describe, test, before, after } from "node:test";
import assert from "node:assert/strict";
import request from "supertest";
import Database from "better-sqlite3";
import { existsSync } from "node:fs";
import { join } from "node:path";
import { eq } from "drizzle-orm";
import { makeTestContext, signIn, tokenFromMail, TEST_BASE_URL, type TestApp } from "@/tests/helpers/test-app";
import { schema } from "@/db/client";
import { recordAudit, listAudit } from "@/server/services/audit.service";
import { backupDir } from "@/server/routes/admin.routes";
import { assertContract } from "@/tests/helpers/contract";
import {
  AcceptInvitationResponseSchema,
  AdminUsersSchema,
  AuditPageSchema,
  BackupResultSchema,
  InvitationListSchema,
  InvitationOfferResponseSchema,
  InviteResponseSchema,
  LabCreatedSchema,
  LabListSchema,
  LabMembersResponseSchema,
  LabResponseSchema,
  MeSchema,
  OutboxSchema,
} from "@/shared/schemas/api-accounts";

const OWNER = "owner@example.org";
const EDITOR = "editor@example.org";
const VIEWER = "viewer@example.org";

function userId(t: TestApp, email: string): string {
  return t.ctx.db.select().from(schema.users).where(eq(schema.users.email, email)).get()!.id;
}

describe("labs", () => {
  let t: TestApp;
  before(async () => (t = await makeTestContext()));
  after(async () => t.close());

  test("a signed-in user creates a lab and becomes its owner; others cannot see it (404)", async () => {
    const editor = await signIn(t.app, EDITOR);
    const r = await editor.post("/api/labs").send({ name: "  Batch reactor  " }).expect(201);
    assertContract(LabCreatedSchema, r.body, "POST /api/labs");
    assert.equal(r.body.lab.name, "Batch reactor");
    assert.equal(r.body.lab.role, "owner");
    const list = await editor.get("/api/labs").expect(200);
    assertContract(LabListSchema, list.body, "GET /api/labs");
    assert.deepEqual(list.body.items.map((l: any) => [l.name, l.role]).sort(), [
      ["Batch reactor", "owner"],
      ["Tank Sensor Group", "editor"],
    ]);
    const detail = await editor.get(`/api/labs/${r.body.lab.id}`).expect(200);
    assertContract(LabResponseSchema, detail.body, "GET /api/labs/:labId");
    assert.deepEqual(
      detail.body.lab.members.map((m: any) => [m.email, m.role]),
      [[EDITOR, "owner"]],
    );
    const owner = await signIn(t.app, OWNER);
    await owner.get(`/api/labs/${r.body.lab.id}`).expect(404);
    await owner.patch(`/api/labs/${r.body.lab.id}`).send({ name: "Mine now" }).expect(404);
    await editor.post("/api/labs").send({ name: "" }).expect(400);
  });

  test("only an owner renames or deletes a lab; viewers read it", async () => {
    const lab = t.demoLab!.id;
    const viewer = await signIn(t.app, VIEWER);
    const editor = await signIn(t.app, EDITOR);
    const owner = await signIn(t.app, OWNER);
    const seen = await viewer.get(`/api/labs/${lab}`).expect(200);
    assert.equal(seen.body.role, "viewer");
    assert.equal(seen.body.lab.members.length, 3);
    await viewer.patch(`/api/labs/${lab}`).send({ name: "X" }).expect(403);
    await editor.patch(`/api/labs/${lab}`).send({ name: "X" }).expect(403);
    await editor.delete(`/api/labs/${lab}`).expect(403);
    const renamed = await owner.patch(`/api/labs/${lab}`).send({ name: "Tank Sensor Team" }).expect(200);
    assertContract(LabResponseSchema, renamed.body, "PATCH /api/labs/:labId");
    assert.equal(renamed.body.lab.name, "Tank Sensor Team");

    const scratch = (await owner.post("/api/labs").send({ name: "Scratch" }).expect(201)).body.lab.id;
    await owner.delete(`/api/labs/${scratch}`).expect(204);
    await owner.get(`/api/labs/${scratch}`).expect(404);
    assert.equal(
      t.ctx.db.select().from(schema.memberships).where(eq(schema.memberships.labId, scratch)).all().length,
      0,
    );
  });
});

describe("members and roles", () => {
  let t: TestApp;
  before(async () => (t = await makeTestContext()));
  after(async () => t.close());

  test("the owner changes roles; the last owner can neither be demoted nor leave", async () => {
    const lab = t.demoLab!.id;
    const owner = await signIn(t.app, OWNER);
    const viewerId = userId(t, VIEWER);
    const ownerId = userId(t, OWNER);
    const r = await owner.patch(`/api/labs/${lab}/members/${viewerId}`).send({ role: "editor" }).expect(200);
    assertContract(LabMembersResponseSchema, r.body, "PATCH /api/labs/:labId/members/:userId");
    assert.equal(r.body.lab.members.find((m: any) => m.userId === viewerId).role, "editor");
    const last = await owner.patch(`/api/labs/${lab}/members/${ownerId}`).send({ role: "viewer" }).expect(409);
    assert.equal(last.body.error.code, "last_owner");
    await owner.delete(`/api/labs/${lab}/members/${ownerId}`).expect(409);
    await owner.patch(`/api/labs/${lab}/members/usr_nobody`).send({ role: "viewer" }).expect(404);
    await owner.patch(`/api/labs/${lab}/members/${viewerId}`).send({ role: "admin" }).expect(400);
    // With a second owner, the first may step down.
    await owner.patch(`/api/labs/${lab}/members/${viewerId}`).send({ role: "owner" }).expect(200);
    await owner.patch(`/api/labs/${lab}/members/${ownerId}`).send({ role: "editor" }).expect(200);
    const me = await owner.get("/api/me").expect(200);
    assert.equal(me.body.labs[0].role, "editor");
  });

  test("a member leaves on their own; a non-owner cannot remove someone else", async () => {
    const lab = t.demoLab!.id;
    const editor = await signIn(t.app, EDITOR);
    const viewerId = userId(t, VIEWER);
    // (the viewer was made an owner above; the editor is still an editor)
    await editor.delete(`/api/labs/${lab}/members/${viewerId}`).expect(403);
    await editor.delete(`/api/labs/${lab}/members/${userId(t, EDITOR)}`).expect(204);
    await editor.get(`/api/labs/${lab}`).expect(404);
  });

  test("the audit trail records role changes and departures; only owners read it", async () => {
    const lab = t.demoLab!.id;
    const newOwner = await signIn(t.app, VIEWER);
    const r = await newOwner.get(`/api/labs/${lab}/audit`).expect(200);
    assertContract(AuditPageSchema, r.body, "GET /api/labs/:labId/audit");
    const actions = r.body.items.map((e: any) => e.action);
    assert.deepEqual(actions, ["member.left", "member.role_changed", "member.role_changed", "member.role_changed"]);
    const change = r.body.items.find(
      (e: any) => e.action === "member.role_changed" && e.detail.to === "editor" && e.targetId === userId(t, OWNER),
    );
    assert.equal(change.userName, "Demo owner");
    assert.deepEqual(change.detail, { from: "owner", to: "editor" });
    const formerOwner = await signIn(t.app, OWNER); // now an editor
    await formerOwner.get(`/api/labs/${lab}/audit`).expect(403);
    const first = await newOwner.get(`/api/labs/${lab}/audit?limit=1`).expect(200);
    assert.equal(first.body.items[0].id, r.body.items[0].id);
    const cursor = encodeURIComponent(first.body.nextCursor);
    const page = await newOwner.get(`/api/labs/${lab}/audit?limit=1&cursor=${cursor}`).expect(200);
    assert.equal(page.body.items.length, 1);
    assert.equal(page.body.items[0].id, r.body.items[1].id);
  });

  test("recordAudit (used by the run queue) writes an event the lab's owners see", async () => {
    const lab = t.demoLab!.id;
    recordAudit(t.ctx, {
      labId: lab,
      userId: userId(t, OWNER),
      action: "run.launched",
      targetType: "run",
      targetId: "run_x",
      detail: { replicates: 100 },
    });
    const [e] = listAudit(t.ctx, lab, { limit: 1 });
    assert.equal(e.action, "run.launched");
    assert.equal(e.targetId, "run_x");
    assert.deepEqual(e.detail, { replicates: 100 });
  });
});

describe("invitations", () => {
  let t: TestApp;
  before(async () => (t = await makeTestContext()));
  after(async () => t.close());

  async function invite(email: string, role: string) {
    const owner = await signIn(t.app, OWNER);
    const r = await owner.post(`/api/labs/${t.demoLab!.id}/invitations`).send({ email, role }).expect(201);
    assertContract(InviteResponseSchema, r.body, "POST /api/labs/:labId/invitations");
    const mail = t.outbox(email.toLowerCase()).at(-1)!;
    return { owner, response: r.body, mail, token: tokenFromMail(mail.text, "/invite") };
  }

  test("the owner invites by e-mail; a new person accepts with a password and joins with that role", async () => {
    const { owner, response, mail, token } = await invite("Newcomer@example.org", "editor");
    assert.equal(response.invitation.email, "newcomer@example.org");
    const days = (Date.parse(response.invitation.expiresAt) - Date.now()) / 86_400_000;
    assert.ok(days > 6.9 && days <= 7, `expires in ${days} days`);
    assert.equal(mail.subject, "You are invited to Tank Sensor Group on Linger");
    assert.ok(mail.text.includes(`${TEST_BASE_URL}/invite?token=`));
    assert.match(mail.text, /as an editor/);

    const pending = await owner.get(`/api/labs/${t.demoLab!.id}/invitations`).expect(200);
    assertContract(InvitationListSchema, pending.body, "GET /api/labs/:labId/invitations");
    assert.deepEqual(
      pending.body.items.map((i: any) => [i.email, i.role, i.invitedBy]),
      [["newcomer@example.org", "editor", "Demo owner"]],
    );
    assert.equal(pending.body.items[0].tokenHash, undefined);

    const info = await request(t.app).get(`/api/invitations/${token}`).expect(200);
    assertContract(InvitationOfferResponseSchema, info.body, "GET /api/invitations/:token");
    assert.deepEqual(
      { ...info.body.invitation, expiresAt: undefined },
      {
        labName: "Tank Sensor Group",
        role: "editor",
        email: "newcomer@example.org",
        hasAccount: false,
        expiresAt: undefined,
      },
    );

    const agent = request.agent(t.app);
    const missing = await agent.post("/api/invitations/accept").send({ token }).expect(400);
    assert.deepEqual(missing.body.error.fields.map((f: any) => f.path).sort(), ["displayName", "password"]);
    const ok = await agent
      .post("/api/invitations/accept")
      .send({ token, password: "newcomer-password", displayName: "Newcomer" })
      .expect(200);
    assertContract(AcceptInvitationResponseSchema, ok.body, "POST /api/invitations/accept (new account)");
    assert.equal(ok.body.role, "editor");
    assert.equal(ok.body.user.email, "newcomer@example.org");
    const me = await agent.get("/api/me").expect(200);
    assertContract(MeSchema, me.body, "GET /api/me");
    assert.deepEqual(
      me.body.labs.map((l: any) => [l.name, l.role]),
      [["Tank Sensor Group", "editor"]],
    );

    // One-time.
    await request(t.app).get(`/api/invitations/${token}`).expect(404);
    await request(t.app)
      .post("/api/invitations/accept")
      .send({ token, password: "other-password", displayName: "Other" })
      .expect(404);
    const after = await owner.get(`/api/labs/${t.demoLab!.id}/invitations`).expect(200);
    assert.equal(after.body.items.length, 0);

    const audit = await owner.get(`/api/labs/${t.demoLab!.id}/audit`).expect(200);
    assert.deepEqual(
      audit.body.items.slice(0, 2).map((e: any) => e.action),
      ["member.joined", "member.invited"],
    );
  });

  test("someone with an account must sign in first; signed in, accepting adds the lab", async () => {
    const other = await signIn(t.app, "newcomer@example.org", "newcomer-password");
    const lab2 = (await other.post("/api/labs").send({ name: "Second lab" }).expect(201)).body.lab.id;
    const r = await other
      .post(`/api/labs/${lab2}/invitations`)
      .send({ email: "viewer@example.org", role: "viewer" })
      .expect(201);
    assert.equal(r.body.invitation.role, "viewer");
    const token = tokenFromMail(t.outbox(VIEWER).at(-1)!.text, "/invite");
    const anon = await request(t.app)
      .post("/api/invitations/accept")
      .send({ token, password: "whatever-pass", displayName: "V" })
      .expect(409);
    assert.equal(anon.body.error.code, "sign_in_required");
    const viewer = await signIn(t.app, VIEWER);
    const ok = await viewer.post("/api/invitations/accept").send({ token }).expect(200);
    assertContract(AcceptInvitationResponseSchema, ok.body, "POST /api/invitations/accept (signed in)");
    assert.equal(ok.body.labId, lab2);
    assert.deepEqual(ok.body.labs.map((l: any) => l.name).sort(), ["Second lab", "Tank Sensor Group"]);
  });

  test("signed in, an invitation for another address is refused with the sign-up error, and stays usable", async () => {
    const { token } = await invite("promoted@example.org", "editor");
    const viewer = await signIn(t.app, VIEWER);
    const r = await viewer.post("/api/invitations/accept").send({ token }).expect(400);
    assert.equal(r.body.error.code, "email_mismatch");
    assert.match(r.body.error.message, /promoted@example\.org/);
    const me = await viewer.get("/api/me").expect(200);
    assert.equal(me.body.labs.find((l: any) => l.id === t.demoLab!.id).role, "viewer");
    await request(t.app).get(`/api/invitations/${token}`).expect(200);
  });

  test("sign-up with an invitation joins its lab instead of making a lab of one's own", async () => {
    const { token } = await invite("third@example.org", "viewer");
    await request(t.app)
      .post("/api/auth/sign-up")
      .send({
        email: "someone-else@example.org",
        password: "third-password",
        displayName: "Third",
        invitationToken: token,
      })
      .expect(400);
    const agent = request.agent(t.app);
    await agent
      .post("/api/auth/sign-up")
      .send({ email: "third@example.org", password: "third-password", displayName: "Third", invitationToken: token })
      .expect(201);
    const me = await agent.get("/api/me").expect(200);
    assert.deepEqual(
      me.body.labs.map((l: any) => [l.name, l.role]),
      [["Tank Sensor Group", "viewer"]],
    );
  });

  test("an expired invitation is refused", async () => {
    const { token } = await invite("late@example.org", "viewer");
    t.ctx.db
      .update(schema.tokens)
      .set({ expiresAt: new Date(Date.now() - 1000) })
      .where(eq(schema.tokens.email, "late@example.org"))
      .run();
    await request(t.app).get(`/api/invitations/${token}`).expect(404);
    await request(t.app)
      .post("/api/invitations/accept")
      .send({ token, password: "late-password", displayName: "Late" })
      .expect(404);
  });

  test("the owner withdraws a pending invitation; its link stops working", async () => {
    const { owner, token } = await invite("withdrawn@example.org", "editor");
    const list = await owner.get(`/api/labs/${t.demoLab!.id}/invitations`).expect(200);
    const inv = list.body.items.find((i: any) => i.email === "withdrawn@example.org");
    assert.match(inv.id, /^[0-9a-f]{20}$/);
    const editor = await signIn(t.app, EDITOR);
    await editor.delete(`/api/labs/${t.demoLab!.id}/invitations/${inv.id}`).expect(403);
    await owner.delete(`/api/labs/${t.demoLab!.id}/invitations/${inv.id}`).expect(204);
    await owner.delete(`/api/labs/${t.demoLab!.id}/invitations/${inv.id}`).expect(404);
    await request(t.app).get(`/api/invitations/${token}`).expect(404);
    const audit = await owner.get(`/api/labs/${t.demoLab!.id}/audit?limit=1`).expect(200);
    assert.equal(audit.body.items[0].action, "member.invitation_revoked");
  });

  test("only owners invite; inviting a member again is a 409", async () => {
    const editor = await signIn(t.app, EDITOR);
    await editor
      .post(`/api/labs/${t.demoLab!.id}/invitations`)
      .send({ email: "x@example.org", role: "viewer" })
      .expect(403);
    const owner = await signIn(t.app, OWNER);
    const dup = await owner
      .post(`/api/labs/${t.demoLab!.id}/invitations`)
      .send({ email: EDITOR, role: "viewer" })
      .expect(409);
    assert.equal(dup.body.error.code, "already_member");
    await owner
      .post(`/api/labs/${t.demoLab!.id}/invitations`)
      .send({ email: "not-an-address", role: "viewer" })
      .expect(400);
  });
});

describe("site admin routes", () => {
  let t: TestApp;
  before(async () => {
    t = await makeTestContext();
    t.ctx.db.update(schema.users).set({ isSiteAdmin: true }).where(eq(schema.users.email, VIEWER)).run();
  });
  after(async () => t.close());

  test("lab owners are not site admins (403); a site admin lists users and reads the outbox", async () => {
    const owner = await signIn(t.app, OWNER);
    await owner.get("/api/admin/users").expect(403);
    await owner.get("/api/admin/outbox").expect(403);
    await owner.post("/api/admin/backup").expect(403);
    await request(t.app).post("/api/auth/reset-request").send({ email: EDITOR }).expect(200);
    await t.settleMail();
    const admin = await signIn(t.app, VIEWER);
    const users = await admin.get("/api/admin/users").expect(200);
    assertContract(AdminUsersSchema, users.body, "GET /api/admin/users");
    assert.deepEqual(
      users.body.items.map((u: any) => [u.email, u.labCount]),
      [
        [EDITOR, 1],
        [OWNER, 1],
        [VIEWER, 1],
      ],
    );
    const box = await admin.get(`/api/admin/outbox?to=${EDITOR}`).expect(200);
    assertContract(OutboxSchema, box.body, "GET /api/admin/outbox");
    assert.equal(box.body.mailer, "fake");
    assert.equal(box.body.items.length, 1);
    assert.equal(box.body.items[0].subject, "Reset your Linger password");
  });

  test("backup writes a consistent copy of the database (SQLite online backup) that opens with the same data", async () => {
    const admin = await signIn(t.app, VIEWER);
    const r = await admin.post("/api/admin/backup").expect(201);
    assertContract(BackupResultSchema, r.body, "POST /api/admin/backup");
    assert.match(r.body.file, /^linger-\d{4}-\d\d-\d\dT[\d-]+Z\.db$/);
    const path = join(backupDir(t.ctx), r.body.file);
    assert.ok(existsSync(path));
    assert.equal(backupDir(t.ctx), join(t.dir, "backups"));
    const copy = new Database(path, { readonly: true });
    try {
      assert.equal(copy.pragma("integrity_check", { simple: true }), "ok");
      const emails = (copy.prepare("select email from users order by email").all() as { email: string }[]).map(
        (u) => u.email,
      );
      assert.deepEqual(emails, [EDITOR, OWNER, VIEWER]);
      // every stored mail is in the copy
      const count = (db: Database.Database) =>
        (db.prepare("select count(*) as n from outbox").get() as { n: number }).n;
      assert.equal(count(copy), count(t.ctx.sqlite));
    } finally {
      copy.close();
    }
  });
});
