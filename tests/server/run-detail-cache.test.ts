/**
 * An ended run's detail is served from the answer cache (server/services/answer-cache.ts) with an ETag:
 * the same bytes as the detail built afresh, 304 for a matching If-None-Match, a new ETag and answer after
 * any write (rename, notes, status, delete and restore, a write straight to the database), access checked
 * before the cache on every request, and the cache's memory bounded.
 */
import { describe, test, before, after } from "node:test";
import assert from "node:assert/strict";
import { eq } from "drizzle-orm";
import request from "supertest";
import { makeTestContext, signIn, type TestApp } from "@/tests/helpers/test-app";
import { launchBody } from "@/tests/helpers/run-helpers";
import { schema } from "@/db/client";
import { newId } from "@/server/ids";
import { hashPassword } from "@/server/services/password";
import * as runs from "@/server/services/runs.service";
import * as bundles from "@/server/services/bundles.service";
import { accelerationFor } from "@/server/services/analysis.service";
import { AnswerCache } from "@/server/services/answer-cache";
import { etagMatches } from "@/server/routes/cached-answer";

const summary = (d50: number) =>
  ({ d50, falsePassRate: 0.25, delay: { median: 4 }, byDuration: [{ duration: 60, passProbability: 0.75 }] }) as any;

describe("run detail: cached answer with an ETag", () => {
  let t: TestApp;
  let editor: Awaited<ReturnType<typeof signIn>>;
  let outsider: Awaited<ReturnType<typeof signIn>>;
  let id: string;
  const url = () => `/api/runs/${id}`;
  const setRun = (values: Partial<typeof schema.runs.$inferInsert>) =>
    t.ctx.db.update(schema.runs).set(values).where(eq(schema.runs.id, id)).run();
  /** The detail built afresh by the services, as the route builds it on a miss. */
  const fresh = async () => {
    const row = runs.getRunRow(t.ctx, id);
    return JSON.stringify({
      ...runs.runDetail(t.ctx, row),
      reproduction: bundles.reproductionStatus(t.ctx, row),
      acceleration: await accelerationFor(t.ctx, row),
    });
  };

  before(async () => {
    t = await makeTestContext();
    editor = await signIn(t.app, "editor@example.org");
    const r = await editor.post(`/api/labs/${t.demoLab!.id}/runs`).send(launchBody({ replicates: 100, seed: "etag" }));
    assert.equal(r.status, 201, JSON.stringify(r.body));
    id = r.body.id;
    // A signed-in user of no lab that holds the run.
    const email = "elsewhere@example.org";
    t.ctx.db
      .insert(schema.users)
      .values({
        id: newId("usr_"),
        email,
        displayName: "Elsewhere",
        passwordHash: await hashPassword("elsewhere-password"),
        isSiteAdmin: false,
        notifyOnRunEnd: false,
        createdAt: new Date(),
      })
      .run();
    outsider = await signIn(t.app, email, "elsewhere-password");
  });
  after(async () => t.close());

  test("a queued run's detail has no ETag (its progress is not in the database)", async () => {
    const r = await editor.get(url()).expect(200);
    assert.equal(r.headers.etag, undefined);
    assert.equal(r.headers["cache-control"], "no-store");
  });

  test("an ended run: the same bytes as built afresh, the same ETag again, 304 when it matches", async () => {
    setRun({ status: "finished", finishedAt: new Date(Date.UTC(2026, 0, 1)), statsHash: "h1", summary: summary(10) });
    const first = await editor.get(url()).buffer(true).expect(200);
    const etag = first.headers.etag;
    assert.match(etag, /^"[A-Za-z0-9_-]+"$/);
    assert.equal(first.headers["cache-control"], "private, no-cache");
    assert.equal(first.text, await fresh());
    // From the cache this time: the same answer and validator.
    const second = await editor.get(url()).expect(200);
    assert.equal(second.headers.etag, etag);
    assert.equal(second.text, first.text);
    const notModified = await editor.get(url()).set("If-None-Match", etag).expect(304);
    assert.equal(notModified.text, "");
    assert.equal(notModified.headers.etag, etag);
    // Another validator, or a weak form of this one (weak comparison for GET).
    await editor.get(url()).set("If-None-Match", '"other"').expect(200);
    await editor.get(url()).set("If-None-Match", `"other", W/${etag}`).expect(304);
  });

  test("compressed once, and the compressed bytes are the JSON", async () => {
    const r = await editor
      .get(url())
      .set("Accept-Encoding", "gzip")
      .buffer(true)
      .parse((res, done) => {
        const parts: Buffer[] = [];
        res.on("data", (c: Buffer) => parts.push(c));
        res.on("end", () => done(null, Buffer.concat(parts)));
      })
      .expect(200);
    assert.equal(r.headers["content-encoding"], "gzip");
    // supertest has un-gzipped the body already: it was valid gzip of the same JSON.
    assert.equal((r.body as Buffer).toString("utf8"), await fresh());
  });

  const etagAfter = async (write: () => unknown, expectName?: string) => {
    const before = (await editor.get(url()).expect(200)).headers.etag;
    await write();
    // The old validator no longer matches: a full answer, with the write in it.
    const r = await editor.get(url()).set("If-None-Match", before).expect(200);
    assert.notEqual(r.headers.etag, before);
    assert.equal(r.text, await fresh());
    if (expectName) assert.equal(r.body.name, expectName);
    return r;
  };

  test("a rename or a note changes the ETag and the answer", async () => {
    await etagAfter(() => editor.patch(url()).send({ name: "renamed run" }).expect(200), "renamed run");
    const r = await etagAfter(() => editor.patch(url()).send({ notes: "tank 3" }).expect(200));
    assert.equal(r.body.notes, "tank 3");
  });

  test("a status change written straight to the database changes the ETag and the answer", async () => {
    const r = await etagAfter(() => setRun({ status: "failed", statusReason: "disk full" }));
    assert.equal(r.body.status, "failed");
    assert.equal(r.body.statusReason, "disk full");
    setRun({ status: "finished", statusReason: null });
  });

  test("delete answers 404 from a warm cache; restore answers the restored run with a new ETag", async () => {
    const before = (await editor.get(url()).expect(200)).headers.etag;
    await editor.get(url()).expect(200);
    await editor.delete(url()).expect(200);
    await editor.get(url()).expect(404);
    await editor.get(url()).set("If-None-Match", before).expect(404);
    await editor.post(`${url()}/restore`).expect(200);
    const r = await editor.get(url()).set("If-None-Match", before).expect(200);
    // The history now tells of the delete and the restore.
    assert.notEqual(r.headers.etag, before);
    assert.equal(r.body.deletedAt, null);
    assert.equal(r.text, await fresh());
  });

  test("access is checked before the cache: another lab's user 404, signed out 401", async () => {
    const etag = (await editor.get(url()).expect(200)).headers.etag;
    const r = await outsider.get(url()).set("If-None-Match", etag).expect(404);
    assert.equal(r.headers.etag, undefined);
    assert.doesNotMatch(r.text, /renamed run/);
    await request(t.app).get(url()).set("If-None-Match", etag).expect(401);
  });
});

describe("answer cache: validity and memory bound", () => {
  test("an entry is served only under the stamp it was built at", () => {
    let stamp = "1:1";
    const c = new AnswerCache(() => stamp);
    c.put("a", c.stamp(), { x: 1 });
    assert.deepEqual(JSON.parse(c.get("a")!.json.toString()), { x: 1 });
    stamp = "2:1";
    assert.equal(c.get("a"), undefined);
    // Built before a write, stored after it: not kept.
    const early = c.stamp();
    stamp = "3:1";
    const e = c.put("b", early, { y: 2 });
    assert.equal(e.json.toString(), '{"y":2}');
    assert.equal(c.get("b"), undefined);
    assert.equal(c.size(), 0);
  });

  test("memory stays under the bound, least recently used first out", () => {
    const c = new AnswerCache(() => "s", 4000);
    const value = (k: number) => ({ k, pad: "x".repeat(900) });
    for (let k = 0; k < 3; k++) c.put(`k${k}`, "s", value(k));
    assert.ok(c.get("k0")); // k0 is now the most recent
    for (let k = 3; k < 6; k++) c.put(`k${k}`, "s", value(k));
    assert.ok(c.heldBytes() <= 4000, `held ${c.heldBytes()}`);
    assert.equal(c.get("k1"), undefined);
    assert.ok(c.get("k5"));
    // Compressed forms count too.
    c.body(c.get("k5")!, "gzip");
    assert.ok(c.heldBytes() <= 4000);
    // Too large for the bound: answered, not kept.
    c.put("big", "s", { pad: "y".repeat(2000) });
    assert.equal(c.get("big"), undefined);
  });

  test("If-None-Match parsing", () => {
    assert.equal(etagMatches(undefined, '"a"'), false);
    assert.equal(etagMatches('"a"', '"a"'), true);
    assert.equal(etagMatches('W/"a"', '"a"'), true);
    assert.equal(etagMatches('"b", "a"', '"a"'), true);
    assert.equal(etagMatches('"b"', '"a"'), false);
    assert.equal(etagMatches("*", '"a"'), true);
  });
});
