/**
 * Behaviour labels are computed at finalisation and stored with every run and
 * sweep point (docs/regimes.md), on the real worker pool and a real SQLite file.
 */
import { test } from "node:test";
import assert from "node:assert/strict";
import { makeTestContext, signIn } from "@/tests/helpers/test-app";
import { launchBody, realQueue, waitForRun } from "@/tests/helpers/run-helpers";
import { RunDetailSchema } from "@/shared/schemas/api-runs";
import { CircuitDetailResponseSchema } from "@/shared/schemas/api-circuits";

test("a finished run carries both labels with their evidence; the C1-FFL AND on 5 and 60 min pulses is a persistence filter in both", async () => {
  const t = await makeTestContext({ queue: realQueue(1) });
  try {
    const editor = await signIn(t.app, "editor@example.org");
    const lab = t.demoLab!.id;
    const made = await editor
      .post(`/api/labs/${lab}/circuits`)
      .send({ name: "Hold for labels", template: "c1ffl-and" });
    assert.equal(made.status, 201, JSON.stringify(made.body));
    const circuitId = made.body.circuit.id as string;
    const before = CircuitDetailResponseSchema.parse((await editor.get(`/api/circuits/${circuitId}`)).body);
    assert.deepEqual(before.behaviour, []);
    const { circuit: _body, ...body } = launchBody({ replicates: 100, seed: "rg-1" });
    void _body;
    const r = await editor.post(`/api/labs/${lab}/runs`).send({ ...body, circuitId });
    assert.equal(r.status, 201, JSON.stringify(r.body));
    const done = RunDetailSchema.parse(await waitForRun(editor, r.body.id));
    assert.equal(done.status, "finished");
    assert.ok(done.regime, "regime stored");
    // persistence detection (Mangan, Zaslaver & Alon 2003, J Mol Biol 334:197, from memory): the 5 min pulses rarely pass, the 60 min ones almost always
    assert.equal(done.regime.deterministic.label, "persistence filter", JSON.stringify(done.regime.deterministic));
    assert.equal(done.regime.stochastic.label, "persistence filter", JSON.stringify(done.regime.stochastic));
    assert.deepEqual(done.regime.stochastic.evidence.durationsMinutes, [5, 60]);
    const row = t.ctx.sqlite
      .prepare("select regime_deterministic d, regime_stochastic s from runs where id = ?")
      .get(r.body.id);
    assert.deepEqual(row, { d: "persistence filter", s: "persistence filter" });
    // the circuit page's wiring-versus-behaviour data: its latest run's labels
    const after = CircuitDetailResponseSchema.parse((await editor.get(`/api/circuits/${circuitId}`)).body);
    assert.equal(after.behaviour?.length, 1);
    assert.equal(after.behaviour![0].runId, r.body.id);
    assert.equal(after.behaviour![0].regime.stochastic.label, "persistence filter");
    assert.equal(after.feedForward?.label, "coherent type 1");
  } finally {
    await t.close();
  }
});
