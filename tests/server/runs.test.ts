import { test, describe } from "node:test";
import assert from "node:assert/strict";
import { eq } from "drizzle-orm";
import { makeTestContext, signIn } from "@/tests/helpers/test-app";
import { launchBody, realQueue, waitForRun } from "@/tests/helpers/run-helpers";
import { schema } from "@/db/client";
import { hasPulseChunks, readPulseStats } from "@/server/compute/pulse-store";
import { checkCsvAgainstResource } from "@/tests/helpers/check-export";
import { ReplicatePageSchema, RunDetailSchema, RunListPageSchema, RunSeriesSchema } from "@/shared/schemas/api-runs";

describe("runs through the real queue and pool", () => {
  test("launch, progress, finish: statistics, series and exports are stored", async () => {
    const t = await makeTestContext({ queue: realQueue(1) });
    try {
      const editor = await signIn(t.app, "editor@example.org");
      const labId = t.demoLab!.id;
      const r = await editor.post(`/api/labs/${labId}/runs`).send(launchBody({ replicates: 150 }));
      assert.equal(r.status, 201, JSON.stringify(r.body));
      assert.ok(["queued", "running"].includes(r.body.status));
      const done = await waitForRun(editor, r.body.id);
      assert.equal(done.status, "finished", done.statusReason);
      assert.equal(done.progress.replicatesDone, 150);
      assert.ok(done.eventsTotal > 0);
      assert.match(done.statsHash, /^v2:[0-9a-f]{64}$/);
      // responses keep the shared contract the web app parses them with
      RunDetailSchema.parse(done);
      // the 5 and 60 min pulses appear in the per-duration figures
      assert.deepEqual(
        done.summary.byDuration.map((b: any) => b.duration),
        [5, 60],
      );
      const rows = readPulseStats(t.ctx.db, r.body.id);
      assert.equal(rows.length, 150 * 2);
      // new runs keep their pulses as one BLOB per chunk, not as rows
      assert.ok(hasPulseChunks(t.ctx.db, r.body.id));
      const series = await editor.get(`/api/runs/${r.body.id}/series`);
      assert.equal(series.status, 200);
      RunSeriesSchema.parse(series.body);
      assert.equal(series.body.times.length, 451);
      assert.equal(series.body.trajectories.length, 20);
      assert.equal(series.body.species.find((s: any) => s.name === "rptC").mean.length, 451);
      assert.ok(series.body.species[0].ode, "ODE overlay stored");
      const page = await editor.get(`/api/runs/${r.body.id}/replicates?sort=delay&dir=desc&page=2&pageSize=10`);
      assert.equal(page.status, 200);
      ReplicatePageSchema.parse(page.body);
      assert.equal(page.body.total, 300);
      assert.equal(page.body.rows.length, 10);
      // exports: download names match contents, every CSV loads as its data dictionary says
      const pkg = await editor.get(`/api/runs/${r.body.id}/export/datapackage.json`).expect(200);
      assert.equal(pkg.body.settings.replicates, 150);
      assert.equal(pkg.body.method.accuracy, "exact");
      for (const file of ["pulses", "output-pulses", "replicates", "aggregates", "headline"]) {
        const res = await editor.get(`/api/runs/${r.body.id}/export/${file}.csv`).expect(200);
        const name = /filename="([^"]+)"/.exec(res.headers["content-disposition"])![1];
        const entry = pkg.body.resources.find((x: any) => x.path === name);
        assert.ok(entry, `${name} is listed in datapackage.json`);
        assert.ok(name.endsWith(`-${file}.csv`), name);
        const rows = checkCsvAgainstResource(res.text, entry);
        if (file === "pulses") assert.equal(rows.length, 300);
        if (file === "replicates") assert.equal(rows.length, 150);
      }
      const sj = await editor.get(`/api/runs/${r.body.id}/export/summary.json`).expect(200);
      assert.equal(JSON.parse(sj.text).settings.seed, done.seed);
      assert.equal(done.settings.thresholdSource, "default");
      assert.equal(done.summary.settings.method.accuracy, "exact");
      // filters: by duration, passed or not (excluded pulses are neither), bad values answered 400
      const stored = rows.filter((x) => x.durationBin === 5);
      const short = await editor.get(`/api/runs/${r.body.id}/replicates?durationBin=5&pageSize=500`);
      assert.equal(short.body.total, stored.length);
      assert.ok(short.body.rows.every((x: any) => x.durationBin === 5));
      const yes = await editor.get(`/api/runs/${r.body.id}/replicates?passed=yes&pageSize=500`);
      const no = await editor.get(`/api/runs/${r.body.id}/replicates?passed=no&pageSize=500`);
      assert.equal(yes.body.total, rows.filter((x) => x.passed).length);
      assert.equal(no.body.total, rows.filter((x) => !x.passed && !x.excluded).length);
      assert.ok(yes.body.total > 0 && no.body.total > 0, "the ladder has pulses that pass and pulses that do not");
      assert.ok(yes.body.rows.every((x: any) => x.passed) && no.body.rows.every((x: any) => !x.passed && !x.excluded));
      const shortYes = await editor.get(`/api/runs/${r.body.id}/replicates?durationBin=5&passed=yes`);
      assert.equal(shortYes.body.total, stored.filter((x) => x.passed).length);
      const badFilter = await editor.get(`/api/runs/${r.body.id}/replicates?passed=maybe`);
      assert.equal(badFilter.status, 400);
      assert.match(JSON.stringify(badFilter.body), /passed/);
      // the run list shows it with headline figures
      const list = await editor.get(`/api/labs/${labId}/runs`);
      RunListPageSchema.parse(list.body);
      assert.equal(list.body.items[0].id, r.body.id);
      assert.equal(list.body.items[0].programName, "inline duration ladder");
    } finally {
      await t.close();
    }
  });

  test("bad launch input gets a 400 naming the field; nothing is stored", async () => {
    const t = await makeTestContext({ queue: realQueue(1) });
    try {
      const editor = await signIn(t.app, "editor@example.org");
      const body = launchBody();
      const bad = { ...body, settings: { ...body.settings, replicates: 0 } };
      const r = await editor.post(`/api/labs/${t.demoLab!.id}/runs`).send(bad);
      assert.equal(r.status, 400);
      assert.ok(
        r.body.error.fields.some((f: any) => f.path === "settings.replicates"),
        JSON.stringify(r.body),
      );
      const r2 = await editor.post(`/api/labs/${t.demoLab!.id}/runs`).send({ ...body, inputSignal: "Nope" });
      assert.equal(r2.status, 400);
      assert.match(r2.body.error.message, /no signal "Nope"/);
      const tooBig = await editor
        .post(`/api/labs/${t.demoLab!.id}/runs`)
        .send({ ...body, settings: { ...body.settings, gridStepMinutes: 0.001 } });
      assert.equal(tooBig.status, 400);
      assert.match(tooBig.body.error.message, /grid/);
      assert.equal(t.ctx.db.select().from(schema.runs).all().length, 0);
    } finally {
      await t.close();
    }
  });

  test("cancel stops a running run; a failing chunk marks the run failed with the reason", async () => {
    const t = await makeTestContext({ queue: realQueue(1, { chunkWallMs: 1 }) });
    try {
      const editor = await signIn(t.app, "editor@example.org");
      const labId = t.demoLab!.id;
      // A large system size makes each replicate fire ~10^5 events, so the engine's checkpoint is reached past the 1 ms cap.
      const body = launchBody({ replicates: 100 });
      const failing = await editor
        .post(`/api/labs/${labId}/runs`)
        .send({ ...body, settings: { ...body.settings, systemSize: 50 } });
      assert.equal(failing.status, 201, JSON.stringify(failing.body));
      const failed = await waitForRun(editor, failing.body.id);
      assert.equal(failed.status, "failed");
      assert.match(failed.statusReason, /wall-time cap/);
    } finally {
      await t.close();
    }
    const t2 = await makeTestContext({ queue: realQueue(1) });
    try {
      const editor = await signIn(t2.app, "editor@example.org");
      const r = await editor.post(`/api/labs/${t2.demoLab!.id}/runs`).send(launchBody({ replicates: 20_000 }));
      const c = await editor.post(`/api/runs/${r.body.id}/cancel`);
      assert.equal(c.status, 200);
      assert.equal(c.body.status, "cancelled");
      const again = await editor.post(`/api/runs/${r.body.id}/cancel`);
      assert.equal(again.status, 409);
      const viewer = await signIn(t2.app, "viewer@example.org");
      assert.equal((await viewer.post(`/api/runs/${r.body.id}/cancel`)).status, 403);
    } finally {
      await t2.close();
    }
  });

  test("a small run launched behind a large one finishes within a few chunk times", async () => {
    const t = await makeTestContext({ queue: realQueue(1) });
    try {
      const editor = await signIn(t.app, "editor@example.org");
      const labId = t.demoLab!.id;
      const big = await editor.post(`/api/labs/${labId}/runs`).send(launchBody({ replicates: 100_000, name: "big" }));
      assert.equal(big.status, 201, JSON.stringify(big.body));
      const small = await editor.post(`/api/labs/${labId}/runs`).send(launchBody({ replicates: 100, name: "small" }));
      const done = await waitForRun(editor, small.body.id);
      assert.equal(done.status, "finished");
      // Round-robin by chunk (100 replicates): count the big run's chunks stored before the small run's only chunk
      // (chunks are stored in completion order). First come, first served would make it 1,000.
      const before = t.ctx.sqlite
        .prepare(
          `SELECT count(*) AS n FROM run_chunks WHERE run_id = ? AND rowid < (SELECT rowid FROM run_chunks WHERE run_id = ?)`,
        )
        .get(big.body.id, small.body.id) as { n: number };
      assert.ok(before.n <= 2, `${before.n} chunks of the big run were stored before the small run's chunk`);
      await editor.post(`/api/runs/${big.body.id}/cancel`).expect(200);
    } finally {
      await t.close();
    }
  });

  test("delete can be undone; archived runs leave the default list", async () => {
    const t = await makeTestContext({ queue: realQueue(1) });
    try {
      const editor = await signIn(t.app, "editor@example.org");
      const labId = t.demoLab!.id;
      const r = await editor.post(`/api/labs/${labId}/runs`).send(launchBody({ replicates: 100 }));
      await waitForRun(editor, r.body.id);
      const d = await editor.delete(`/api/runs/${r.body.id}`);
      assert.equal(d.status, 200);
      assert.equal((await editor.get(`/api/labs/${labId}/runs`)).body.items.length, 0);
      await editor.post(`/api/runs/${r.body.id}/restore`).expect(200);
      assert.equal((await editor.get(`/api/labs/${labId}/runs`)).body.items.length, 1);
      await editor.post(`/api/runs/${r.body.id}/archive`).expect(200);
      assert.equal((await editor.get(`/api/labs/${labId}/runs`)).body.items.length, 0);
      assert.equal((await editor.get(`/api/labs/${labId}/runs?archived=1`)).body.items.length, 1);
    } finally {
      await t.close();
    }
  });
});

test("deleted runs are purged after the undo period, not before", async () => {
  const t = await makeTestContext();
  try {
    const editor = await signIn(t.app, "editor@example.org");
    const r = await editor.post(`/api/labs/${t.demoLab!.id}/runs`).send(launchBody({ replicates: 10 }));
    await editor.delete(`/api/runs/${r.body.id}`).expect(200);
    const { purgeDeleted } = await import("@/server/services/runs.service");
    const day = 86400_000;
    purgeDeleted(t.ctx, Date.now() + 6 * day);
    assert.equal(t.ctx.db.select().from(schema.runs).all().length, 1, "still restorable within 7 days");
    // Past the undo period a restore is refused even before the purge has run.
    t.ctx.db
      .update(schema.runs)
      .set({ deletedAt: new Date(Date.now() - 8 * day) })
      .where(eq(schema.runs.id, r.body.id))
      .run();
    const late = await editor.post(`/api/runs/${r.body.id}/restore`);
    assert.equal(late.status, 409);
    assert.equal(late.body.error.code, "undo_expired");
    purgeDeleted(t.ctx, Date.now() + 8 * day);
    assert.equal(t.ctx.db.select().from(schema.runs).all().length, 0);
  } finally {
    await t.close();
  }
});
