/**
 * Crash safety with a real server process killed by SIGKILL mid-run: on
 * restart the run resumes from its stored chunks and finishes with the same
 * statistics as an uninterrupted run (checked with the reproduction action),
 * and its history keeps the interruption after it finishes.
 */
import { test } from "node:test";
import assert from "node:assert/strict";
import { startTestServer, DEMO_PASSWORD } from "@/tests/helpers/test-server";
import { launchBody } from "@/tests/helpers/run-helpers";

async function session(url: string, email: string) {
  const r = await fetch(`${url}/api/auth/sign-in`, {
    method: "POST",
    headers: { "content-type": "application/json" },
    body: JSON.stringify({ email, password: DEMO_PASSWORD }),
  });
  assert.equal(r.status, 200, await r.text());
  const cookie = (r.headers.get("set-cookie") ?? "").split(";")[0];
  const call = async (method: string, path: string, body?: unknown) => {
    const res = await fetch(`${url}${path}`, {
      method,
      headers: { cookie, ...(body ? { "content-type": "application/json" } : {}) },
      body: body ? JSON.stringify(body) : undefined,
    });
    return { status: res.status, body: await res.json() };
  };
  return call;
}

async function until<T>(f: () => Promise<T>, ok: (v: T) => boolean, timeoutMs: number, what: string): Promise<T> {
  const t0 = Date.now();
  for (;;) {
    const v = await f();
    if (ok(v)) return v;
    if (Date.now() - t0 > timeoutMs)
      throw new Error(`timed out waiting for ${what}: ${JSON.stringify(v).slice(0, 300)}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

test("a run interrupted by SIGKILL resumes after restart and equals an uninterrupted run", async () => {
  let server = await startTestServer({ database: "fresh", env: { LINGER_SEED_DEMO: "1" } });
  const { dir, dbPath } = server;
  try {
    let call = await session(server.url, "editor@example.org");
    const me = await call("GET", "/api/me");
    const labId = me.body.labs[0].id;
    const launched = await call(
      "POST",
      `/api/labs/${labId}/runs`,
      launchBody({ replicates: 3000, seed: "crash-seed" }),
    );
    assert.equal(launched.status, 201, JSON.stringify(launched.body));
    const id = launched.body.id;
    const partial = await until(
      () => call("GET", `/api/runs/${id}`),
      (r) => r.body.progress.replicatesDone >= 300,
      120_000,
      "some chunks stored",
    );
    assert.ok(partial.body.progress.replicatesDone < 3000, "killed before the end");
    await server.kill();

    server = await startTestServer({ dir, dbPath, env: { LINGER_SEED_DEMO: "1" } });
    call = await session(server.url, "editor@example.org");
    const resumed = await until(
      () => call("GET", `/api/runs/${id}`),
      (r) => !["queued", "running"].includes(r.body.status),
      180_000,
      "resumed run to finish",
    );
    assert.equal(resumed.body.status, "finished", resumed.body.statusReason);
    assert.equal(resumed.body.progress.replicatesDone, 3000);
    // The finished run still says it was interrupted and resumed (before the fix only the status reason said so,
    // and finishing cleared it).
    const history = resumed.body.history.map((h: { action: string; words: string }) => h.action);
    assert.deepEqual(history, ["run.launched", "run.resumed"]);
    assert.match(
      resumed.body.history[1].words,
      /^Interrupted \(the server stopped\) and resumed with \d+ of 30 chunks kept$/,
    );
    assert.equal(resumed.body.history[1].by, null);

    const again = await call("POST", `/api/runs/${id}/reproduce`);
    assert.equal(again.status, 201);
    const repro = await until(
      () => call("GET", `/api/runs/${again.body.id}`),
      (r) => !["queued", "running"].includes(r.body.status),
      180_000,
      "reproduction",
    );
    assert.equal(repro.body.reproduction.identical, true, repro.body.reproduction.message);
    assert.match(resumed.body.statsHash, /^v2:[0-9a-f]{64}$/);
    assert.equal(repro.body.statsHash, resumed.body.statsHash);
  } finally {
    await server.stop();
    const { rmSync } = await import("node:fs");
    rmSync(dir, { recursive: true, force: true });
  }
});
