import { test } from "node:test";
import assert from "node:assert/strict";
import { makeTestContext, signIn } from "../helpers/test-app";
import { realQueue, waitForRun } from "../helpers/run-helpers";
import { seedDemo } from "../../server/services/demo-seed";
import { schema } from "../../db/client";

test("demo seeding queues the two demo runs once; they finish and can be compared", async () => {
  const t = await makeTestContext({ seed: "full", queue: realQueue(1) });
  try {
    await seedDemo(t.ctx); // a second start must not add runs
    const runs = t.ctx.db.select().from(schema.runs).all();
    assert.deepEqual(runs.map((r) => r.demoKey).sort(), ["run-tank-direct-ladder", "run-tank-hold-ladder"]);
    const viewer = await signIn(t.app, "viewer@example.org");
    const done = await Promise.all(runs.map((r) => waitForRun(viewer, r.id, 180_000)));
    for (const d of done) assert.equal(d.status, "finished", d.statusReason);
    // the ladder's seven durations appear in both runs' filter curves
    for (const d of done) assert.deepEqual(d.summary.byDuration.map((b: any) => b.duration), [1, 2, 5, 10, 20, 40, 80]);
    const list = (await viewer.get(`/api/labs/${t.demoLab!.id}/runs`)).body;
    for (const item of list) {
      assert.equal(item.programName, "Duration ladder");
      assert.equal(item.headline.longestDuration, 80);
    }
    const cmp = await viewer.post(`/api/labs/${t.demoLab!.id}/compare`).send({ runIds: runs.map((r) => r.id) });
    assert.equal(cmp.status, 200, JSON.stringify(cmp.body));
  } finally {
    await t.close();
  }
});
