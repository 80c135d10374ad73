/**
 * The run list keeps the figures it takes from a run's JSON columns (circuit name, program kind, headline)
 * per run and reuses them only while the run's stamp (finished time, stats hash, summary length) is the same
 * (server/services/runs.service.ts, listJsonOf). Every change of the stored summary must show at once.
 */
import { describe, test, before, after } from "node:test";
import assert from "node:assert/strict";
import { eq } from "drizzle-orm";
import { makeTestContext, signIn, type TestApp } from "@/tests/helpers/test-app";
import { launchBody } from "@/tests/helpers/run-helpers";
import { schema } from "@/db/client";

const summaryWith = (d50: number, extra = "") =>
  ({
    d50,
    falsePassRate: 0.25,
    delay: { median: 4 },
    byDuration: [{ duration: 60, passProbability: 0.75 }],
    note: extra,
  }) as any;

describe("run list: cached JSON figures follow the stored run", () => {
  let t: TestApp;
  let editor: Awaited<ReturnType<typeof signIn>>;
  let labId: string;
  let id: string;

  const listed = async () => {
    const items = (await editor.get(`/api/labs/${labId}/runs?limit=200`).expect(200)).body.items;
    const byIds = (await editor.get(`/api/labs/${labId}/runs?ids=${id}`).expect(200)).body.items;
    const item = items.find((i: { id: string }) => i.id === id);
    // The by-id lookup reads through the same cache and must agree with the page.
    assert.deepEqual(byIds, [item]);
    return item;
  };
  const setRun = (values: Partial<typeof schema.runs.$inferInsert>) =>
    t.ctx.db.update(schema.runs).set(values).where(eq(schema.runs.id, id)).run();

  before(async () => {
    t = await makeTestContext();
    editor = await signIn(t.app, "editor@example.org");
    labId = t.demoLab!.id;
    const r = await editor.post(`/api/labs/${labId}/runs`).send(launchBody({ replicates: 100, seed: "cache" }));
    assert.equal(r.status, 201, JSON.stringify(r.body));
    id = r.body.id;
  });
  after(async () => t.close());

  test("no summary, then a summary, then a new summary with a new finished time", async () => {
    assert.equal((await listed()).headline, null);
    const finished = new Date(Date.UTC(2026, 0, 1));
    setRun({ status: "finished", finishedAt: finished, statsHash: "h1", summary: summaryWith(10) });
    assert.equal((await listed()).headline?.d50, 10);
    // Asked again: the same figures (from the cache).
    assert.equal((await listed()).headline?.d50, 10);
    // Re-run (a resumed sweep point): new finished time and hash, a summary of the same length.
    setRun({ finishedAt: new Date(finished.getTime() + 1000), statsHash: "h2", summary: summaryWith(20) });
    const item = await listed();
    assert.deepEqual(item.headline, {
      d50: 20,
      falsePassRate: 0.25,
      medianDelay: 4,
      longestDuration: 60,
      passAtLongest: 0.75,
    });
  });

  test("a summary rewritten with the same finished time and hash but another length", async () => {
    setRun({ summary: summaryWith(30, "longer note") });
    assert.equal((await listed()).headline?.d50, 30);
  });

  test("a summary removed (queued again) shows no headline", async () => {
    setRun({ status: "queued", finishedAt: null, statsHash: null, summary: null });
    assert.equal((await listed()).headline, null);
  });
});
