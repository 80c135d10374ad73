/**
 * SBML through the API: the import preview, saving as a new circuit and as a
 * new version, the 422 refusal report (element ids and lines), the 413 size
 * limit (named even when the JSON around the document is larger than the
 * general body limit), roles and labs, and the export with and without an
 * input program, checked by libSBML (SBML Level 3 Version 2 Core: Hucka et al.
 * 2019, J Integr Bioinform 16:20190021; Debian's python3-sbml5), then read
 * back through the import route.
 */
import { test, before, after } from "node:test";
import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import path from "node:path";
import { makeTestContext, signIn, type TestApp } from "@/tests/helpers/test-app";
import { libsbmlErrors } from "@/tests/helpers/libsbml";
import { SBML_LIMITS, SbmlPreviewSchema, SbmlRefusalSchema } from "@/shared/schemas/api-sbml";
import { CircuitDetailResponseSchema } from "@/shared/schemas/api-circuits";
import { ApiErrorSchema } from "@/shared/schemas/errors";
import { API_LIMITS, megabytes } from "@/shared/limits";
import { schema } from "@/db/client";
import { eq } from "drizzle-orm";

type Agent = Awaited<ReturnType<typeof signIn>>;
const fixture = (name: string) => readFileSync(path.join(__dirname, "../fixtures/sbml", name), "utf8");
const GOOD = fixture("tank-sensor.xml");
const REFUSED = fixture("tank-sensor-refused.xml");

let t: TestApp;
let lab: string;
let editor: Agent;
let viewer: Agent;

before(async () => {
  t = await makeTestContext();
  lab = t.demoLab!.id;
  [editor, viewer] = await Promise.all([signIn(t.app, "editor@example.org"), signIn(t.app, "viewer@example.org")]);
});
after(async () => {
  await t.close();
});

const importUrl = (labId: string) => `/api/labs/${labId}/circuits/import-sbml`;
const circuitCount = () => t.ctx.db.select().from(schema.circuits).all().length;

test("preview: species, reactions in words, parameters and compartments; nothing is stored", async () => {
  const before = circuitCount();
  const r = await editor.post(importUrl(lab)).send({ sbml: GOOD, save: false });
  assert.equal(r.status, 200, JSON.stringify(r.body));
  const p = SbmlPreviewSchema.parse(r.body);
  assert.deepEqual([p.level, p.version], [3, 2]);
  assert.deepEqual(
    p.circuit.species.map((s) => [s.name, s.initialCount]),
    [
      ["qsaA", 5],
      ["rptC", 0],
    ],
  );
  assert.deepEqual(
    p.reactions.map((x) => [x.name, x.scheme]),
    [
      ["make_qsaA", "nothing -> qsaA"],
      ["lose_qsaA", "qsaA -> nothing"],
      ["make_rptC", "nothing -> rptC"],
      ["lose_rptC", "rptC -> nothing"],
    ],
  );
  assert.match(p.reactions[1].rate, /^mass action, 0\.1 per minute/);
  assert.match(p.reactions[2].rate, /^expression: .*vRpt.*Khalf/);
  assert.deepEqual(
    p.circuit.parameters?.map((x) => [x.name, x.value]),
    [
      ["vRpt", 4],
      ["Khalf", 10],
    ],
  );
  assert.deepEqual(p.compartments, [{ id: "cell", size: 1 }]);
  assert.deepEqual(p.problems, []);
  assert.equal(circuitCount(), before, "a preview stores nothing");
  // save defaults to false
  assert.equal((await editor.post(importUrl(lab)).send({ sbml: GOOD })).status, 200);
});

test("a refused document answers 422 with every refused element's id, line and reason, and stores nothing", async () => {
  const before = circuitCount();
  for (const save of [false, true]) {
    const r = await editor.post(importUrl(lab)).send({ sbml: REFUSED, save });
    assert.equal(r.status, 422, JSON.stringify(r.body));
    const e = SbmlRefusalSchema.parse(r.body).error;
    const byElement = new Map(e.problems.map((p) => [p.element, p]));
    // Lines counted in tests/fixtures/sbml/tank-sensor-refused.xml.
    assert.deepEqual(
      { id: byElement.get("rateRule")?.id, line: byElement.get("rateRule")?.line },
      { id: "qsaA", line: 15 },
    );
    assert.match(byElement.get("rateRule")!.reason, /rate rules are not supported/);
    assert.deepEqual(
      { id: byElement.get("event")?.id, line: byElement.get("event")?.line },
      { id: "feed_spike", line: 28 },
    );
    assert.match(byElement.get("event")!.reason, /delay/);
    assert.match(e.message, /nothing was saved/);
  }
  // Not XML at all: still a 422 with a line.
  const bad = await editor.post(importUrl(lab)).send({ sbml: "<sbml level='3' version='2'>\n<model>\n</sbml>" });
  assert.equal(bad.status, 422);
  assert.ok(SbmlRefusalSchema.parse(bad.body).error.problems[0].line >= 1);
  assert.equal(circuitCount(), before);
});

test("save: 201 with the new circuit (unique name), then a new version of it with circuitId", async () => {
  const r = await editor.post(importUrl(lab)).send({ sbml: GOOD, save: true });
  assert.equal(r.status, 201, JSON.stringify(r.body));
  const d = CircuitDetailResponseSchema.parse(r.body);
  assert.equal(d.circuit.name, "Tank sensor sketch");
  assert.equal(d.circuit.currentVersion, 1);
  assert.equal(d.body.reactions.length, 4);
  assert.match(d.versions[0].note ?? "", /Imported from SBML Level 3 Version 2/);
  // The same model again: the name is made unique.
  const again = CircuitDetailResponseSchema.parse(
    (await editor.post(importUrl(lab)).send({ sbml: GOOD, save: true }).expect(201)).body,
  );
  assert.equal(again.circuit.name, "Tank sensor sketch (imported 2)");
  // A chosen name that is taken: 409, nothing stored.
  const clash = await editor.post(importUrl(lab)).send({ sbml: GOOD, save: true, name: "Tank sensor sketch" });
  assert.equal(clash.status, 409);
  // As a new version of an existing circuit.
  const v2 = await editor
    .post(importUrl(lab))
    .send({ sbml: GOOD, save: true, circuitId: d.circuit.id, note: "re-read from the file" });
  assert.equal(v2.status, 200, JSON.stringify(v2.body));
  const dv = CircuitDetailResponseSchema.parse(v2.body);
  assert.equal(dv.circuit.id, d.circuit.id);
  assert.equal(dv.circuit.currentVersion, 2);
  assert.equal(dv.versions[0].note, "re-read from the file");
});

test("413 names the SBML limit, for a document just over it and for a body over the general JSON limit", async () => {
  // A comment full of quotes: the JSON text is about twice the document, beyond the general body limit.
  const filler = '"'.repeat(SBML_LIMITS.maxSbmlBytes);
  const big = GOOD.replace("<sbml ", `<!-- ${filler} -->\n<sbml `);
  assert.ok(JSON.stringify({ sbml: big }).length > API_LIMITS.maxJsonBodyBytes);
  const r = await editor.post(importUrl(lab)).send({ sbml: big });
  assert.equal(r.status, 413, JSON.stringify(r.body).slice(0, 300));
  const e = ApiErrorSchema.parse(r.body).error;
  assert.equal(e.code, "sbml_too_large");
  assert.ok(e.message.includes(megabytes(SBML_LIMITS.maxSbmlBytes)), e.message);
  // Beyond even the room left for JSON escaping: the same answer, from the body parser.
  const huge = "x".repeat(SBML_LIMITS.maxSbmlBytes * 7);
  const h = await editor.post(importUrl(lab)).set("Content-Type", "application/json").send(`{"sbml":"${huge}"}`);
  assert.equal(h.status, 413);
  assert.equal(ApiErrorSchema.parse(h.body).error.code, "sbml_too_large");
  // Just under the limit is read (and here refused for its content, not its size).
  const under = `<!--${"-".repeat(10)}-->`.padEnd(SBML_LIMITS.maxSbmlBytes - 10, " ");
  assert.equal((await editor.post(importUrl(lab)).send({ sbml: under })).status, 422);
});

test("roles and labs: a viewer may not import (403); another lab answers 404", async () => {
  const v = await viewer.post(importUrl(lab)).send({ sbml: GOOD, save: false });
  assert.equal(v.status, 403);
  const other = (await viewer.post("/api/labs").send({ name: "Viewer's SBML lab" }).expect(201)).body.lab.id as string;
  assert.equal((await editor.post(importUrl(other)).send({ sbml: GOOD })).status, 404);
  const theirs = CircuitDetailResponseSchema.parse(
    (await viewer.post(importUrl(other)).send({ sbml: GOOD, save: true }).expect(201)).body,
  );
  assert.equal((await editor.get(`/api/circuits/${theirs.circuit.id}/sbml`)).status, 404);
  // circuitId of another lab's circuit: 404, and that circuit is unchanged.
  const cross = await editor.post(importUrl(lab)).send({ sbml: GOOD, save: true, circuitId: theirs.circuit.id });
  assert.equal(cross.status, 404);
  const row = t.ctx.db.select().from(schema.circuits).where(eq(schema.circuits.id, theirs.circuit.id)).get();
  assert.equal(row?.currentVersion, 1);
  // A program of another lab: 404.
  const prog = await viewer
    .post(`/api/labs/${other}/programs`)
    .send({ name: "Their pulses", body: { kind: "pulses", pulses: [{ start: 10, duration: 5 }] } })
    .expect(201);
  const mine = await editor.post(`/api/labs/${lab}/circuits`).send({ name: "SBML lab check", template: "simple" });
  assert.equal(mine.status, 201);
  const url = `/api/circuits/${mine.body.circuit.id}/sbml?programId=${prog.body.program.id}`;
  assert.equal((await editor.get(url)).status, 404);
  assert.equal((await editor.get(`/api/circuits/${mine.body.circuit.id}/sbml?programId=prg_nothing`)).status, 404);
});

test("export: application/xml named after the circuit, valid for libSBML, with and without a program", async () => {
  const made = await editor.post(`/api/labs/${lab}/circuits`).send({ name: "Tank sensor, export", template: "simple" });
  assert.equal(made.status, 201);
  const id = made.body.circuit.id as string;
  const prog = await editor
    .post(`/api/labs/${lab}/programs`)
    .send({
      name: "Three spikes",
      body: {
        kind: "pulses",
        pulses: [
          { start: 10, duration: 5 },
          { start: 40, duration: 2 },
          { start: 90, duration: 30 },
        ],
      },
    })
    .expect(201);
  const plain = await viewer.get(`/api/circuits/${id}/sbml`).buffer(true).parse(textParser);
  assert.equal(plain.status, 200);
  assert.match(plain.headers["content-type"], /^application\/xml/);
  assert.match(plain.headers["content-disposition"], /attachment; filename="Tank-sensor-export\.sbml\.xml"/);
  const withProgram = await viewer
    .get(`/api/circuits/${id}/sbml?programId=${prog.body.program.id}&endTimeMinutes=200`)
    .buffer(true)
    .parse(textParser);
  assert.equal(withProgram.status, 200, String(withProgram.body).slice(0, 300));
  const a = String(plain.body);
  const b = String(withProgram.body);
  assert.equal((a.match(/<event /g) ?? []).length, 0);
  // Three pulses, each switching on and off before 200 min: six switches.
  assert.equal((b.match(/<event /g) ?? []).length, 6, b.slice(0, 2000));
  assert.deepEqual(libsbmlErrors([a, b]), [[], []]);
  // Query mistakes are 400s naming the field.
  const q = await viewer.get(`/api/circuits/${id}/sbml?endTimeMinutes=-3`);
  assert.equal(q.status, 400);
  assert.equal(ApiErrorSchema.parse(q.body).error.fields?.[0].path, "endTimeMinutes");
  const sig = await viewer.get(`/api/circuits/${id}/sbml?programId=${prog.body.program.id}&signal=nope`);
  assert.equal(sig.status, 400);
  const perReplicate = await editor
    .post(`/api/labs/${lab}/programs`)
    .send({
      name: "Drawn per replicate",
      body: {
        kind: "random",
        start: 0,
        meanInterval: 30,
        durations: { dist: "exponential", mean: 3 },
        perReplicate: true,
      },
    })
    .expect(201);
  const pr = await viewer.get(`/api/circuits/${id}/sbml?programId=${perReplicate.body.program.id}`);
  assert.equal(pr.status, 400);
  assert.match(ApiErrorSchema.parse(pr.body).error.message, /every replicate/);
});

test("round trip through the API: import, save, export, import again gives the same circuit", async () => {
  const saved = CircuitDetailResponseSchema.parse(
    (await editor.post(importUrl(lab)).send({ sbml: GOOD, save: true, name: "Round trip" }).expect(201)).body,
  );
  const xml = String((await editor.get(`/api/circuits/${saved.circuit.id}/sbml`).buffer(true).parse(textParser)).body);
  assert.deepEqual(libsbmlErrors([xml]), [[]]);
  const back = SbmlPreviewSchema.parse((await editor.post(importUrl(lab)).send({ sbml: xml }).expect(200)).body);
  assert.deepEqual(back.circuit.species, saved.body.species);
  assert.deepEqual(back.circuit.reactions, saved.body.reactions);
  assert.deepEqual(back.circuit.parameters, saved.body.parameters);
  assert.equal(back.circuit.outputSpecies, saved.body.outputSpecies);
});

function textParser(res: any, cb: (err: Error | null, body: string) => void) {
  let data = "";
  res.setEncoding("utf8");
  res.on("data", (c: string) => (data += c));
  res.on("end", () => cb(null, data));
}
