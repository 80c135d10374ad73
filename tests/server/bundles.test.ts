import { test } from "node:test";
import assert from "node:assert/strict";
import { makeTestContext, signIn } from "@/tests/helpers/test-app";
import { launchBody, realQueue, waitForRun } from "@/tests/helpers/run-helpers";
import { schema } from "@/db/client";
import { eq } from "drizzle-orm";
import { statsHash } from "@/server/compute/run-store";
import { RunDetailSchema } from "@/shared/schemas/api-runs";
import { RunSettingsBlockSchema, type RunSettingsBlock } from "@/shared/schemas/analysis";

test("bundle export, import into another lab and verified reproduction", async () => {
  const t = await makeTestContext({ queue: realQueue(1) });
  try {
    const editor = await signIn(t.app, "editor@example.org");
    const labId = t.demoLab!.id;
    const r = await editor.post(`/api/labs/${labId}/runs`).send(launchBody({ replicates: 200, seed: "bundle-seed" }));
    const original = await waitForRun(editor, r.body.id);
    const b = await editor.get(`/api/runs/${r.body.id}/export/bundle.json`);
    assert.equal(b.status, 200);
    assert.match(b.headers["content-disposition"], /attachment; filename=".*-bundle\.json"/);
    const bundle = JSON.parse(b.text);
    assert.equal(bundle.format, "linger-run-bundle");
    assert.equal(bundle.spec.seed, "bundle-seed");
    assert.match(original.statsHash, /^v2:[0-9a-f]{64}$/);
    assert.equal(bundle.statsHash, original.statsHash);
    assert.equal(bundle.runtime.node, process.versions.node);
    assert.ok(bundle.runtime.v8);
    assert.ok(bundle.engineVersion);
    // for readers: the settings block and the method label travel with the bundle
    assert.equal(RunSettingsBlockSchema.parse(bundle.settings).seed, "bundle-seed");
    assert.equal(bundle.method.accuracy, "exact");

    // Another lab imports it (a member of that lab, who cannot see the original).
    const other = await signIn(t.app, "editor@example.org");
    const lab2 = await other.post(`/api/labs`).send({ name: "Second lab" });
    assert.equal(lab2.status, 201, JSON.stringify(lab2.body));
    const imp = await other.post(`/api/labs/${lab2.body.lab.id}/bundles/import`).send({ bundle });
    assert.equal(imp.status, 201, JSON.stringify(imp.body));
    const reproduced = await waitForRun(other, imp.body.id);
    assert.equal(reproduced.reproduction.identical, true, reproduced.reproduction.message);
    assert.equal(RunDetailSchema.parse(reproduced).reproduction?.identical, true);
    assert.equal(reproduced.reproduction.engineMatches, true);
    assert.equal(reproduced.statsHash, original.statsHash);

    // A bundle from before version 2 of the statistics hash (64 hex digits, the rows as text): the
    // reproduction is hashed the same way, from its rows as stored, so the two compare.
    const v1 = statsHash(t.ctx.db, r.body.id, 1);
    assert.match(v1, /^[0-9a-f]{64}$/);
    const imp1 = await other
      .post(`/api/labs/${lab2.body.lab.id}/bundles/import`)
      .send({ bundle: { ...bundle, statsHash: v1 } });
    assert.equal(imp1.status, 201, JSON.stringify(imp1.body));
    const reproducedV1 = await waitForRun(other, imp1.body.id);
    assert.equal(reproducedV1.statsHash, v1);
    assert.equal(reproducedV1.reproduction.identical, true, reproducedV1.reproduction.message);
    const wrongV1 = await other
      .post(`/api/labs/${lab2.body.lab.id}/bundles/import`)
      .send({ bundle: { ...bundle, statsHash: "f".repeat(64) } });
    const differsV1 = await waitForRun(other, wrongV1.body.id);
    assert.equal(differsV1.statsHash, v1, "a version 1 hash of the same rows");
    assert.equal(differsV1.reproduction.identical, false);

    // A tampered bundle (different seed, same expected hash) is reported as different.
    const tampered = { ...bundle, engineVersion: "linger-engine 0.9.0", spec: { ...bundle.spec, seed: "other-seed" } };
    const imp2 = await other.post(`/api/labs/${lab2.body.lab.id}/bundles/import`).send({ bundle: tampered });
    const differs = await waitForRun(other, imp2.body.id);
    assert.equal(differs.reproduction.identical, false);
    assert.match(differs.reproduction.message, /Differs/);
    assert.equal(differs.reproduction.engineMatches, false);
    assert.match(differs.reproduction.message, /linger-engine 0\.9\.0/);

    // Re-running inside the lab reports the first difference when there is one.
    t.ctx.db
      .update(schema.runs)
      .set({ expectedStatsHash: "0".repeat(64) })
      .where(eq(schema.runs.id, r.body.id))
      .run();
    const again = await editor.post(`/api/runs/${r.body.id}/reproduce`);
    assert.equal(again.status, 201);
    const rerun = await waitForRun(editor, again.body.id);
    assert.equal(rerun.reproduction.identical, true);

    // Bad bundles get a 400 naming the field; nothing is stored.
    const before = t.ctx.db.select().from(schema.runs).all().length;
    const bad = await other
      .post(`/api/labs/${lab2.body.lab.id}/bundles/import`)
      .send({ bundle: { ...bundle, format: "something-else" } });
    assert.equal(bad.status, 400);
    assert.match(bad.body.error.message, /format/);
    const bad2 = await other
      .post(`/api/labs/${lab2.body.lab.id}/bundles/import`)
      .send({ bundle: { ...bundle, spec: { ...bundle.spec, replicates: -1 } } });
    assert.equal(bad2.status, 400);
    assert.ok(
      bad2.body.error.fields.some((f: any) => f.path === "spec.replicates"),
      JSON.stringify(bad2.body.error),
    );
    assert.equal(t.ctx.db.select().from(schema.runs).all().length, before);
  } finally {
    await t.close();
  }
});

test("matched control and comparison of a filter with its control", async () => {
  const t = await makeTestContext({ queue: realQueue(1) });
  try {
    const editor = await signIn(t.app, "editor@example.org");
    const labId = t.demoLab!.id;
    const r = await editor.post(`/api/labs/${labId}/runs`).send(launchBody({ replicates: 200, seed: "ctl" }));
    await waitForRun(editor, r.body.id);
    const c = await editor.post(`/api/runs/${r.body.id}/control`);
    assert.equal(c.status, 201, JSON.stringify(c.body));
    assert.equal(c.body.controlOf, r.body.id);
    assert.equal(c.body.spec.seed, "ctl");
    const control = await waitForRun(editor, c.body.id);
    assert.equal(control.status, "finished");
    // Both runs now report the acceleration figures of the pair.
    const detail = RunDetailSchema.parse((await editor.get(`/api/runs/${r.body.id}`)).body);
    assert.ok(detail.acceleration);
    assert.equal(detail.acceleration.controlRunId, c.body.id);
    assert.equal(control.acceleration.circuitRunId, r.body.id);
    // The coherent AND filter responds more slowly than plain regulation (sign-sensitive delay: Mangan, Zaslaver & Alon 2003, J Mol Biol 334:197, from memory).
    assert.ok((detail.acceleration.halfRiseRatio ?? Infinity) < 1, `T1/2 ratio ${detail.acceleration.halfRiseRatio}`);
    const cmp = await editor.post(`/api/labs/${labId}/compare`).send({ runIds: [r.body.id, c.body.id] });
    assert.equal(cmp.status, 200, JSON.stringify(cmp.body));
    assert.equal(cmp.body.runs.length, 2);
    // each compared run carries its settings block, so differences can be told: the control keeps the circuit's threshold
    const [sa, sb] = cmp.body.runs.map((x: { settings: RunSettingsBlock }) => RunSettingsBlockSchema.parse(x.settings));
    assert.equal(sb.thresholdMolecules, sa.thresholdMolecules);
    assert.equal(sa.thresholdSource, "default");
    assert.equal(sb.thresholdSource, "set");
    assert.equal(sb.method.accuracy, "exact");
    const one = await editor.post(`/api/labs/${labId}/compare`).send({ runIds: [r.body.id] });
    assert.equal(one.status, 400);
    assert.match(one.body.error.message, /at least two/);
  } finally {
    await t.close();
  }
});

test("reproductions and imports of one run get distinct names; the run's history says who started each", async () => {
  const t = await makeTestContext();
  try {
    const editor = await signIn(t.app, "editor@example.org");
    const labId = t.demoLab!.id;
    // A run marked finished by hand (the idle queue computes nothing; naming does not need results).
    const launched = await editor
      .post(`/api/labs/${labId}/runs`)
      .send(launchBody({ replicates: 100, seed: "names-seed" }))
      .expect(201);
    t.ctx.db
      .update(schema.runs)
      .set({ status: "finished", statsHash: "a".repeat(64), finishedAt: new Date() })
      .where(eq(schema.runs.id, launched.body.id))
      .run();
    const finished = { id: launched.body.id as string, name: launched.body.name as string };
    const names: string[] = [];
    for (let i = 0; i < 3; i++) {
      const r = await editor.post(`/api/runs/${finished.id}/reproduce`).expect(201);
      names.push(r.body.name);
      assert.deepEqual(
        r.body.history.map((h: any) => h.words),
        ["Started by Demo editor as a reproduction"],
      );
    }
    // Before the fix all three were called "<name> (reproduction)".
    assert.deepEqual(names, [
      `${finished.name} (reproduction)`,
      `${finished.name} (reproduction 2)`,
      `${finished.name} (reproduction 3)`,
    ]);
    const bundle = (await editor.get(`/api/runs/${finished.id}/export/bundle.json`).expect(200)).body;
    const imp = await editor.post(`/api/labs/${labId}/bundles/import`).send({ bundle }).expect(201);
    assert.equal(imp.body.name, `${bundle.name} (reproduction 4)`);
    const named = await editor
      .post(`/api/labs/${labId}/bundles/import`)
      .send({ bundle, name: "Tank check" })
      .expect(201);
    const named2 = await editor
      .post(`/api/labs/${labId}/bundles/import`)
      .send({ bundle, name: "Tank check" })
      .expect(201);
    assert.deepEqual([named.body.name, named2.body.name], ["Tank check", "Tank check 2"]);
  } finally {
    await t.close();
  }
});
