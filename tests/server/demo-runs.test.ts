import { test } from "node:test";
import assert from "node:assert/strict";
import { makeTestContext, signIn } from "@/tests/helpers/test-app";
import { realQueue, waitForRun } from "@/tests/helpers/run-helpers";
import { seedDemo } from "@/server/demo/seed";
import { schema } from "@/db/client";

test("demo seeding queues the two demo runs and the demo sweep once; they finish and can be compared", async () => {
  const t = await makeTestContext({ seed: "full", queue: realQueue(1) });
  try {
    await seedDemo(t.ctx); // a second start must not add runs
    const runs = t.ctx.db
      .select()
      .from(schema.runs)
      .all()
      .filter((r) => !r.sweepId);
    const sweeps = t.ctx.db.select().from(schema.sweeps).all();
    assert.equal(sweeps.length, 1);
    assert.equal(sweeps[0].pointCount, 9);
    assert.deepEqual(runs.map((r) => r.demoKey).sort(), ["run-tank-direct-ladder", "run-tank-hold-ladder"]);
    const viewer = await signIn(t.app, "viewer@example.org");
    const done = await Promise.all(runs.map((r) => waitForRun(viewer, r.id, 180_000)));
    for (const d of done) assert.equal(d.status, "finished", d.statusReason);
    // the ladder's seven durations appear in both runs' filter curves
    for (const d of done)
      assert.deepEqual(
        d.summary.byDuration.map((b: any) => b.duration),
        [1, 2, 5, 10, 20, 40, 80],
      );
    const list = (await viewer.get(`/api/labs/${t.demoLab!.id}/runs`)).body.items;
    for (const item of list) {
      assert.equal(item.programName, "Duration ladder");
      assert.equal(item.headline.longestDuration, 80);
    }
    const sweep = await (async () => {
      for (;;) {
        const r = (await viewer.get(`/api/sweeps/${sweeps[0].id}`)).body;
        if (!["queued", "running"].includes(r.status)) return r;
        await new Promise((res) => setTimeout(res, 200));
      }
    })();
    assert.equal(sweep.status, "finished");
    const cmp = await viewer.post(`/api/labs/${t.demoLab!.id}/compare`).send({ runIds: runs.map((r) => r.id) });
    assert.equal(cmp.status, 200, JSON.stringify(cmp.body));
    // Each run says what it was measured with; thresholds differ exactly when the resolved thetas do.
    const settings = cmp.body.runs.map(
      (r: { settings: { thresholdMolecules: number; method: { name: string } } }) => r.settings,
    );
    assert.ok(settings.every((s: { method: { name: string } }) => s.method.name === "direct"));
    const thetas = new Set(settings.map((s: { thresholdMolecules: number }) => s.thresholdMolecules));
    assert.equal(
      cmp.body.settingsWarnings.some((w: string) => /different thresholds/.test(w)),
      thetas.size > 1,
    );
  } finally {
    await t.close();
  }
});
