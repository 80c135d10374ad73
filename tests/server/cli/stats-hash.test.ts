/**
 * One hash and one finalisation everywhere: the CLI's summary.json statsHash equals the hash the server
 * stores for the same spec and seed, and its analysis.json and regime.json equal the server's summary and labels.
 */
import { test } from "node:test";
import assert from "node:assert/strict";
import { execFileSync } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { eq } from "drizzle-orm";
import { schema } from "@/db/client";
import { makeTestContext, signIn } from "@/tests/helpers/test-app";
import { launchBody, realQueue, waitForRun } from "@/tests/helpers/run-helpers";

const root = path.resolve(__dirname, "../../..");

test("the CLI and the server give the same statistics hash for the same spec and seed", async () => {
  const dir = mkdtempSync(path.join(os.tmpdir(), "linger-hash-"));
  const t = await makeTestContext({ queue: realQueue(1) });
  try {
    const editor = await signIn(t.app, "editor@example.org");
    const r = await editor
      .post(`/api/labs/${t.demoLab!.id}/runs`)
      .send(launchBody({ replicates: 130, seed: "one-hash" }));
    assert.equal(r.status, 201, JSON.stringify(r.body));
    const done = await waitForRun(editor, r.body.id);
    assert.equal(done.status, "finished");
    const serverHash: string = done.statsHash;
    assert.match(serverHash, /^v2:[0-9a-f]{64}$/);

    // The spec exactly as the server stored and ran it.
    const row = t.ctx.db.select().from(schema.runs).where(eq(schema.runs.id, r.body.id)).get()!;
    const specFile = path.join(dir, "spec.json");
    writeFileSync(specFile, JSON.stringify(row.spec));
    const runCli = (out: string, extra: string[]) =>
      execFileSync(
        process.execPath,
        ["--import", "tsx", path.join(root, "server/cli/sim.ts"), specFile, "--out", out, "--quiet", ...extra],
        { cwd: root, stdio: "pipe" },
      );
    runCli(path.join(dir, "one"), []);
    runCli(path.join(dir, "two"), ["--threads", "2"]);
    const cliHash = JSON.parse(readFileSync(path.join(dir, "one", "summary.json"), "utf8")).statsHash;
    const cliHash2 = JSON.parse(readFileSync(path.join(dir, "two", "summary.json"), "utf8")).statsHash;
    assert.match(cliHash, /^v2:[0-9a-f]{64}$/);
    assert.equal(cliHash, serverHash);
    assert.equal(cliHash2, serverHash);

    // One finalisation pipeline: the CLI's analysis.json is the summary the server stored, figure for figure,
    // and both label the behaviour alike.
    const analysis = JSON.parse(readFileSync(path.join(dir, "one", "analysis.json"), "utf8"));
    assert.ok(analysis.byDuration.length > 0, "the run has a filter curve");
    assert.deepEqual(analysis, JSON.parse(JSON.stringify(row.summary)));
    const regime = JSON.parse(readFileSync(path.join(dir, "one", "regime.json"), "utf8"));
    assert.deepEqual(regime, JSON.parse(JSON.stringify(done.regime)));

    // And the hash does depend on the seed: another seed through the CLI gives another hash.
    runCli(path.join(dir, "other"), ["--seed", "another-seed"]);
    const other = JSON.parse(readFileSync(path.join(dir, "other", "summary.json"), "utf8")).statsHash;
    assert.match(other, /^v2:[0-9a-f]{64}$/);
    assert.notEqual(other, serverHash);
  } finally {
    await t.close();
    rmSync(dir, { recursive: true, force: true });
  }
});
