import { test, before, after } from "node:test";
import assert from "node:assert/strict";
import { startTestServer, type TestServer } from "@/tests/helpers/test-server";

let server: TestServer;
before(async () => {
  server = await startTestServer({ database: "fresh" });
});
after(async () => {
  await server?.stop();
});

test("GET /api/health reports version, database state and pool size", async () => {
  const r = await fetch(`${server.url}/api/health`);
  assert.equal(r.status, 200);
  const body = await r.json();
  assert.match(body.version, /^\d+\.\d+\.\d+/);
  assert.equal(body.database.state, "ok");
  assert.equal(body.database.journalMode, "wal");
  assert.equal(body.pool.threads, 1);
});

test("client routes answer 200 with the app's HTML, never a server redirect", async () => {
  for (const path of ["/", "/runs/x", "/circuits/new", "/sign-in"]) {
    const r = await fetch(`${server.url}${path}`, { redirect: "manual" });
    assert.equal(r.status, 200, path);
    assert.match(r.headers.get("content-type") ?? "", /html/, path);
  }
});

test("unknown API routes answer a JSON 404", async () => {
  const r = await fetch(`${server.url}/api/no-such-thing`);
  assert.equal(r.status, 404);
  const body = await r.json();
  assert.equal(body.error.code, "not_found");
});

test("malformed JSON gets a 400 with a clear message, not a 500", async () => {
  const r = await fetch(`${server.url}/api/auth/sign-in`, {
    method: "POST",
    headers: { "content-type": "application/json" },
    body: "{not json",
  });
  assert.equal(r.status, 400);
  const body = await r.json();
  assert.match(body.error.message, /not valid JSON/);
});
