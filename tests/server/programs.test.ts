/**
 * Input-programs API: create, field-naming validation, replace, duplicate,
 * archive, access rules, the live preview for every kind, and the demo
 * programs (Feed spikes, Duration ladder).
 *
 * One app per file for speed; every test makes the items it needs under its
 * own names, so no test depends on another.
 */
import { test, describe, before, after } from "node:test";
import assert from "node:assert/strict";
import { eq } from "drizzle-orm";
import { makeTestContext, signIn, type TestApp } from "@/tests/helpers/test-app";
import { schema } from "@/db/client";
import {
  demoCircuitBody,
  demoPrograms,
  DEMO_CIRCUITS,
  DEMO_PROGRAM_KEYS,
  FEED_SPIKES_TRUE_EXPOSURE,
  LADDER_DURATIONS_MINUTES,
} from "@/server/demo/circuits";
import { solveOde } from "@/sim";
import { RunSpecSchema } from "@/shared/schemas/run-spec";
import {
  PreviewProgramResponseSchema,
  ProgramDetailResponseSchema,
  ProgramListResponseSchema,
  ProgramSummarySchema,
} from "@/shared/schemas/api-programs";
import { ApiErrorSchema } from "@/shared/schemas/errors";
import type { InputProgram, InputProgramInput } from "@/shared/schemas/input-program";

type Agent = Awaited<ReturnType<typeof signIn>>;

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

const LADDER: InputProgramInput = { kind: "ladder", start: 10, durations: [1, 5, 20], gap: 30 };

async function create(name: string, body: InputProgramInput = LADDER) {
  const r = await editor.post(`/api/labs/${lab}/programs`).send({ name, body });
  assert.equal(r.status, 201, JSON.stringify(r.body));
  return ProgramDetailResponseSchema.parse(r.body);
}

async function preview(program: unknown, endTimeMinutes: number) {
  const r = await viewer.post(`/api/labs/${lab}/programs/preview`).send({ program, endTimeMinutes });
  assert.equal(r.status, 200, JSON.stringify(r.body));
  return PreviewProgramResponseSchema.parse(r.body);
}

const fieldsOf = (body: unknown) => ApiErrorSchema.parse(body).error.fields ?? [];

describe("create and edit", () => {
  test("create, list and read; the summary describes the schedule", async () => {
    const d = await create("Three steps");
    assert.equal(d.program.kind, "ladder");
    assert.equal(d.program.description, "ladder of 3 durations (1-20 min), gap 30 min");
    assert.equal(d.program.createdByName, "Demo editor");
    assert.deepEqual(d.body, { ...LADDER, repeats: 1 });
    const list = ProgramListResponseSchema.parse((await viewer.get(`/api/labs/${lab}/programs`).expect(200)).body);
    assert.ok(list.items.some((p) => p.id === d.program.id));
    const again = ProgramDetailResponseSchema.parse(
      (await viewer.get(`/api/programs/${d.program.id}`).expect(200)).body,
    );
    assert.deepEqual(again, d);
    const audit = t.ctx.db.select().from(schema.auditEvents).where(eq(schema.auditEvents.targetId, d.program.id)).all();
    assert.deepEqual(
      audit.map((a) => a.action),
      ["program.created"],
    );
  });

  test("a schema error names the field", async () => {
    const r = await editor
      .post(`/api/labs/${lab}/programs`)
      .send({
        name: "Bad pulse",
        body: {
          kind: "pulses",
          pulses: [
            { start: 0, duration: 5 },
            { start: 10, duration: -1 },
          ],
        },
      })
      .expect(400);
    const f = fieldsOf(r.body).find((x) => x.path === "body.pulses.1.duration");
    assert.ok(f, JSON.stringify(r.body));
    assert.match(f.message, /duration must be positive/);
  });

  test("a uniform duration range upside down is a 400 naming durations.max", async () => {
    const body = { kind: "random", start: 0, meanInterval: 30, durations: { dist: "uniform", min: 8, max: 3 } };
    const r = await editor.post(`/api/labs/${lab}/programs`).send({ name: "Upside down", body }).expect(400);
    assert.ok(
      fieldsOf(r.body).some((f) => f.path === "body.durations.max"),
      JSON.stringify(r.body),
    );
  });

  test("PUT replaces the body and may rename; names stay unique (409)", async () => {
    const d = await create("Editable");
    await create("Taken program name");
    const body: InputProgramInput = { kind: "periodic", start: 0, onDuration: 5, offDuration: 55, count: 4 };
    const r = await editor.put(`/api/programs/${d.program.id}`).send({ body, name: "Edited" }).expect(200);
    const e = ProgramDetailResponseSchema.parse(r.body);
    assert.equal(e.program.name, "Edited");
    assert.equal(e.program.kind, "periodic");
    assert.deepEqual(e.body, body);
    const c = await editor.put(`/api/programs/${d.program.id}`).send({ name: "taken PROGRAM name" }).expect(409);
    assert.equal(c.body.error.code, "name_taken");
    const dup = await editor.post(`/api/labs/${lab}/programs`).send({ name: "Edited", body: LADDER }).expect(409);
    assert.match(dup.body.error.message, /already has an input program named "Edited"/);
    await editor.put(`/api/programs/${d.program.id}`).send({}).expect(400);
  });

  test("duplicate, archive and unarchive", async () => {
    const d = await create("Copy me");
    const copy = ProgramDetailResponseSchema.parse(
      (await editor.post(`/api/programs/${d.program.id}/duplicate`).send({}).expect(201)).body,
    );
    assert.equal(copy.program.name, "Copy me (copy)");
    assert.notEqual(copy.program.id, d.program.id);
    assert.deepEqual(copy.body, d.body);
    const a = ProgramSummarySchema.parse((await editor.post(`/api/programs/${d.program.id}/archive`).expect(200)).body);
    assert.ok(a.archivedAt);
    let list = ProgramListResponseSchema.parse((await viewer.get(`/api/labs/${lab}/programs`).expect(200)).body);
    assert.ok(!list.items.some((p) => p.id === d.program.id));
    list = ProgramListResponseSchema.parse((await viewer.get(`/api/labs/${lab}/programs?archived=1`).expect(200)).body);
    assert.ok(list.items.some((p) => p.id === d.program.id));
    assert.equal(
      (await editor.put(`/api/programs/${d.program.id}`).send({ name: "Nope" }).expect(409)).body.error.code,
      "archived",
    );
    const u = ProgramSummarySchema.parse(
      (await editor.post(`/api/programs/${d.program.id}/unarchive`).expect(200)).body,
    );
    assert.equal(u.archivedAt, null);
  });
});

describe("access", () => {
  test("a viewer gets 403 on every write but may preview", async () => {
    const d = await create("Viewer target program");
    for (const r of [
      await viewer.post(`/api/labs/${lab}/programs`).send({ name: "By viewer", body: LADDER }),
      await viewer.put(`/api/programs/${d.program.id}`).send({ name: "By viewer" }),
      await viewer.post(`/api/programs/${d.program.id}/duplicate`).send({}),
      await viewer.post(`/api/programs/${d.program.id}/archive`),
      await viewer.post(`/api/programs/${d.program.id}/unarchive`),
    ])
      assert.equal(r.status, 403, JSON.stringify(r.body));
    await preview(LADDER, 100);
  });

  test("another lab's program answers 404 to non-members", async () => {
    const other = (await viewer.post("/api/labs").send({ name: "Viewer's program lab" }).expect(201)).body.lab
      .id as string;
    const r = await viewer
      .post(`/api/labs/${other}/programs`)
      .send({ name: "Private program", body: LADDER })
      .expect(201);
    const id = r.body.program.id as string;
    await editor.get(`/api/programs/${id}`).expect(404);
    await editor.put(`/api/programs/${id}`).send({ name: "Mine now" }).expect(404);
    await editor.post(`/api/programs/${id}/archive`).expect(404);
    await editor.get(`/api/labs/${other}/programs`).expect(404);
    await editor.post(`/api/labs/${other}/programs/preview`).send({ program: LADDER, endTimeMinutes: 100 }).expect(404);
  });
});

describe("preview", () => {
  test("pulses: sorted, overlaps merged at the larger level, switch times and levels", async () => {
    const p = await preview(
      {
        kind: "pulses",
        pulses: [
          { start: 50, duration: 5 },
          { start: 10, duration: 5 },
          { start: 12, duration: 10, level: 3 },
        ],
      },
      100,
    );
    assert.deepEqual(
      p.pulses.map((x) => [x.on, x.off, x.level, x.durationBin]),
      [
        [10, 22, 3, 12],
        [50, 55, 1, 5],
      ],
    );
    assert.deepEqual(p.switchTimes, [10, 22, 50, 55]);
    assert.deepEqual(p.levels, [3, 0, 1, 0]);
    assert.equal(p.note, null);
  });

  test("periodic: pulses start every on+off minutes until the count or the end", async () => {
    const counted = await preview({ kind: "periodic", start: 5, onDuration: 10, offDuration: 20, count: 3 }, 1000);
    assert.deepEqual(
      counted.pulses.map((x) => [x.on, x.off]),
      [
        [5, 15],
        [35, 45],
        [65, 75],
      ],
    );
    const toEnd = await preview({ kind: "periodic", start: 5, onDuration: 10, offDuration: 20 }, 100);
    assert.deepEqual(
      toEnd.pulses.map((x) => x.on),
      [5, 35, 65, 95],
    );
    // the last pulse runs past the end: its switch-off is not listed
    assert.deepEqual(toEnd.switchTimes, [5, 15, 35, 45, 65, 75, 95]);
  });

  test("ladder: each duration, then the recovery gap", async () => {
    const p = await preview({ ...LADDER, repeats: 2 }, 1000);
    assert.deepEqual(
      p.pulses.map((x) => [x.on, x.off]),
      [
        [10, 11],
        [41, 42],
        [72, 77],
        [107, 112],
        [142, 162],
        [192, 212],
      ],
    );
  });

  test("random: reproducible from its seed, durations from the distribution, extra pulses added", async () => {
    const program = {
      kind: "random",
      start: 0,
      meanInterval: 60,
      durations: { dist: "uniform", min: 2, max: 4 },
      seed: "preview-check",
      extraPulses: [{ start: 500, duration: 30 }],
    };
    const a = await preview(program, 2000);
    const b = await preview(program, 2000);
    assert.deepEqual(a, b);
    const c = await preview({ ...program, seed: "another-seed" }, 2000);
    assert.notDeepEqual(a.pulses, c.pulses);
    assert.ok(a.pulses.some((x) => x.on <= 500 && x.off >= 530));
    const spikes = a.pulses.filter((x) => !(x.on <= 500 && x.off >= 530));
    assert.ok(spikes.length > 5);
    // Unmerged spikes last 2-4 min; bins are 1 min wide with the centre as label.
    for (const s of spikes) {
      assert.ok(s.off - s.on >= 2, `spike ${s.on}: ${s.off - s.on} min`);
      assert.equal(s.durationBin % 1, 0.5);
    }
    assert.equal(a.note, null);
    const per = await preview({ ...program, perReplicate: true }, 2000);
    assert.match(per.note ?? "", /every replicate/);
  });

  test("invalid programs and end times are a 400 naming the field", async () => {
    let r = await viewer
      .post(`/api/labs/${lab}/programs/preview`)
      .send({ program: LADDER, endTimeMinutes: 0 })
      .expect(400);
    assert.ok(
      fieldsOf(r.body).some((f) => f.path === "endTimeMinutes"),
      JSON.stringify(r.body),
    );
    r = await viewer
      .post(`/api/labs/${lab}/programs/preview`)
      .send({ program: { kind: "ladder", start: 0, durations: [], gap: 5 }, endTimeMinutes: 100 })
      .expect(400);
    assert.ok(
      fieldsOf(r.body).some((f) => f.path === "program.durations"),
      JSON.stringify(r.body),
    );
    r = await viewer
      .post(`/api/labs/${lab}/programs/preview`)
      .send({ program: { kind: "steps" }, endTimeMinutes: 100 })
      .expect(400);
    assert.ok(
      fieldsOf(r.body).some((f) => f.path.startsWith("program")),
      JSON.stringify(r.body),
    );
    r = await viewer
      .post(`/api/labs/${lab}/programs/preview`)
      .send({
        program: { kind: "random", start: 0, meanInterval: 30, durations: { dist: "uniform", min: 8, max: 3 } },
        endTimeMinutes: 100,
      })
      .expect(400);
    assert.ok(
      fieldsOf(r.body).some((f) => f.path === "program.durations.max"),
      JSON.stringify(r.body),
    );
    assert.match(r.body.error.message, /longest duration/);
  });
});

describe("demo programs", () => {
  const byKey = Object.fromEntries(demoPrograms().map((d) => [d.demoKey, d]));

  test("Feed spikes: 2-5 min spikes about every 45 min plus one 60-min exposure", async () => {
    const body = byKey[DEMO_PROGRAM_KEYS.feedSpikes].body;
    assert.equal(byKey[DEMO_PROGRAM_KEYS.feedSpikes].name, "Feed spikes");
    assert.equal(body.kind, "random");
    const end = 10_000;
    const p = await preview(body, end);
    const exposure = p.pulses.filter(
      (x) => x.on <= FEED_SPIKES_TRUE_EXPOSURE.start && x.off >= FEED_SPIKES_TRUE_EXPOSURE.start + 60,
    );
    assert.equal(exposure.length, 1);
    const spikes = p.pulses.filter((x) => x !== exposure[0]);
    // Poisson arrivals, mean 45 min: 10000/45 = 222 expected, sd 14.9; overlapping
    // spikes merge (about 7 % of arrivals fall within the 2-5 min of the previous
    // spike), so allow 222 * 0.9 +- 4 sd.
    assert.ok(spikes.length > 200 - 60 && spikes.length < 222 + 60, `${spikes.length} spikes`);
    const unmerged = spikes.filter((x) => x.off - x.on <= 5);
    assert.ok(unmerged.length / spikes.length > 0.85, `${unmerged.length} of ${spikes.length} within 2-5 min`);
    for (const s of spikes) assert.ok(s.off - s.on >= 2);
  });

  test("Duration ladder: 1-80 min pulses, and the output is back at baseline before each next pulse", async () => {
    const body = byKey[DEMO_PROGRAM_KEYS.durationLadder].body as Extract<InputProgram, { kind: "ladder" }>;
    assert.equal(byKey[DEMO_PROGRAM_KEYS.durationLadder].name, "Duration ladder");
    assert.deepEqual(body.durations, [...LADDER_DURATIONS_MINUTES]);
    const end = body.start + body.durations.reduce((s, d) => s + d + body.gap, 0);
    const p = await preview(body, end);
    assert.deepEqual(
      p.pulses.map((x) => x.off - x.on),
      [1, 2, 5, 10, 20, 40, 80],
    );
    // Check on the mean-field (ODE) solution of each demo circuit from its OFF
    // steady state: just before each next pulse (and at the end) the output is
    // within 1 % of its largest excursion from baseline. "Back to baseline" is a
    // tolerance of our own choosing (common practice for settling).
    for (const d of DEMO_CIRCUITS) {
      const circuit = demoCircuitBody(d);
      const spec = RunSpecSchema.parse({
        circuit,
        program: body,
        inputSignal: "Q",
        endTimeMinutes: end,
        gridStepMinutes: 1,
        replicates: 1,
        seed: "ladder-check",
        start: "offSteadyState",
        burnInMinutes: 2000,
      });
      const sol = solveOde(spec);
      const ng = sol.times.length;
      const zi = circuit.species.findIndex((s) => s.name === circuit.outputSpecies);
      const z = (g: number) => sol.values[zi * ng + g];
      const baseline = z(0);
      let excursion = 0;
      for (let g = 0; g < ng; g++) excursion = Math.max(excursion, Math.abs(z(g) - baseline));
      assert.ok(excursion > 1, `${d.name}: the ladder moves the output`);
      const checks = [...p.pulses.slice(1).map((x) => x.on - 1), end];
      for (const tc of checks) {
        const g = Math.round(tc);
        assert.ok(
          Math.abs(z(g) - baseline) <= 0.01 * excursion,
          `${d.name}: at ${tc} min output ${z(g).toFixed(2)} vs baseline ${baseline.toFixed(2)}`,
        );
      }
    }
  });
});
