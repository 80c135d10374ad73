/**
 * Mail: the message parser of the fake SMTP server, the fake outbox end to end
 * over real SMTP, a configured SMTP URL, and the run-finished notification.
 */
import { describe, test, before, after } from "node:test";
import assert from "node:assert/strict";
import { eq } from "drizzle-orm";
import { makeTestContext, TEST_BASE_URL, type TestApp } from "@/tests/helpers/test-app";
import { openDatabase, schema } from "@/db/client";
import { createMailer, parseMailMessage, startFakeSmtpServer } from "@/server/services/mail.service";
import { notifyRunEnded } from "@/server/services/notify.service";
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";

describe("parseMailMessage", () => {
  test("plain 7bit message with folded headers", () => {
    const raw =
      "From: A <a@example.org>\r\nTo: b@example.org\r\nSubject: Hello\r\n there\r\nContent-Type: text/plain; charset=utf-8\r\n\r\nLine 1\r\nLine 2\r\n";
    assert.deepEqual(parseMailMessage(raw), {
      from: "A <a@example.org>",
      to: "b@example.org",
      subject: "Hello there",
      text: "Line 1\nLine 2",
    });
  });

  test("quoted-printable body with soft line breaks and UTF-8 bytes; RFC 2047 subject", () => {
    const raw = [
      "To: b@example.org",
      "Subject: =?UTF-8?Q?R=C3=BCckmeldung_f=C3=BCr?= =?UTF-8?B?IFRhbms=?=",
      "Content-Type: text/plain; charset=utf-8",
      "Content-Transfer-Encoding: quoted-printable",
      "",
      "Gr=C3=BC=C3=9Fe, a very long line that was wrapped =",
      "here and an equals sign =3D.",
      "",
    ].join("\r\n");
    const m = parseMailMessage(raw);
    assert.equal(m.subject, "Rückmeldung für Tank");
    assert.equal(m.text, "Grüße, a very long line that was wrapped here and an equals sign =.");
  });

  test("base64 body, and the text/plain part of a multipart message", () => {
    const b64 = Buffer.from("Hällo\nworld", "utf8").toString("base64");
    const single = `To: x@example.org\r\nSubject: s\r\nContent-Transfer-Encoding: base64\r\n\r\n${b64}\r\n`;
    assert.equal(parseMailMessage(single).text, "Hällo\nworld");
    const multi = [
      "To: x@example.org",
      'Content-Type: multipart/alternative; boundary="--b1"',
      "",
      "----b1",
      "Content-Type: text/plain; charset=utf-8",
      "",
      "plain part",
      "----b1",
      "Content-Type: text/html",
      "",
      "<p>html part</p>",
      "----b1--",
      "",
    ].join("\r\n");
    assert.equal(parseMailMessage(multi).text, "plain part");
  });
});

describe("fake SMTP outbox", () => {
  let t: TestApp;
  before(async () => (t = await makeTestContext()));
  after(async () => t.close());

  test("a message sent through nodemailer over SMTP arrives in the outbox unchanged (non-ASCII, long lines)", async () => {
    assert.equal(t.ctx.mailer.kind, "fake");
    const text = `Grüße aus dem Tank.\n\n${"long ".repeat(60)}end\nlink: ${TEST_BASE_URL}/runs/run_1?x=1&y=2`;
    await t.ctx.mailer.send({ to: "someone@example.org", subject: "Größe — status ✓", text });
    const [m] = t.outbox("someone@example.org");
    assert.equal(m.subject, "Größe — status ✓");
    assert.equal(m.text, text);
    assert.equal(m.from, "Linger <linger@example.org>");
  });
});

describe("configured SMTP server", () => {
  test("LINGER_SMTP_URL sends to that server instead of starting the local one", async () => {
    const dir = mkdtempSync(join(tmpdir(), "linger-smtp-"));
    const remote = openDatabase(join(dir, "remote.db"));
    const server = await startFakeSmtpServer(remote.db);
    const local = openDatabase(join(dir, "local.db"));
    const mailer = await createMailer(
      { LINGER_SMTP_URL: `smtp://127.0.0.1:${server.port}`, LINGER_MAIL_FROM: "Lab <lab@example.org>" },
      { db: local.db },
    );
    try {
      assert.equal(mailer.kind, "smtp");
      await mailer.send({ to: "r@example.org", subject: "Via the configured server", text: "hi" });
      assert.equal(local.db.select().from(schema.outbox).all().length, 0);
      const got = remote.db.select().from(schema.outbox).all();
      assert.deepEqual(
        got.map((m) => [m.to, m.from, m.subject, m.text]),
        [["r@example.org", "Lab <lab@example.org>", "Via the configured server", "hi"]],
      );
    } finally {
      await mailer.close();
      await server.close();
      remote.close();
      local.close();
      rmSync(dir, { recursive: true, force: true });
    }
  });
});

describe("run-finished notification", () => {
  let t: TestApp;
  before(async () => (t = await makeTestContext()));
  after(async () => t.close());

  test("finished: mail to every lab member who opted in, with a link under LINGER_BASE_URL; opted-out members get none", async () => {
    t.ctx.db
      .update(schema.users)
      .set({ notifyOnRunEnd: false })
      .where(eq(schema.users.email, "viewer@example.org"))
      .run();
    const sent = await notifyRunEnded(t.ctx, {
      id: "run_abc",
      labId: t.demoLab!.id,
      name: "Night pulses",
      status: "finished",
    });
    assert.deepEqual(sent.sort(), ["editor@example.org", "owner@example.org"]);
    const [m] = t.outbox("owner@example.org");
    assert.equal(m.subject, 'Run "Night pulses" finished');
    assert.ok(m.text.includes(`${TEST_BASE_URL}/runs/run_abc`));
    assert.match(m.text, /Tank Sensor Group/);
    assert.equal(t.outbox("viewer@example.org").length, 0);
  });

  test("failed sweeps say so with the reason; cancelled runs send nothing; an unknown lab sends nothing", async () => {
    const before = t.outbox().length;
    await notifyRunEnded(t.ctx, {
      id: "swp_1",
      labId: t.demoLab!.id,
      name: "Hill sweep",
      status: "failed",
      statusReason: "worker crashed",
      kind: "sweep",
    });
    const last = t.outbox("editor@example.org").at(-1)!;
    assert.equal(last.subject, 'Sweep "Hill sweep" failed');
    assert.match(last.text, /Reason: worker crashed/);
    assert.ok(last.text.includes(`${TEST_BASE_URL}/sweeps/swp_1`));
    const afterFailed = t.outbox().length;
    assert.equal(afterFailed - before, 2);
    assert.deepEqual(
      await notifyRunEnded(t.ctx, { id: "run_c", labId: t.demoLab!.id, name: "Stopped", status: "cancelled" }),
      [],
    );
    assert.deepEqual(
      await notifyRunEnded(t.ctx, { id: "run_d", labId: "lab_none", name: "Nowhere", status: "finished" }),
      [],
    );
    assert.equal(t.outbox().length, afterFailed);
  });
});
