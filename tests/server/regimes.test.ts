/**
 * Behaviour labels are computed at finalisation and stored with every run and
 * sweep point (docs/regimes.md), on the real worker pool and a real SQLite file.
 */
import { test } from "node:test";
import assert from "node:assert/strict";
import { makeTestContext, signIn } from "@/tests/helpers/test-app";
import { launchBody, realQueue, waitForRun } from "@/tests/helpers/run-helpers";
import { RunDetailSchema } from "@/shared/schemas/api-runs";

test("a finished run carries both labels with their evidence; the C1-FFL AND on 5 and 60 min pulses is a persistence filter in both", async () => {
  const t = await makeTestContext({ queue: realQueue(1) });
  try {
    const editor = await signIn(t.app, "editor@example.org");
    const r = await editor.post(`/api/labs/${t.demoLab!.id}/runs`).send(launchBody({ replicates: 100, seed: "rg-1" }));
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
  } finally {
    await t.close();
  }
});
