/**
 * Circuits API: templates, create (template / scratch), field-naming
 * validation, versions, duplicate, archive, names, access rules, the
 * feed-forward sign type and the demo seeding.
 *
 * One app per file for speed; every test makes the items it needs under its
 * own names, so no test depends on another.
 */
import { test, describe, before, after } from "node:test";
import assert from "node:assert/strict";
import request from "supertest";
import { and, eq } from "drizzle-orm";
import { makeTestContext, signIn, type TestApp } from "@/tests/helpers/test-app";
import { schema } from "@/db/client";
import { seedDemo } from "@/server/demo/seed";
import { DEMO_CIRCUIT_KEYS, DEMO_PROGRAM_KEYS, seedDemoCircuitsAndPrograms } from "@/server/demo/circuits";
import { feedForwardType, findFeedForwardLoops, wiringOf } from "@/sim/circuit/feed-forward";
import { templates } from "@/sim";
import {
  CheckCircuitResponseSchema,
  CircuitDetailResponseSchema,
  CircuitListResponseSchema,
  CircuitSummarySchema,
  CircuitVersionResponseSchema,
  TemplatesResponseSchema,
} from "@/shared/schemas/api-circuits";
import { ApiErrorSchema } from "@/shared/schemas/errors";
import type { CircuitInput } from "@/shared/schemas/circuit";

type Agent = Awaited<ReturnType<typeof signIn>>;

let t: TestApp;
let lab: string;
let editor: Agent;
let viewer: Agent;
let owner: Agent;

before(async () => {
  t = await makeTestContext();
  lab = t.demoLab!.id;
  [owner, editor, viewer] = await Promise.all([
    signIn(t.app, "owner@example.org"),
    signIn(t.app, "editor@example.org"),
    signIn(t.app, "viewer@example.org"),
  ]);
});
after(async () => {
  await t.close();
});

/** A small valid circuit written from scratch: Q-driven X, regulated Z. */
function scratchCircuit(): CircuitInput {
  return {
    name: "ignored: the stored name is the circuit name",
    species: [
      { name: "X", initialCount: 0 },
      { name: "Z", initialCount: 0 },
    ],
    signals: [{ name: "S" }],
    reactions: [
      { name: "makeX", products: [{ species: "X" }], rate: { kind: "constant", ratePerMinute: 5 }, scaledBy: "S" },
      { name: "degX", reactants: [{ species: "X" }], rate: { kind: "massAction", ratePerMinute: 0.1 } },
      {
        name: "makeZ",
        products: [{ species: "Z" }],
        rate: {
          kind: "regulated",
          maxRatePerMinute: 8,
          regulators: [{ source: "X", effect: "activates", halfMax: 20, hill: 2 }],
        },
      },
      { name: "degZ", reactants: [{ species: "Z" }], rate: { kind: "massAction", ratePerMinute: 0.2 } },
    ],
    outputSpecies: "Z",
  };
}

async function createFromTemplate(name: string, template = "c1ffl-and") {
  const r = await editor.post(`/api/labs/${lab}/circuits`).send({ name, template });
  assert.equal(r.status, 201, JSON.stringify(r.body));
  return CircuitDetailResponseSchema.parse(r.body);
}

function fieldsOf(body: unknown) {
  return ApiErrorSchema.parse(body).error.fields ?? [];
}

describe("templates", () => {
  test("signed-in users get the eight templates (feed-forward, then feedback) with titles, descriptions and bodies", async () => {
    const r = await viewer.get("/api/templates").expect(200);
    const { templates: list } = TemplatesResponseSchema.parse(r.body);
    assert.deepEqual(
      list.map((x) => x.key),
      ["simple", "c1ffl-and", "c1ffl-or", "i1ffl", "nar", "latch", "ring", "ring-extra"],
    );
    assert.equal(list.find((x) => x.key === "latch")?.title, "Exposure latch");
    for (const x of list) {
      assert.ok(x.title.length > 0 && x.description.length > 0);
      assert.ok(x.circuit.signals.some((s) => s.name === x.inputSignal));
    }
  });

  test("anonymous callers get 401", async () => {
    await request(t.app).get("/api/templates").expect(401);
  });
});

describe("feed-forward sign type", () => {
  // Coherent when sign(X->Z) = sign(X->Y) * sign(Y->Z) (the definition: Mangan & Alon 2003,
  // PNAS 100:11980). Type numbers 1-4: common practice; the table is from
  // memory of Mangan & Alon 2003, PNAS 100:11980, Fig. 1.
  test("the C1-FFL templates are coherent type 1 and the I1-FFL template incoherent type 1", async () => {
    const r = await viewer.get("/api/templates").expect(200);
    const byKey = Object.fromEntries(TemplatesResponseSchema.parse(r.body).templates.map((x) => [x.key, x]));
    assert.equal(byKey["simple"].feedForward, null);
    for (const key of ["c1ffl-and", "c1ffl-or"]) {
      const f = byKey[key].feedForward!;
      assert.equal(f.label, "coherent type 1");
      assert.equal(f.code, "C1");
      assert.deepEqual([f.x, f.y, f.z], ["qsaA", "hldB", "rptC"]);
    }
    assert.equal(byKey["c1ffl-and"].feedForward!.logic, "and");
    assert.equal(byKey["c1ffl-or"].feedForward!.logic, "or");
    const i = byKey["i1ffl"].feedForward!;
    assert.equal(i.label, "incoherent type 1");
    assert.equal(i.code, "I1");
    assert.equal(i.coherent, false);
  });

  test("all eight sign patterns: four coherent, four incoherent, coherence by the sign-product rule", () => {
    const signs = ["activates", "represses"] as const;
    const seen = new Set<string>();
    let coherent = 0;
    for (const xy of signs)
      for (const yz of signs)
        for (const xz of signs) {
          const f = feedForwardType(xy, yz, xz);
          const s = (x: string) => (x === "activates" ? 1 : -1);
          assert.equal(f.coherent, s(xz) === s(xy) * s(yz), `${xy} ${yz} ${xz}`);
          seen.add(f.code);
          if (f.coherent) coherent++;
        }
    assert.equal(seen.size, 8);
    assert.equal(coherent, 4);
    // From memory of Mangan & Alon 2003 Fig. 1: I1 = X activates Y, Y represses Z, X activates Z.
    assert.equal(feedForwardType("activates", "activates", "activates").label, "coherent type 1");
    assert.equal(feedForwardType("activates", "represses", "activates").label, "incoherent type 1");
  });

  test("the detail gives the wiring edges for the diagram", async () => {
    const d = await createFromTemplate("Wiring check", "i1ffl");
    const edges = d.wiring.edges.map((e) => `${e.from}->${e.to}:${e.sign}`).sort();
    assert.deepEqual(edges, [
      "Q->qsaA:activates",
      "hldB->rptC:represses",
      "qsaA->hldB:activates",
      "qsaA->rptC:activates",
    ]);
    assert.equal(d.feedForward?.label, "incoherent type 1");
    assert.ok(d.wiring.nodes.find((n) => n.name === "rptC")?.isOutput);
    assert.equal(d.wiring.nodes.find((n) => n.name === "Q")?.kind, "signal");
  });

  test("a pair with both signs is not typed; simple regulation has no loop", () => {
    const c = structuredClone(templates["c1ffl-and"].circuit);
    c.reactions.push({
      name: "makeZ2",
      reactants: [],
      products: [{ species: "rptC", count: 1 }],
      modifiers: [],
      rate: {
        kind: "regulated",
        maxRatePerMinute: 1,
        logic: "and",
        leakFraction: 0,
        regulators: [{ source: "hldB", effect: "represses", halfMax: 10, hill: 1 }],
      },
    });
    assert.deepEqual(findFeedForwardLoops(c), []);
    assert.equal(wiringOf(c).edges.filter((e) => e.from === "hldB" && e.to === "rptC").length, 2);
    assert.deepEqual(findFeedForwardLoops(templates.simple.circuit), []);
  });
});

describe("create", () => {
  test("from a template: version 1, the body takes the circuit's name", async () => {
    const d = await createFromTemplate("Hold from template");
    assert.equal(d.circuit.name, "Hold from template");
    assert.equal(d.body.name, "Hold from template");
    assert.equal(d.circuit.currentVersion, 1);
    assert.equal(d.versions.length, 1);
    assert.equal(d.versions[0].createdByName, "Demo editor");
    assert.match(d.versions[0].note ?? "", /template/);
    assert.equal(d.circuit.feedForwardLabel, "coherent type 1");
    assert.ok(d.parameters.some((p) => p.ref === "K(makeZ,hldB)"));
  });

  test("from scratch", async () => {
    const r = await editor
      .post(`/api/labs/${lab}/circuits`)
      .send({ name: "Scratch one", body: scratchCircuit(), note: "first draft" })
      .expect(201);
    const d = CircuitDetailResponseSchema.parse(r.body);
    assert.equal(d.body.name, "Scratch one");
    assert.equal(d.body.reactions.length, 4);
    assert.equal(d.versions[0].note, "first draft");
    assert.equal(d.feedForward, null);
    const list = CircuitListResponseSchema.parse((await viewer.get(`/api/labs/${lab}/circuits`).expect(200)).body);
    assert.ok(list.items.some((x) => x.id === d.circuit.id));
  });

  test("named parameters and expression rates are accepted; a bad formula is a 400 naming the field and position", async () => {
    const body = scratchCircuit() as any;
    body.parameters = [
      { name: "kmake", value: 5, description: "production while induced" },
      { name: "kdeg", value: 0.1 },
    ];
    body.reactions[0].rate = { kind: "expression", formula: "kmake * X^0 * 1" };
    body.reactions[1].rate = { kind: "massAction", ratePerMinute: 0.1, use: { ratePerMinute: "kdeg" } };
    const r = await editor.post(`/api/labs/${lab}/circuits`).send({ name: "With parameters", body }).expect(201);
    const d = CircuitDetailResponseSchema.parse(r.body);
    assert.deepEqual(
      d.body.parameters?.map((q) => q.name),
      ["kmake", "kdeg"],
    );
    assert.equal(d.body.reactions[0].rate.kind, "expression");
    body.reactions[0].rate.formula = "kmake * Q";
    const bad = await editor.post(`/api/labs/${lab}/circuits`).send({ name: "Bad formula", body }).expect(400);
    const f = fieldsOf(bad.body).find((x) => x.path === "body.reactions.0.rate.formula");
    assert.ok(f, JSON.stringify(bad.body));
    assert.match(f.message, /makeX.*position 9: "Q" is not a species, signal or parameter/);
  });

  test("an audit event is recorded", async () => {
    const d = await createFromTemplate("Audited circuit", "simple");
    const rows = t.ctx.db.select().from(schema.auditEvents).where(eq(schema.auditEvents.targetId, d.circuit.id)).all();
    assert.deepEqual(
      rows.map((r) => r.action),
      ["circuit.created"],
    );
  });

  test("neither body nor template: 400 naming body", async () => {
    const r = await editor.post(`/api/labs/${lab}/circuits`).send({ name: "Empty" }).expect(400);
    assert.ok(fieldsOf(r.body).some((f) => f.path === "body"));
  });

  test("a schema error names the field path and the reaction", async () => {
    const body = scratchCircuit() as any;
    body.reactions[2].rate.regulators[0].halfMax = -3;
    const r = await editor.post(`/api/labs/${lab}/circuits`).send({ name: "Bad K", body }).expect(400);
    const f = fieldsOf(r.body).find((x) => x.path === "body.reactions.2.rate.regulators.0.halfMax");
    assert.ok(f, JSON.stringify(r.body));
    assert.match(f.message, /makeZ/);
    assert.match(f.message, /half-max/);
  });

  test("a semantic error (unknown species) names the field path", async () => {
    const body = scratchCircuit() as any;
    body.reactions[3].reactants[0].species = "Nope";
    const r = await editor.post(`/api/labs/${lab}/circuits`).send({ name: "Bad species", body }).expect(400);
    const fields = fieldsOf(r.body);
    assert.ok(
      fields.some((x) => x.path.startsWith("body.reactions.3") && /Nope/.test(x.message)),
      JSON.stringify(fields),
    );
  });

  test("an unknown template key: 400 naming template", async () => {
    const r = await editor.post(`/api/labs/${lab}/circuits`).send({ name: "No such", template: "toggle" }).expect(400);
    assert.ok(fieldsOf(r.body).some((f) => f.path === "template"));
  });

  test("names are unique per lab among active circuits (case-insensitive): 409", async () => {
    await createFromTemplate("Unique name");
    const r = await editor
      .post(`/api/labs/${lab}/circuits`)
      .send({ name: "unique NAME", template: "simple" })
      .expect(409);
    assert.equal(r.body.error.code, "name_taken");
    assert.match(r.body.error.message, /already has a circuit named/);
  });
});

describe("check (live validation)", () => {
  test("a viewer may check; errors name the field; a valid body is ok with its loop type", async () => {
    const bad = scratchCircuit() as any;
    bad.reactions[1].rate.ratePerMinute = "fast";
    let r = await viewer.post(`/api/labs/${lab}/circuits/check`).send({ body: bad }).expect(200);
    let c = CheckCircuitResponseSchema.parse(r.body);
    assert.equal(c.ok, false);
    assert.ok(
      c.errors.some((e) => e.path === "body.reactions.1.rate.ratePerMinute" && /degX/.test(e.message)),
      JSON.stringify(c.errors),
    );

    r = await viewer.post(`/api/labs/${lab}/circuits/check`).send({ body: templates.i1ffl.circuit }).expect(200);
    c = CheckCircuitResponseSchema.parse(r.body);
    assert.deepEqual([c.ok, c.errors, c.feedForward?.label], [true, [], "incoherent type 1"]);
  });

  test("semantic problems are reported too", async () => {
    const bad = scratchCircuit() as any;
    bad.outputSpecies = "W";
    const r = await viewer.post(`/api/labs/${lab}/circuits/check`).send({ body: bad }).expect(200);
    const c = CheckCircuitResponseSchema.parse(r.body);
    assert.equal(c.ok, false);
    assert.ok(
      c.errors.some((e) => e.path === "body.outputSpecies"),
      JSON.stringify(c.errors),
    );
  });
});

describe("versions", () => {
  test("PUT saves version 2; version 1 stays readable and unchanged", async () => {
    const d1 = await createFromTemplate("Versioned");
    const body = structuredClone(d1.body);
    body.reactions.find((r) => r.name === "degZ")!.rate = { kind: "massAction", ratePerMinute: 0.2 };
    const r = await editor
      .put(`/api/circuits/${d1.circuit.id}`)
      .send({ body, note: "faster reporter decay", baseVersion: 1 })
      .expect(200);
    const d2 = CircuitDetailResponseSchema.parse(r.body);
    assert.equal(d2.circuit.currentVersion, 2);
    assert.deepEqual(
      d2.versions.map((v) => [v.version, v.note]),
      [
        [2, "faster reporter decay"],
        [1, d1.versions[0].note],
      ],
    );
    assert.deepEqual(d2.body.reactions.find((x) => x.name === "degZ")!.rate, {
      kind: "massAction",
      ratePerMinute: 0.2,
    });

    const v1 = CircuitVersionResponseSchema.parse(
      (await viewer.get(`/api/circuits/${d1.circuit.id}/versions/1`).expect(200)).body,
    );
    assert.deepEqual(v1.body, d1.body);
    assert.equal(v1.isCurrent, false);
    const v2 = CircuitVersionResponseSchema.parse(
      (await viewer.get(`/api/circuits/${d1.circuit.id}/versions/2`).expect(200)).body,
    );
    assert.equal(v2.isCurrent, true);
    const rows = t.ctx.db
      .select()
      .from(schema.circuitVersions)
      .where(eq(schema.circuitVersions.circuitId, d1.circuit.id))
      .all();
    assert.equal(rows.length, 2);
  });

  test("a stale baseVersion is a 409 and saves nothing", async () => {
    const d1 = await createFromTemplate("Stale edit");
    await editor.put(`/api/circuits/${d1.circuit.id}`).send({ body: d1.body, baseVersion: 1 }).expect(200);
    const r = await owner.put(`/api/circuits/${d1.circuit.id}`).send({ body: d1.body, baseVersion: 1 }).expect(409);
    assert.equal(r.body.error.code, "stale_version");
    const d = CircuitDetailResponseSchema.parse((await viewer.get(`/api/circuits/${d1.circuit.id}`).expect(200)).body);
    assert.equal(d.circuit.currentVersion, 2);
  });

  test("an invalid body on PUT is a 400 naming the field; no version is added", async () => {
    const d1 = await createFromTemplate("Bad edit");
    const body = structuredClone(d1.body) as any;
    body.reactions[4].rate.leakFraction = 2;
    const r = await editor.put(`/api/circuits/${d1.circuit.id}`).send({ body }).expect(400);
    assert.ok(
      fieldsOf(r.body).some((f) => f.path === "body.reactions.4.rate.leakFraction" && /makeZ/.test(f.message)),
      JSON.stringify(r.body),
    );
    const d = CircuitDetailResponseSchema.parse((await viewer.get(`/api/circuits/${d1.circuit.id}`).expect(200)).body);
    assert.equal(d.circuit.currentVersion, 1);
  });

  test("PUT may rename; a missing version is 404, a malformed one 400", async () => {
    const d1 = await createFromTemplate("Before rename");
    const r = await editor
      .put(`/api/circuits/${d1.circuit.id}`)
      .send({ body: d1.body, name: "After rename" })
      .expect(200);
    const d = CircuitDetailResponseSchema.parse(r.body);
    assert.equal(d.circuit.name, "After rename");
    assert.equal(d.body.name, "After rename");
    await viewer.get(`/api/circuits/${d1.circuit.id}/versions/9`).expect(404);
    await viewer.get(`/api/circuits/${d1.circuit.id}/versions/x`).expect(400);
  });
});

describe("duplicate and archive", () => {
  test("duplicate copies the current version into a new circuit", async () => {
    const d1 = await createFromTemplate("Original");
    const r = await editor.post(`/api/circuits/${d1.circuit.id}/duplicate`).send({}).expect(201);
    const copy = CircuitDetailResponseSchema.parse(r.body);
    assert.notEqual(copy.circuit.id, d1.circuit.id);
    assert.equal(copy.circuit.name, "Original (copy)");
    assert.equal(copy.circuit.currentVersion, 1);
    assert.deepEqual({ ...copy.body, name: "" }, { ...d1.body, name: "" });
    const again = CircuitDetailResponseSchema.parse(
      (await editor.post(`/api/circuits/${d1.circuit.id}/duplicate`).send({}).expect(201)).body,
    );
    assert.equal(again.circuit.name, "Original (copy 2)");
    const named = CircuitDetailResponseSchema.parse(
      (await editor.post(`/api/circuits/${d1.circuit.id}/duplicate`).send({ name: "Variant B" }).expect(201)).body,
    );
    assert.equal(named.circuit.name, "Variant B");
  });

  test("archive hides from the list, ?archived=1 shows it, unarchive brings it back", async () => {
    const d = await createFromTemplate("To archive");
    const a = CircuitSummarySchema.parse((await editor.post(`/api/circuits/${d.circuit.id}/archive`).expect(200)).body);
    assert.ok(a.archivedAt);
    let list = CircuitListResponseSchema.parse((await viewer.get(`/api/labs/${lab}/circuits`).expect(200)).body);
    assert.ok(!list.items.some((x) => x.id === d.circuit.id));
    list = CircuitListResponseSchema.parse((await viewer.get(`/api/labs/${lab}/circuits?archived=1`).expect(200)).body);
    assert.ok(list.items.some((x) => x.id === d.circuit.id));
    // archived: still readable, not editable
    await viewer.get(`/api/circuits/${d.circuit.id}`).expect(200);
    const r = await editor.put(`/api/circuits/${d.circuit.id}`).send({ body: d.body }).expect(409);
    assert.equal(r.body.error.code, "archived");
    const u = CircuitSummarySchema.parse(
      (await editor.post(`/api/circuits/${d.circuit.id}/unarchive`).expect(200)).body,
    );
    assert.equal(u.archivedAt, null);
  });

  test("an archived name may be reused; unarchiving it then is a 409", async () => {
    const d = await createFromTemplate("Reused name");
    await editor.post(`/api/circuits/${d.circuit.id}/archive`).expect(200);
    await createFromTemplate("Reused name");
    const r = await editor.post(`/api/circuits/${d.circuit.id}/unarchive`).expect(409);
    assert.equal(r.body.error.code, "name_taken");
  });
});

describe("access", () => {
  test("a viewer gets 403 on every write", async () => {
    const d = await createFromTemplate("Viewer target");
    const expect403 = async (r: request.Response) => {
      assert.equal(r.status, 403, JSON.stringify(r.body));
      assert.equal(r.body.error.code, "forbidden");
    };
    await expect403(await viewer.post(`/api/labs/${lab}/circuits`).send({ name: "By viewer", template: "simple" }));
    await expect403(await viewer.put(`/api/circuits/${d.circuit.id}`).send({ body: d.body }));
    await expect403(await viewer.post(`/api/circuits/${d.circuit.id}/duplicate`).send({}));
    await expect403(await viewer.post(`/api/circuits/${d.circuit.id}/archive`));
    await expect403(await viewer.post(`/api/circuits/${d.circuit.id}/unarchive`));
  });

  test("another lab's circuit answers 404 to non-members, on reads and writes", async () => {
    const created = await viewer.post("/api/labs").send({ name: "Viewer's own lab" }).expect(201);
    const otherLab = created.body.lab.id as string;
    // the viewer owns this lab, so may create there
    const r = await viewer
      .post(`/api/labs/${otherLab}/circuits`)
      .send({ name: "Private", template: "simple" })
      .expect(201);
    const id = r.body.circuit.id as string;
    await editor.get(`/api/circuits/${id}`).expect(404);
    await editor.get(`/api/circuits/${id}/versions/1`).expect(404);
    await editor.put(`/api/circuits/${id}`).send({ body: r.body.body }).expect(404);
    await editor.post(`/api/circuits/${id}/archive`).expect(404);
    await editor.get(`/api/labs/${otherLab}/circuits`).expect(404);
    await editor.post(`/api/labs/${otherLab}/circuits`).send({ name: "Intruder", template: "simple" }).expect(404);
    await editor.get(`/api/circuits/cir_doesnotexist`).expect(404);
  });
});

describe("demo seeding", () => {
  test("seeding twice gives the same rows; the demo circuits have the scenario's loop types", async () => {
    const ctx = await makeTestContext({ seed: "accounts" });
    try {
      const labRow = ctx.demoLab!;
      seedDemoCircuitsAndPrograms(ctx.ctx, labRow);
      const snapshot = () => ({
        circuits: ctx.ctx.db.select().from(schema.circuits).where(eq(schema.circuits.labId, labRow.id)).all(),
        versions: ctx.ctx.db.select().from(schema.circuitVersions).all(),
        programs: ctx.ctx.db.select().from(schema.inputPrograms).where(eq(schema.inputPrograms.labId, labRow.id)).all(),
      });
      const first = snapshot();
      seedDemoCircuitsAndPrograms(ctx.ctx, labRow);
      await seedDemo(ctx.ctx); // the boot path: accounts, then every registered seeder
      assert.deepEqual(snapshot(), first);
      assert.equal(first.circuits.length, 3);
      assert.equal(first.versions.length, 3);
      assert.equal(first.programs.length, 2);
      assert.deepEqual(first.circuits.map((c) => c.demoKey).sort(), Object.values(DEMO_CIRCUIT_KEYS).sort());
      assert.deepEqual(first.programs.map((c) => c.demoKey).sort(), Object.values(DEMO_PROGRAM_KEYS).sort());

      const o = await signIn(ctx.app, "owner@example.org");
      const byName = new Map(
        CircuitListResponseSchema.parse((await o.get(`/api/labs/${labRow.id}/circuits`).expect(200)).body).items.map(
          (c) => [c.name, c],
        ),
      );
      assert.equal(byName.get("Tank sensor, direct")?.feedForwardLabel, null);
      assert.equal(byName.get("Tank sensor, hold")?.feedForwardLabel, "coherent type 1");
      assert.equal(byName.get("Dosing pulse")?.feedForwardLabel, "incoherent type 1");
      const hold = ctx.ctx.db
        .select()
        .from(schema.circuits)
        .where(and(eq(schema.circuits.labId, labRow.id), eq(schema.circuits.demoKey, DEMO_CIRCUIT_KEYS.hold)))
        .get();
      const d = CircuitDetailResponseSchema.parse((await o.get(`/api/circuits/${hold!.id}`).expect(200)).body);
      assert.deepEqual(
        d.body.species.map((s) => s.name),
        ["qsaA", "hldB", "rptC"],
      );
      assert.equal(d.feedForward?.logic, "and");
    } finally {
      await ctx.close();
    }
  });

  test("a seeded item the users changed or archived is left alone; a user item with a demo name does not block seeding", async () => {
    const ctx = await makeTestContext({ seed: "accounts" });
    try {
      const labRow = ctx.demoLab!;
      const e = await signIn(ctx.app, "editor@example.org");
      await e.post(`/api/labs/${labRow.id}/circuits`).send({ name: "Dosing pulse", template: "simple" }).expect(201);
      seedDemoCircuitsAndPrograms(ctx.ctx, labRow);
      const dosing = ctx.ctx.db
        .select()
        .from(schema.circuits)
        .where(eq(schema.circuits.demoKey, DEMO_CIRCUIT_KEYS.dosingPulse))
        .get()!;
      assert.equal(dosing.name, "Dosing pulse (demo)");
      await e.post(`/api/circuits/${dosing.id}/archive`).expect(200);
      seedDemoCircuitsAndPrograms(ctx.ctx, labRow);
      const rows = ctx.ctx.db
        .select()
        .from(schema.circuits)
        .where(eq(schema.circuits.demoKey, DEMO_CIRCUIT_KEYS.dosingPulse))
        .all();
      assert.equal(rows.length, 1);
      assert.ok(rows[0].archivedAt);
    } finally {
      await ctx.close();
    }
  });
});
