/**
 * A soft-deleted run, sweep or trace set answers 404 on every route of the route table that names it, except delete
 * (409: already deleted) and restore, until it is purged; compare refuses a deleted run the same way.
 * The walk reads the route table, so a route added later is covered automatically.
 */
import { test, before, after } from "node:test";
import assert from "node:assert/strict";
import { makeTestContext, signIn, type TestApp } from "@/tests/helpers/test-app";
import { launchBody } from "@/tests/helpers/run-helpers";
import { allRoutes } from "@/server/routes";
import { seedDemoTraces } from "@/server/demo/traces";

let t: TestApp;
let editor: Awaited<ReturnType<typeof signIn>>;
let labId: string;

before(async () => {
  t = await makeTestContext();
  editor = await signIn(t.app, "editor@example.org");
  labId = t.demoLab!.id;
});
after(async () => {
  await t.close();
});

async function walk(prefix: "/runs/:id" | "/sweeps/:id" | "/traces/:id", id: string) {
  const routes = allRoutes.filter(
    (r) => (r.path === prefix || r.path.startsWith(prefix + "/")) && !(r.method === "delete" && r.path === prefix),
  );
  const checked: string[] = [];
  for (const r of routes) {
    if (r.path.endsWith("/restore")) continue;
    const url = "/api" + r.path.replace(":id", id);
    const res = await editor[r.method](url).send(r.method === "get" ? undefined : {});
    assert.equal(res.status, 404, `${r.method.toUpperCase()} ${r.path} on a deleted object: ${res.status}`);
    checked.push(`${r.method} ${r.path}`);
  }
  return checked;
}

test("a deleted run is 404 everywhere but delete and restore; restore brings it back", async () => {
  const r = await editor.post(`/api/labs/${labId}/runs`).send(launchBody({ replicates: 10 }));
  assert.equal(r.status, 201, JSON.stringify(r.body));
  const id = r.body.id;
  await editor.get(`/api/runs/${id}`).expect(200);
  await editor.delete(`/api/runs/${id}`).expect(200);
  const checked = await walk("/runs/:id", id);
  for (const must of ["get /runs/:id", "post /runs/:id/reproduce", "get /runs/:id/export/replicates.csv"])
    assert.ok(checked.includes(must), `${must} walked (${checked.join(", ")})`);
  const cmp = await editor.post(`/api/labs/${labId}/compare`).send({ runIds: [id, id + "x"] });
  assert.equal(cmp.status, 404);
  assert.match(cmp.body.error.message, new RegExp(id));
  assert.equal((await editor.delete(`/api/runs/${id}`)).status, 409, "second delete");
  await editor.post(`/api/runs/${id}/restore`).expect(200);
  await editor.get(`/api/runs/${id}`).expect(200);
});

test("a deleted sweep (and its point runs) is 404 everywhere but delete and restore", async () => {
  const base = launchBody({ replicates: 10 });
  const s = await editor.post(`/api/labs/${labId}/sweeps`).send({
    name: "to delete",
    base: { circuit: base.circuit, program: base.program, inputSignal: base.inputSignal, settings: base.settings },
    axes: [{ parameter: "rate(makeZ)", values: [10, 20] }],
  });
  assert.equal(s.status, 201, JSON.stringify(s.body));
  const detail = await editor.get(`/api/sweeps/${s.body.id}`).expect(200);
  const pointRun = detail.body.points[0].runId;
  await editor.delete(`/api/sweeps/${s.body.id}`).expect(200);
  await walk("/sweeps/:id", s.body.id);
  assert.equal((await editor.get(`/api/runs/${pointRun}`)).status, 404, "a deleted sweep's point run");
  await editor.post(`/api/sweeps/${s.body.id}/restore`).expect(200);
  await editor.get(`/api/sweeps/${s.body.id}`).expect(200);
  await editor.get(`/api/runs/${pointRun}`).expect(200);
});

test("a deleted trace set is 404 everywhere but delete and restore; every resource answers delete alike", async () => {
  seedDemoTraces(t.ctx, t.demoLab!);
  const list = await editor.get(`/api/labs/${labId}/traces`).expect(200);
  const items = list.body.traceSets ?? list.body.items;
  assert.ok(items.length > 0, "the demo trace set was seeded");
  const id = items[0].id;
  const del = await editor.delete(`/api/traces/${id}`).expect(200);
  assert.deepEqual(del.body, { deleted: true, undo: `/api/traces/${id}/restore` });
  const checked = await walk("/traces/:id", id);
  assert.ok(checked.includes("get /traces/:id"), checked.join(", "));
  assert.equal((await editor.delete(`/api/traces/${id}`)).status, 409, "second delete");
  await editor.post(`/api/traces/${id}/restore`).expect(200);
  assert.equal((await editor.post(`/api/traces/${id}/restore`)).status, 409, "restore of a set that is not deleted");
  await editor.get(`/api/traces/${id}`).expect(200);
  // the run's answer has the same shape
  const r = await editor.post(`/api/labs/${labId}/runs`).send(launchBody({ replicates: 10 }));
  const runDel = await editor.delete(`/api/runs/${r.body.id}`).expect(200);
  assert.deepEqual(runDel.body, { deleted: true, undo: `/api/runs/${r.body.id}/restore` });
});
