/**
 * Deterministic-only regime maps, boundary refinement and design targets
 * through the API (docs/regimes.md), on a real SQLite file, the real compute
 * thread and, for sweeps, the real worker pool.
 */
import { test } from "node:test";
import assert from "node:assert/strict";
import { makeTestContext, signIn } from "@/tests/helpers/test-app";
import { launchBody, realQueue, shortLadder, waitForRun } from "@/tests/helpers/run-helpers";
import { RegimeMapDetailSchema, RegimeMapListPageSchema, TargetAnswerSchema } from "@/shared/schemas/api-regime-maps";
import { SweepDetailSchema } from "@/shared/schemas/api-runs";
import { RunSpecSchema } from "@/shared/schemas/run-spec";
import { refinementSeed } from "@/sim/regimes/refine-map";
import { wilson } from "@/sim/stats/wilson-interval";
import compute from "@/server/compute/compute-worker";
import { mutualRepression } from "@/tests/sim/regimes/circuits";

const grid = [1.5, 1.9, 2.1, 3];
const mapBody = (name = "switch map") => ({
  name,
  base: {
    circuit: mutualRepression(1),
    program: shortLadder,
    inputSignal: "S",
    settings: { endTimeMinutes: 300, gridStepMinutes: 1, replicates: 10, seed: "map-1", systemSize: 100 },
  },
  axes: [
    { parameter: "rate(make_u)", values: grid },
    { parameter: "rate(make_v)", values: grid },
  ],
});

test("a deterministic map of mutual repression is memory on the diagonal exactly above a = 2 (Cherry & Adler 2000, J Theor Biol 203:117); refinement adds midpoints once, then answers 409", async () => {
  const t = await makeTestContext();
  try {
    const editor = await signIn(t.app, "editor@example.org");
    const viewer = await signIn(t.app, "viewer@example.org");
    const lab = t.demoLab!.id;
    const r = await editor.post(`/api/labs/${lab}/regime-maps`).send(mapBody());
    assert.equal(r.status, 201, JSON.stringify(r.body));
    const map = RegimeMapDetailSchema.parse(r.body);
    assert.equal(map.gridPoints, 16);
    assert.equal(map.refinedPoints, 0);
    assert.equal(map.refinementCap, 200);
    const diag = grid.map((_, i) => map.points[i * grid.length + i].verdict.label);
    // 1.9 and 2.1 are 5% either side of the boundary a = 2
    assert.deepEqual(
      diag.map((l) => l === "memory"),
      [false, false, true, true],
      JSON.stringify(diag),
    );
    assert.ok(map.computeSeconds > 0);
    // the list and the detail, for a viewer
    const list = RegimeMapListPageSchema.parse((await viewer.get(`/api/labs/${lab}/regime-maps`)).body);
    assert.deepEqual(
      list.items.map((m) => m.id),
      [map.id],
    );
    assert.equal((await viewer.get(`/api/regime-maps/${map.id}`)).status, 200);
    // a viewer cannot refine
    assert.equal((await viewer.post(`/api/regime-maps/${map.id}/refine`)).status, 403);
    const ref = await editor.post(`/api/regime-maps/${map.id}/refine`);
    assert.equal(ref.status, 200, JSON.stringify(ref.body));
    const refined = RegimeMapDetailSchema.parse(ref.body);
    assert.ok(refined.refinedPoints > 0);
    const added = refined.points.slice(16);
    assert.ok(added.every((p) => p.refined));
    // every added point lies on a grid row and between two grid columns, or the reverse
    const onGrid = (v: number) => grid.some((g) => Math.abs(g - v) < 1e-12);
    for (const p of added) {
      const [u, v] = [p.values["rate(make_u)"], p.values["rate(make_v)"]];
      assert.ok(onGrid(u) !== onGrid(v), JSON.stringify(p.values));
    }
    // the diagonal midpoint between 1.9 and 2.1 on the v axis at u = 2.1... labelled, with evidence
    assert.ok(added.every((p) => typeof p.verdict.label === "string"));
    // resumable and not repeated: every boundary of the grid is refined now
    const again = await editor.post(`/api/regime-maps/${map.id}/refine`);
    assert.equal(again.status, 409, JSON.stringify(again.body));
    assert.equal(again.body.error.code, "nothing_to_refine");
    // a target on the map: no oscillation anywhere, so nothing meets "sustained oscillation 60-120 min"
    const tgt = await viewer
      .post(`/api/regime-maps/${map.id}/target`)
      .send({ oscillation: { minMinutes: 60, maxMinutes: 120 } });
    assert.equal(tgt.status, 200, JSON.stringify(tgt.body));
    const answer = TargetAnswerSchema.parse(tgt.body);
    assert.equal(answer.meeting, 0);
    assert.equal(answer.points.length, refined.points.length);
    assert.equal(answer.points[0].limits[0].reason, "not a sustained oscillation");
    // bad input: a clear 400 naming the field
    const bad = await viewer
      .post(`/api/regime-maps/${map.id}/target`)
      .send({ oscillation: { minMinutes: 120, maxMinutes: 60 } });
    assert.equal(bad.status, 400);
    assert.match(JSON.stringify(bad.body.error.fields), /oscillation/);
    const empty = await viewer.post(`/api/regime-maps/${map.id}/target`).send({});
    assert.equal(empty.status, 400);
    const tooMany = await editor.post(`/api/labs/${lab}/regime-maps`).send({
      ...mapBody("too big"),
      axes: [
        { parameter: "rate(make_u)", grid: { from: 1, to: 3, count: 21 } },
        { parameter: "rate(make_v)", grid: { from: 1, to: 3, count: 20 } },
      ],
    });
    assert.equal(tooMany.status, 400);
    assert.match(tooMany.body.error.message, /420 points; the limit is 400/);
  } finally {
    await t.close();
  }
});

test("a map part past the compute budget is a 422 (too_stiff), not a label", () => {
  const spec = RunSpecSchema.parse({
    circuit: mutualRepression(3),
    program: shortLadder,
    inputSignal: "S",
    endTimeMinutes: 300,
    gridStepMinutes: 1,
    replicates: 10,
    seed: "m",
    systemSize: 100,
  });
  const answer = compute({ job: { kind: "regimeMap", specs: [spec] }, wallMs: 60_000, maxSteps: 1 });
  assert.equal(!answer.ok && answer.status, 422, JSON.stringify(answer));
  const ok = compute({ job: { kind: "regimeMap", specs: [spec] }, wallMs: 60_000, maxSteps: 2_000_000 });
  assert.ok(ok.ok, JSON.stringify(ok));
  assert.equal((ok.value as { label: string }[])[0].label, "memory");
});

test("design target on a sweep with cell-to-cell variation: margins from the point's own figures and the fraction of cells with its Wilson interval (Wilson 1927, J Am Stat Assoc 22:209); refinement seeds by coordinates", async () => {
  const t = await makeTestContext({ queue: realQueue(1) });
  try {
    const editor = await signIn(t.app, "editor@example.org");
    const lab = t.demoLab!.id;
    const base = launchBody({ replicates: 40, seed: "tgt-1" });
    const { name: _n, ...inputs } = base;
    void _n;
    const r = await editor.post(`/api/labs/${lab}/sweeps`).send({
      name: "target sweep",
      base: { ...inputs, settings: { ...inputs.settings, extrinsic: [{ parameter: "rate(makeX)", cv: 0.3 }] } },
      axes: [{ parameter: "rate(makeX)", values: [5, 20] }],
    });
    assert.equal(r.status, 201, JSON.stringify(r.body));
    const sweep = SweepDetailSchema.parse(r.body);
    for (const p of sweep.points) await waitForRun(editor, p.runId);
    const target = { pass: { minProbability: 0.5, atMinutes: 60 }, falsePass: { maxRate: 0.2, belowMinutes: 10 } };
    const a = await editor.post(`/api/sweeps/${sweep.id}/target`).send(target);
    assert.equal(a.status, 200, JSON.stringify(a.body));
    const answer = TargetAnswerSchema.parse(a.body);
    const detail = SweepDetailSchema.parse((await editor.get(`/api/sweeps/${sweep.id}`)).body);
    for (const p of answer.points) {
      const d = detail.points.find((x) => x.index === p.index)!;
      const pass = p.limits.find((l) => l.limit === "pass")!;
      // margin = pass probability at 60 min - 0.5, from the point's own figure
      assert.ok(Math.abs(pass.margin! - (d.figures!.passByDuration["60"]! - 0.5)) < 1e-12);
      const fp = p.limits.find((l) => l.limit === "falsePass")!;
      assert.ok(Math.abs(fp.margin! - (0.2 - d.figures!.falsePassRate!)) < 1e-12);
      assert.equal(p.meets, pass.meets && fp.meets);
      // the fraction of cells: 40 replicates of their own, its interval the Wilson interval of k of 40
      assert.ok(p.fraction, p.fractionReason ?? "");
      assert.equal(p.fraction!.replicates, 40);
      const k = Math.round(p.fraction!.fraction * 40);
      const [lo, hi] = wilson(k, 40);
      assert.ok(Math.abs(p.fraction!.low - lo) < 1e-12 && Math.abs(p.fraction!.high - hi) < 1e-12);
    }
    // a target every cell meets: fraction 1, Wilson lower end 40 / (40 + 1.96^2) = 0.912
    const all = TargetAnswerSchema.parse(
      (await editor.post(`/api/sweeps/${sweep.id}/target`).send({ pass: { minProbability: 0, atMinutes: 60 } })).body,
    );
    for (const p of all.points) {
      assert.equal(p.fraction!.fraction, 1);
      assert.ok(Math.abs(p.fraction!.low - 40 / (40 + 1.959963984540054 ** 2)) < 1e-9);
    }
    // refinement: make the two points' labels differ, then one point is added between them, seeded by its coordinates
    const ids = detail.points.map((p) => p.runId);
    t.ctx.sqlite.prepare("update runs set regime_stochastic = 'silent' where id = ?").run(ids[0]);
    t.ctx.sqlite.prepare("update runs set regime_stochastic = 'follower' where id = ?").run(ids[1]);
    const ref = await editor.post(`/api/sweeps/${sweep.id}/refine`);
    assert.equal(ref.status, 200, JSON.stringify(ref.body));
    const refined = SweepDetailSchema.parse(ref.body);
    assert.equal(refined.pointCount, 3);
    const extra = refined.points.find((p) => p.refined)!;
    assert.equal(extra.index, 2);
    assert.ok(Math.abs(extra.values["rate(makeX)"] - 12.5) < 1e-12, "arithmetic midpoint of a two-value axis");
    const run = (await editor.get(`/api/runs/${extra.runId}`)).body;
    assert.equal(run.spec.seed, refinementSeed("tgt-1", { "rate(makeX)": 12.5 }));
    const again = await editor.post(`/api/sweeps/${sweep.id}/refine`);
    assert.equal(again.status, 409, JSON.stringify(again.body));
    await waitForRun(editor, extra.runId);
  } finally {
    await t.close();
  }
});
