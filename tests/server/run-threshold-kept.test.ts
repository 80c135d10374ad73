/**
 * Read routes show a stored run's threshold (detail, series, comparisons), resolved on the event loop under a
 * small ODE budget (server/services/runs.service.ts, thresholdOnLoop). A run's spec never changes, so the
 * solve is done once per run and kept: asking again for the same run repeats no ODE work, and the figures
 * are the same.
 */
import { describe, test, before, after } from "node:test";
import assert from "node:assert/strict";
import { makeTestContext, signIn, type TestApp } from "@/tests/helpers/test-app";
import { launchBody } from "@/tests/helpers/run-helpers";
import { thresholdSolveCount } from "@/server/services/runs.service";

describe("a stored run's threshold is solved once for its read routes", () => {
  let t: TestApp;
  let editor: Awaited<ReturnType<typeof signIn>>;
  let labId: string;

  before(async () => {
    t = await makeTestContext();
    editor = await signIn(t.app, "editor@example.org");
    labId = t.demoLab!.id;
  });
  after(async () => t.close());

  const launch = async (seed: string) => {
    const r = await editor.post(`/api/labs/${labId}/runs`).send(launchBody({ replicates: 100, seed }));
    assert.equal(r.status, 201, JSON.stringify(r.body));
    return r.body.id as string;
  };

  test("detail twice and the series: one solve, the same threshold each time; another run solves its own", async () => {
    const before = thresholdSolveCount();
    const id = await launch("kept-1"); // the launch answers with the run's detail
    const first = (await editor.get(`/api/runs/${id}`).expect(200)).body;
    assert.equal(thresholdSolveCount(), before + 1, "the launch's answer and the first read solve it once");
    assert.ok(first.threshold && Number.isFinite(first.threshold.theta), JSON.stringify(first.threshold));
    const again = (await editor.get(`/api/runs/${id}`).expect(200)).body;
    const series = (await editor.get(`/api/runs/${id}/series`).expect(200)).body;
    assert.equal(thresholdSolveCount(), before + 1, "later reads of the same run reuse it");
    assert.deepEqual(again.threshold, first.threshold);
    assert.equal(series.threshold.theta, first.threshold.theta);

    const other = await launch("kept-2");
    assert.equal(thresholdSolveCount(), before + 2, "a different run is solved for itself");
    await editor.get(`/api/runs/${other}`).expect(200);
    assert.equal(thresholdSolveCount(), before + 2);
  });
});
