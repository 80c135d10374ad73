import { test } from "node:test";
import assert from "node:assert/strict";
import { makeTestContext, signIn } from "@/tests/helpers/test-app";
import { realQueue, sweepBase } from "@/tests/helpers/run-helpers";
import { SweepDetailSchema, SweepListPageSchema } from "@/shared/schemas/api-runs";
import { REGIME_LABEL_VALUES } from "@/shared/schemas/regime";
import { schema } from "@/db/client";
import { eq } from "drizzle-orm";

async function waitSweep(agent: any, id: string, timeoutMs = 180_000) {
  const t0 = Date.now();
  for (;;) {
    const r = await agent.get(`/api/sweeps/${id}`);
    assert.equal(r.status, 200);
    if (!["queued", "running"].includes(r.body.status)) return r.body;
    if (Date.now() - t0 > timeoutMs) throw new Error("sweep timed out");
    await new Promise((res) => setTimeout(res, 150));
  }
}

test("a one-parameter sweep computes every point with its own seed and stores per-point figures", async () => {
  const t = await makeTestContext({ queue: realQueue(1) });
  try {
    const editor = await signIn(t.app, "editor@example.org");
    const labId = t.demoLab!.id;
    const base = sweepBase({ replicates: 100, seed: "sweep-seed" });
    const r = await editor.post(`/api/labs/${labId}/sweeps`).send({
      name: "hold strength",
      base,
      axes: [{ parameter: "K(makeZ,hldB)", grid: { from: 25, to: 400, count: 3, scale: "log" } }],
    });
    assert.equal(r.status, 201, JSON.stringify(r.body));
    assert.equal(r.body.pointCount, 3);
    assert.deepEqual(
      r.body.axes[0].values.map((v: number) => Math.round(v)),
      [25, 100, 400],
    );
    const done = await waitSweep(editor, r.body.id);
    assert.equal(done.status, "finished");
    SweepDetailSchema.parse(done);
    SweepListPageSchema.parse((await editor.get(`/api/labs/${labId}/sweeps`)).body);
    assert.equal(done.points.length, 3);
    for (const p of done.points) assert.ok(p.figures, "figures stored for each point");
    // behaviour labels stored for each point (docs/regimes.md): the hold circuit filters the 5 min pulses
    // at the defaults (K = 100) in both models
    for (const p of done.points) {
      assert.ok(REGIME_LABEL_VALUES.includes(p.regime.deterministic), JSON.stringify(p.regime));
      assert.ok(REGIME_LABEL_VALUES.includes(p.regime.stochastic), JSON.stringify(p.regime));
    }
    assert.equal(done.points[1].regime.stochastic, "persistence filter");
    // A larger half-max for the hold factor makes passing harder: the 60-min pass probability does not rise.
    const pass60 = done.points.map((p: any) => p.figures.passByDuration["60"]);
    assert.ok(pass60[0] >= pass60[2], `pass at 60 min by point: ${pass60}`);
    // each point has its own derived seed
    const seeds = await Promise.all(
      done.points.map(async (p: any) => (await editor.get(`/api/runs/${p.runId}`)).body.seed),
    );
    assert.deepEqual(seeds, ["sweep-seed.p0", "sweep-seed.p1", "sweep-seed.p2"]);
    // sweep points are not in the run list by default
    assert.equal((await editor.get(`/api/labs/${labId}/runs`)).body.items.length, 0);
  } finally {
    await t.close();
  }
});

test("a cancelled sweep resumes and finishes; bad axes get a 400 naming the field", async () => {
  const t = await makeTestContext({ queue: realQueue(1) });
  try {
    const editor = await signIn(t.app, "editor@example.org");
    const labId = t.demoLab!.id;
    const baseBody = sweepBase({ replicates: 100 });
    const bad = await editor
      .post(`/api/labs/${labId}/sweeps`)
      .send({ name: "x", base: baseBody, axes: [{ parameter: "K(noSuch,hldB)", values: [1, 2] }] });
    assert.equal(bad.status, 400);
    assert.equal(bad.body.error.fields[0].path, "axes.0.parameter");
    const r = await editor.post(`/api/labs/${labId}/sweeps`).send({
      name: "two axes",
      base: baseBody,
      axes: [
        { parameter: "rate(makeZ)", values: [10, 20] },
        { parameter: "rate(degY)", values: [0.05, 0.1] },
      ],
    });
    assert.equal(r.status, 201, JSON.stringify(r.body));
    assert.equal(r.body.pointCount, 4);
    await editor.post(`/api/sweeps/${r.body.id}/cancel`).expect(200);
    const cancelled = (await editor.get(`/api/sweeps/${r.body.id}`)).body;
    assert.equal(cancelled.status, "cancelled");
    const notDeleted = await editor.post(`/api/sweeps/${r.body.id}/restore`);
    assert.equal(notDeleted.status, 409, "only a deleted sweep can be restored");
    await editor.post(`/api/sweeps/${r.body.id}/resume`).expect(200);
    const done = await waitSweep(editor, r.body.id);
    assert.equal(done.status, "finished");
    assert.ok(done.points.every((p: any) => p.status === "finished"));
    // Delete hides the sweep and its points; a second delete is a 409; restore brings both back.
    await editor.delete(`/api/sweeps/${r.body.id}`).expect(200);
    assert.equal((await editor.delete(`/api/sweeps/${r.body.id}`)).status, 409);
    assert.equal((await editor.get(`/api/labs/${labId}/sweeps`)).body.items.length, 0);
    assert.equal((await editor.get(`/api/labs/${labId}/runs?sweepPoints=1`)).body.items.length, 0);
    await editor.post(`/api/sweeps/${r.body.id}/restore`).expect(200);
    assert.equal((await editor.get(`/api/labs/${labId}/sweeps`)).body.items.length, 1);
    assert.equal((await editor.get(`/api/labs/${labId}/runs?sweepPoints=1`)).body.items.length, 4);
  } finally {
    await t.close();
  }
});

test("the sweep list counts finished points apart from every ended one (pointsFinished, pointsDone)", async () => {
  // the idle queue computes nothing: the points' statuses are set by hand
  const t = await makeTestContext();
  try {
    const editor = await signIn(t.app, "editor@example.org");
    const labId = t.demoLab!.id;
    const baseBody = sweepBase({ replicates: 100 });
    const launch = async (name: string, values: number[]) => {
      const r = await editor
        .post(`/api/labs/${labId}/sweeps`)
        .send({ name, base: baseBody, axes: [{ parameter: "rate(makeZ)", values }] });
      assert.equal(r.status, 201, JSON.stringify(r.body));
      return r.body as { id: string; points: { index: number; runId: string }[] };
    };
    const mixed = await launch("mixed points", [10, 20, 30, 40, 50]);
    const untouched = await launch("untouched", [10, 20]);
    const statuses = ["finished", "capped", "cancelled", "failed", "queued"] as const;
    for (const p of mixed.points)
      t.ctx.db.update(schema.runs).set({ status: statuses[p.index] }).where(eq(schema.runs.id, p.runId)).run();
    t.ctx.db.update(schema.sweeps).set({ status: "cancelled" }).where(eq(schema.sweeps.id, mixed.id)).run();

    const r = await editor.get(`/api/labs/${labId}/sweeps`).expect(200);
    const page = SweepListPageSchema.parse(r.body);
    const byId = new Map(page.items.map((s) => [s.id, s]));
    // finished and capped points finished; cancelled and failed ones ended without finishing; the queued one did not end
    assert.deepEqual(
      (({ pointCount, pointsDone, pointsFinished }) => ({ pointCount, pointsDone, pointsFinished }))(
        byId.get(mixed.id)!,
      ),
      { pointCount: 5, pointsDone: 4, pointsFinished: 2 },
    );
    // a sweep none of whose points ended has zeros, not the other sweep's counts
    assert.equal(byId.get(untouched.id)!.pointsDone, 0);
    assert.equal(byId.get(untouched.id)!.pointsFinished, 0);
    // the detail agrees: its finished points are the list's pointsFinished
    const detail = SweepDetailSchema.parse((await editor.get(`/api/sweeps/${mixed.id}`)).body);
    assert.equal(detail.pointsDone, 4);
    assert.equal(detail.points.filter((p) => p.status === "finished" || p.status === "capped").length, 2);
  } finally {
    await t.close();
  }
});
