import { test } from "node:test";
import assert from "node:assert/strict";
import { makeTestContext, signIn } from "@/tests/helpers/test-app";
import { launchBody, realQueue, waitForRun } from "@/tests/helpers/run-helpers";
import { firstDifference } from "@/server/compute/run-store";

test("pool sizes 1 and 2 store identical statistics, summary and labels for the same spec and seed", async () => {
  const hashes: string[] = [];
  const finished: any[] = [];
  for (const threads of [1, 2]) {
    const t = await makeTestContext({ queue: realQueue(threads) });
    try {
      const editor = await signIn(t.app, "editor@example.org");
      const r = await editor
        .post(`/api/labs/${t.demoLab!.id}/runs`)
        .send(launchBody({ replicates: 450, seed: "same-seed" }));
      const done = await waitForRun(editor, r.body.id);
      assert.equal(done.status, "finished");
      hashes.push(done.statsHash);
      finished.push(done);
    } finally {
      await t.close();
    }
  }
  assert.equal(hashes[0], hashes[1]);
  // Finalised from the chunks reduced as they landed, in whatever order two threads returned them.
  assert.deepEqual(finished[0].summary, finished[1].summary);
  assert.deepEqual(finished[0].regime, finished[1].regime);
  assert.equal(finished[0].summary.counts.replicates, 450);
});

test("a different seed changes the statistics, and firstDifference names where", async () => {
  const t = await makeTestContext({ queue: realQueue(1) });
  try {
    const editor = await signIn(t.app, "editor@example.org");
    const a = await editor
      .post(`/api/labs/${t.demoLab!.id}/runs`)
      .send(launchBody({ replicates: 100, seed: "seed-a" }));
    const b = await editor
      .post(`/api/labs/${t.demoLab!.id}/runs`)
      .send(launchBody({ replicates: 100, seed: "seed-b" }));
    const da = await waitForRun(editor, a.body.id);
    const db = await waitForRun(editor, b.body.id);
    assert.match(da.statsHash, /^v2:[0-9a-f]{64}$/);
    assert.match(db.statsHash, /^v2:[0-9a-f]{64}$/);
    assert.notEqual(da.statsHash, db.statsHash);
    assert.match(firstDifference(t.ctx.db, a.body.id, b.body.id) ?? "", /^replicate 0/);
    assert.equal(firstDifference(t.ctx.db, a.body.id, a.body.id), null);
  } finally {
    await t.close();
  }
});
