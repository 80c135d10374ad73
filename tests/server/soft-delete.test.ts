/**
 * A soft-deleted run, sweep, regime map or trace set answers 404 on every route of the route table that names it, except delete
 * (409: already deleted) and restore, until it is purged; compare refuses a deleted run the same way.
 * The walk reads the route table, so a route added later is covered automatically.
 */
import { test, before, after } from "node:test";
import assert from "node:assert/strict";
import { makeTestContext, signIn, type TestApp } from "@/tests/helpers/test-app";
import { launchBody, shortLadder } from "@/tests/helpers/run-helpers";
import { allRoutes } from "@/server/routes";
import { seedDemoTraces } from "@/server/demo/traces";
import { purgeDeleted } from "@/server/services/runs.service";
import { API_LIMITS } from "@/shared/schemas/api-runs";
import { mutualRepression } from "@/tests/sim/regimes/circuits";

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

async function walk(prefix: "/runs/:id" | "/sweeps/:id" | "/traces/:id" | "/regime-maps/:id", id: string) {
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

test("a deleted regime map leaves its lab's list, is 404 everywhere but delete and restore, and is purged after the undo period", async () => {
  const viewer = await signIn(t.app, "viewer@example.org");
  const made = await editor.post(`/api/labs/${labId}/regime-maps`).send({
    name: "map to delete",
    base: {
      circuit: mutualRepression(1),
      program: shortLadder,
      inputSignal: "S",
      settings: { endTimeMinutes: 100, gridStepMinutes: 1, replicates: 10, seed: "del-1", systemSize: 100 },
    },
    axes: [{ parameter: "rate(make_u)", values: [1.5, 3] }],
  });
  assert.equal(made.status, 201, JSON.stringify(made.body));
  const id: string = made.body.id;
  const listed = async () =>
    ((await editor.get(`/api/labs/${labId}/regime-maps`).expect(200)).body.items as { id: string }[]).map((m) => m.id);
  assert.ok((await listed()).includes(id));
  assert.equal((await viewer.delete(`/api/regime-maps/${id}`)).status, 403, "a viewer cannot delete");
  const del = await editor.delete(`/api/regime-maps/${id}`).expect(200);
  assert.deepEqual(del.body, { deleted: true, undo: `/api/regime-maps/${id}/restore` });
  assert.ok(!(await listed()).includes(id), "a deleted map leaves the list");
  const checked = await walk("/regime-maps/:id", id);
  for (const must of ["get /regime-maps/:id", "post /regime-maps/:id/refine", "post /regime-maps/:id/target"])
    assert.ok(checked.includes(must), `${must} walked (${checked.join(", ")})`);
  assert.equal((await editor.delete(`/api/regime-maps/${id}`)).status, 409, "second delete");
  const back = await editor.post(`/api/regime-maps/${id}/restore`).expect(200);
  assert.equal(back.body.id, id);
  assert.equal(back.body.points.length, 2, "restored with its points");
  assert.ok((await listed()).includes(id));
  assert.equal((await editor.post(`/api/regime-maps/${id}/restore`)).status, 409, "restore of a map not deleted");
  const owner = await signIn(t.app, "owner@example.org");
  const audit = await owner.get(`/api/labs/${labId}/audit`).expect(200);
  const actions = (audit.body.items as { action: string; targetId: string }[])
    .filter((e) => e.targetId === id)
    .map((e) => e.action);
  for (const a of ["regime-map.computed", "regime-map.deleted", "regime-map.restored"])
    assert.ok(actions.includes(a), `${a} in the audit trail (${actions.join(", ")})`);

  // purged only once the undo period has passed
  await editor.delete(`/api/regime-maps/${id}`).expect(200);
  const day = 86400_000;
  purgeDeleted(t.ctx, Date.now() + (API_LIMITS.undoDays - 1) * day);
  await editor.post(`/api/regime-maps/${id}/restore`).expect(200);
  await editor.delete(`/api/regime-maps/${id}`).expect(200);
  purgeDeleted(t.ctx, Date.now() + (API_LIMITS.undoDays + 1) * day);
  assert.equal((await editor.post(`/api/regime-maps/${id}/restore`)).status, 404, "purged: nothing to restore");
});
