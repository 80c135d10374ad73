/**
 * Traces API: preview stores nothing, upload in one transaction, a rejected
 * upload stores nothing, line/column errors, size and row limits (multer errors
 * answer 4xx), roles and cross-lab 404s, settings changes recompute, soft
 * delete with restore (every other route answers 404 meanwhile) and the purge
 * after the undo period, metrics CSV, matching against a run and a sweep, the
 * demo seeder.
 *
 * One app per file; runs and sweeps are inserted as finished rows computed
 * directly with the engine (no worker pool), so the file stays fast.
 */
import { test, describe, before, after } from "node:test";
import assert from "node:assert/strict";
import { count, eq } from "drizzle-orm";
import { makeTestContext, signIn, type TestApp } from "@/tests/helpers/test-app";
import { checkCsvAgainstResource } from "@/tests/helpers/check-export";
import { schema } from "@/db/client";
import { newId } from "@/server/ids";
import { hashPassword } from "@/server/services/password";
import {
  DEMO_TRACES_FILE,
  DEMO_TRACES_KEY,
  DEMO_TRACES_NAME,
  DEMO_UPLOAD_OPTIONS,
  demoTracesCsv,
  seedDemoTraces,
} from "@/server/demo/traces";
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { templates } from "@/sim/circuit/templates";
import { setParameter } from "@/sim/circuit/parameters";
import { simulateChunk } from "@/sim/engine/simulate-chunk";
import { RunSpecSchema, type RunSpec } from "@/shared/schemas/run-spec";
import {
  MatchDetailSchema,
  TRACE_LIMITS,
  TracePreviewSchema,
  TraceSetDetailSchema,
  TraceSetListItemSchema,
  type TraceUploadOptionsInput,
} from "@/shared/schemas/api-traces";
import { ApiErrorSchema } from "@/shared/schemas/errors";
import { API_LIMITS } from "@/shared/schemas/api-runs";
import { cleanFileName, purgeDeletedTraceSets } from "@/server/services/traces.service";
import { purgeDeleted } from "@/server/services/runs.service";
import { listAudit } from "@/server/services/audit.service";

type Agent = Awaited<ReturnType<typeof signIn>>;
let t: TestApp;
let lab: string;
let editor: Agent;
let viewer: Agent;
let outsider: Agent;
let otherLab: string;

const PROGRAM = { kind: "ladder", start: 20, durations: [5, 60], repeats: 2, gap: 120 } as const;
// 2 pulses of 5 and 2 of 60 min: on at 20, 145, 270, 455 (ladder: duration then gap)
const SETTINGS = {
  thresholdMolecules: 50,
  windowMinutes: 30,
  background: { mode: "value", value: 100 },
  scale: { mode: "entered", unitsPerMolecule: 2 },
};
const OPTIONS: TraceUploadOptionsInput = {
  timeUnit: "min",
  schedule: { source: "column", column: "input" },
  settings: SETTINGS as never,
};

/** A small long-layout file: cell "a" responds to the 60-min pulse (delay 10), cell "b" never does. */
function smallCsv(): string {
  const lines = ["cell,time,value,input"];
  for (const cell of ["a", "b"]) {
    for (let tm = 0; tm <= 200; tm += 2) {
      const on = tm >= 20 && tm < 80 ? 1 : 0;
      const v = cell === "a" && tm >= 30 && tm < 90 ? 300 : 100;
      lines.push(`${cell},${tm},${v},${on}`);
    }
  }
  return lines.join("\n") + "\n";
}

function tableCounts() {
  return {
    sets: t.ctx.db.select({ n: count() }).from(schema.traceSets).get()!.n,
    cells: t.ctx.db.select({ n: count() }).from(schema.traceCells).get()!.n,
  };
}

function post(agent: Agent, path: string, text: string | Buffer, options: unknown = OPTIONS, fileName = "cells.csv") {
  return agent
    .post(path)
    .field("options", typeof options === "string" ? options : JSON.stringify(options))
    .attach("file", Buffer.isBuffer(text) ? text : Buffer.from(text), fileName);
}

function spec(k: number, seed: string, replicates = 30): RunSpec {
  const circuit = setParameter(templates["c1ffl-and"].circuit, "K(makeZ,hldB)", k);
  return RunSpecSchema.parse({
    circuit,
    program: PROGRAM,
    inputSignal: "Q",
    endTimeMinutes: 700,
    gridStepMinutes: 1,
    replicates,
    seed,
    threshold: { value: 50, windowMinutes: 30 },
  });
}

/** Inserts a finished run with its pulse_stats rows, computed directly with the engine. */
function insertRun(
  labId: string,
  s: RunSpec,
  status: "finished" | "running" = "finished",
  sweep?: { id: string; point: number },
): string {
  const id = newId("run_");
  const now = new Date();
  t.ctx.db
    .insert(schema.runs)
    .values({
      id,
      labId,
      name: `run ${id}`,
      status,
      spec: s,
      seed: s.seed,
      replicates: s.replicates,
      chunkSize: s.replicates,
      engineVersion: "test",
      sweepId: sweep?.id ?? null,
      sweepPoint: sweep?.point ?? null,
      replicatesDone: s.replicates,
      createdAt: now,
      finishedAt: now,
    })
    .run();
  if (status !== "finished") return id;
  const r = simulateChunk(s, 0, s.replicates, { trajectoryReplicates: 0 });
  for (const p of r.pulses) {
    t.ctx.db
      .insert(schema.pulseStats)
      .values({
        runId: id,
        replicate: p.replicate,
        pulseIndex: p.pulseIndex,
        on: p.on,
        off: p.off,
        durationBin: p.durationBin,
        excluded: p.excluded,
        passed: p.passed,
        delay: p.delay,
        offDelay: p.offDelay,
        width: p.widths[0] ?? null,
        widths: p.widths,
        peak: p.peak,
        timeToPeak: p.timeToPeak,
        fwhm: p.fwhm,
        baseline: p.baseline,
      })
      .run();
  }
  return id;
}

before(async () => {
  t = await makeTestContext();
  lab = t.demoLab!.id;
  [editor, viewer] = await Promise.all([signIn(t.app, "editor@example.org"), signIn(t.app, "viewer@example.org")]);
  // A user who owns another lab only.
  const uid = newId("usr_");
  otherLab = newId("lab_");
  const now = new Date();
  t.ctx.db
    .insert(schema.users)
    .values({
      id: uid,
      email: "outsider@example.org",
      displayName: "Outsider",
      passwordHash: await hashPassword("outsider-pass-1"),
      isSiteAdmin: false,
      notifyOnRunEnd: false,
      createdAt: now,
    })
    .run();
  t.ctx.db.insert(schema.labs).values({ id: otherLab, name: "Other lab", createdAt: now }).run();
  t.ctx.db.insert(schema.memberships).values({ labId: otherLab, userId: uid, role: "owner", createdAt: now }).run();
  outsider = await signIn(t.app, "outsider@example.org", "outsider-pass-1");
});
after(async () => {
  await t.close();
});

describe("preview", () => {
  test("answers the parsed preview with figures and stores nothing", async () => {
    const before = tableCounts();
    const r = await post(editor, `/api/labs/${lab}/traces/preview`, smallCsv());
    assert.equal(r.status, 200, JSON.stringify(r.body));
    const p = TracePreviewSchema.parse(r.body);
    assert.equal(p.layout, "long");
    assert.equal(p.cellCount, 2);
    assert.deepEqual(p.schedule, [{ on: 20, off: 80 }]);
    const [a, b] = p.analysis.cells;
    // threshold 100 + 2 x 50 = 200; a jumps 100 -> 300 between frames 28 and 30: linear crossing at 29
    assert.equal(a.thresholdTraceUnits, 200);
    assert.equal(a.pulses[0].delay, 9);
    assert.equal(b.pulses[0].passed, false);
    assert.deepEqual(tableCounts(), before);
  });

  test("a bad file answers 400 naming line and column, and stores nothing", async () => {
    const before = tableCounts();
    const text = smallCsv().replace("a,4,100,0", "a,4,bright,0");
    const r = await post(editor, `/api/labs/${lab}/traces/preview`, text);
    assert.equal(r.status, 400);
    ApiErrorSchema.parse(r.body);
    assert.equal(r.body.error.code, "invalid_traces");
    assert.deepEqual(r.body.error.lines[0], { line: 4, column: 3, message: 'value "bright" is not a number' });
    assert.match(r.body.error.message, /line 4, column 3/);
    assert.deepEqual(tableCounts(), before);
  });

  test("a viewer may not upload (403); another lab's member gets 404", async () => {
    assert.equal((await post(viewer, `/api/labs/${lab}/traces/preview`, smallCsv())).status, 403);
    assert.equal((await post(outsider, `/api/labs/${lab}/traces/preview`, smallCsv())).status, 404);
  });
});

describe("upload limits and bad requests (4xx, never 500; nothing stored)", () => {
  test("a file over the size limit answers 413", async () => {
    const before = tableCounts();
    const big = Buffer.alloc(TRACE_LIMITS.maxFileBytes + 1024, "a,1,1\n");
    const r = await post(editor, `/api/labs/${lab}/traces`, big).catch((e) => e.response ?? Promise.reject(e));
    assert.equal(r.status, 413);
    assert.equal(r.body.error.code, "file_too_large");
    assert.match(r.body.error.message, /larger than 5 MB/);
    assert.deepEqual(tableCounts(), before);
  });

  test("too many rows names the line where the limit is passed", async () => {
    const lines = ["time,c1"];
    for (let i = 0; i <= TRACE_LIMITS.maxRows + 5; i++) lines.push(`${i},1`);
    const r = await post(editor, `/api/labs/${lab}/traces`, lines.join("\n"));
    assert.equal(r.status, 400);
    assert.match(r.body.error.lines[0].message, /too many rows/);
    assert.equal(r.body.error.lines[0].line, TRACE_LIMITS.maxRows + 2);
  });

  test("missing file, bad options JSON, invalid options, a second file field", async () => {
    let r = await editor.post(`/api/labs/${lab}/traces`).field("options", JSON.stringify(OPTIONS));
    assert.equal(r.status, 400);
    assert.match(r.body.error.message, /form field "file"/);
    r = await post(editor, `/api/labs/${lab}/traces`, smallCsv(), "{not json");
    assert.equal(r.status, 400);
    assert.match(r.body.error.message, /not valid JSON/);
    r = await post(editor, `/api/labs/${lab}/traces`, smallCsv(), { ...OPTIONS, timeUnit: "days" });
    assert.equal(r.status, 400);
    assert.match(r.body.error.message, /timeUnit/);
    r = await editor
      .post(`/api/labs/${lab}/traces`)
      .field("options", JSON.stringify(OPTIONS))
      .attach("data", Buffer.from(smallCsv()), "x.csv");
    assert.equal(r.status, 400);
    assert.equal(r.body.error.code, "bad_upload");
  });

  test("a rejected upload stores nothing (late error: too few points in the last cell)", async () => {
    const before = tableCounts();
    const text = smallCsv() + "c,0,1,0\nc,2,1,0\n";
    const r = await post(editor, `/api/labs/${lab}/traces`, text);
    assert.equal(r.status, 400);
    assert.match(r.body.error.lines[0].message, /cell "c" has 2 values/);
    assert.deepEqual(tableCounts(), before);
  });
});

describe("other layouts and schedule sources", () => {
  test("wide TSV in seconds, schedule from a saved input program", async () => {
    const programId = newId("prg_");
    const now = new Date();
    t.ctx.db
      .insert(schema.inputPrograms)
      .values({
        id: programId,
        labId: lab,
        name: "One pulse",
        body: { kind: "pulses", pulses: [{ start: 1, duration: 2 }] },
        createdAt: now,
        updatedAt: now,
      })
      .run();
    const rows = ["time\tc1\tc2"];
    for (let s = 0; s <= 600; s += 30) rows.push(`${s}\t${s >= 90 ? 300 : 100}\t${s >= 400 ? "" : 100}`);
    const r = await post(
      editor,
      `/api/labs/${lab}/traces/preview`,
      rows.join("\n"),
      {
        ...OPTIONS,
        timeUnit: "s",
        schedule: { source: "program", programId },
        settings: { ...SETTINGS, windowMinutes: 5 },
      },
      "cells.tsv",
    );
    assert.equal(r.status, 200, JSON.stringify(r.body));
    const p = TracePreviewSchema.parse(r.body);
    assert.equal(p.layout, "wide");
    assert.equal(p.delimiter, "tab");
    assert.deepEqual(p.timeRangeMinutes, [0, 10]);
    assert.deepEqual(
      p.schedule.map((x) => [x.on, x.off]),
      [[1, 3]],
    );
    // c1 jumps 100 -> 300 between 1 and 1.5 min: crossing of 200 at 1.25 min
    assert.equal(p.analysis.cells[0].pulses[0].delay, 0.25);
    // c2 ends at 6.5 min, before the window of the pulse closes (3 + 5 = 8 min): not scored
    assert.deepEqual(p.analysis.cells[1].skipped, [{ pulseIndex: 0, reason: "notCovered" }]);
    const other = newId("prg_");
    t.ctx.db
      .insert(schema.inputPrograms)
      .values({
        id: other,
        labId: otherLab,
        name: "Foreign",
        body: { kind: "pulses", pulses: [{ start: 1, duration: 2 }] },
        createdAt: now,
        updatedAt: now,
      })
      .run();
    const bad = await post(editor, `/api/labs/${lab}/traces/preview`, rows.join("\n"), {
      ...OPTIONS,
      timeUnit: "s",
      schedule: { source: "program", programId: other },
    });
    assert.equal(bad.status, 400);
    assert.match(bad.body.error.message, /program was not found/);
  });
});

describe("stored trace sets", () => {
  let id: string;
  before(async () => {
    const r = await post(editor, `/api/labs/${lab}/traces`, smallCsv(), { ...OPTIONS, name: "Two cells" });
    assert.equal(r.status, 201, JSON.stringify(r.body));
    id = TraceSetDetailSchema.parse(r.body).id;
  });

  test("upload stores the set and its cells in one go, with who uploaded it", async () => {
    const row = t.ctx.db.select().from(schema.traceSets).where(eq(schema.traceSets.id, id)).get()!;
    assert.equal(row.cellCount, 2);
    assert.equal(row.synthetic, false);
    assert.equal(
      t.ctx.db.select({ n: count() }).from(schema.traceCells).where(eq(schema.traceCells.traceSetId, id)).get()!.n,
      2,
    );
    const list = await viewer.get(`/api/labs/${lab}/traces`).expect(200);
    const item = list.body.items.find((x: { id: string }) => x.id === id);
    assert.equal(item.uploadedByName, "Demo editor");
    assert.equal(item.fileName, "cells.csv");
  });

  test("a non-ASCII file name is stored as sent (UTF-8), with control characters removed", async () => {
    const r = await post(editor, `/api/labs/${lab}/traces`, smallCsv(), OPTIONS, "名前\u0085.csv");
    assert.equal(r.status, 201, JSON.stringify(r.body));
    const row = t.ctx.db.select().from(schema.traceSets).where(eq(schema.traceSets.id, r.body.id)).get()!;
    assert.equal(row.fileName, "名前.csv");
    assert.equal(row.name, "名前");
    assert.equal(cleanFileName("a\u0007b\u001b[2J\u007f.csv"), "ab[2J.csv");
    assert.equal(cleanFileName("../../etc/x.csv"), "x.csv");
    assert.equal(cleanFileName("\u0001"), null);
  });

  test("detail for a viewer; 404 for another lab's member", async () => {
    const d = TraceSetDetailSchema.parse((await viewer.get(`/api/traces/${id}`).expect(200)).body);
    assert.equal(d.analysis.summary.analysis.counts.passed, 1);
    assert.equal(d.cells.length, 2);
    const r = await outsider.get(`/api/traces/${id}`);
    assert.equal(r.status, 404);
    assert.equal((await outsider.get(`/api/labs/${lab}/traces`)).status, 404);
  });

  test("changing the threshold recomputes the figures", async () => {
    const r = await editor.patch(`/api/traces/${id}`).send({ settings: { ...SETTINGS, thresholdMolecules: 150 } });
    assert.equal(r.status, 200, JSON.stringify(r.body));
    // 100 + 2 x 150 = 400 is above both cells
    assert.equal(TraceSetDetailSchema.parse(r.body).analysis.summary.analysis.counts.passed, 0);
    assert.equal((await viewer.patch(`/api/traces/${id}`).send({ name: "x" })).status, 403);
    await editor.patch(`/api/traces/${id}`).send({ settings: SETTINGS }).expect(200);
  });

  test("metrics CSV", async () => {
    const r = await viewer.get(`/api/traces/${id}/export/metrics.csv`).expect(200);
    assert.match(r.headers["content-type"], /text\/csv/);
    const lines = r.text.trim().split("\n");
    assert.equal(lines.length, 3);
    assert.match(lines[0], /^cell,pulse_index,on_min/);
    assert.match(lines[1], /^a,0,20,80,60,false,true,9,/);
    // every export loads as its data dictionary says (docs/metrics.md, "Exports")
    const pkg = (await viewer.get(`/api/traces/${id}/export/datapackage.json`).expect(200)).body;
    for (const file of ["metrics.csv", "output-pulses.csv"]) {
      const res = await viewer.get(`/api/traces/${id}/export/${file}`).expect(200);
      const name = /filename="([^"]+)"/.exec(res.headers["content-disposition"])![1];
      const entry = pkg.resources.find((x: { path: string }) => x.path === name);
      assert.ok(entry, `${name} is in datapackage.json`);
      const rows = checkCsvAgainstResource(res.text, entry);
      if (file === "metrics.csv") assert.equal(rows.length, 2);
      if (file === "output-pulses.csv")
        assert.equal(
          rows.length,
          lines.slice(1).reduce((n, l) => n + Number(l.split(",")[9]), 0),
        );
    }
  });

  test("metrics CSV neutralises formula-like cell ids (OWASP CSV injection) and keeps plain numbers", async () => {
    const ids = ['=HYPERLINK("http://x.example","y")', "+SUM(1+1)", "@cmd", "-1+2", "-1.5"];
    const quoted = (c: string) => (/[",]/.test(c) ? `"${c.replace(/"/g, '""')}"` : c);
    const text = smallCsv().replace(/^a,/gm, "A,").replace(/^b,/gm, "B,");
    const rows = text.trim().split("\n");
    const body = ids.flatMap((c) =>
      rows
        .slice(1)
        .filter((l) => l.startsWith("A,"))
        .map((l) => quoted(c) + l.slice(1)),
    );
    const up = await post(editor, `/api/labs/${lab}/traces`, [rows[0], ...body].join("\n") + "\n", OPTIONS);
    assert.equal(up.status, 201, JSON.stringify(up.body));
    const csv = await viewer.get(`/api/traces/${up.body.id}/export/metrics.csv`).expect(200);
    const text2 = csv.text;
    assert.ok(text2.includes(`"'=HYPERLINK(""http://x.example"",""y"")",0,`), text2);
    assert.ok(text2.includes("\n'+SUM(1+1),0,"), text2);
    assert.ok(text2.includes("\n'@cmd,0,"), text2);
    assert.ok(text2.includes("\n'-1+2,0,"), text2);
    assert.ok(text2.includes("\n-1.5,0,"), text2);
  });

  test("match against a run from another lab is a 404; unfinished run a 409", async () => {
    const foreign = insertRun(otherLab, spec(100, "foreign", 2));
    assert.equal((await editor.post(`/api/traces/${id}/match`).send({ runId: foreign })).status, 404);
    const running = insertRun(lab, spec(100, "running", 2), "running");
    assert.equal((await editor.post(`/api/traces/${id}/match`).send({ runId: running })).status, 409);
    assert.equal((await viewer.post(`/api/traces/${id}/match`).send({ runId: running })).status, 403);
  });

  test("delete hides the set from every route but restore; restore brings it back; both are audited", async () => {
    const r = await post(editor, `/api/labs/${lab}/traces`, smallCsv(), { ...OPTIONS, name: "To delete" });
    const delId = TraceSetDetailSchema.parse(r.body).id;
    // A running run: matching the live set answers 409 (run not finished), so a 404 below is the set's.
    const running = insertRun(lab, spec(100, "running-for-delete", 2), "running");
    assert.equal((await editor.post(`/api/traces/${delId}/match`).send({ runId: running })).status, 409);
    assert.equal((await viewer.post(`/api/traces/${delId}/restore`)).status, 403, "a viewer may not restore");
    assert.equal((await editor.post(`/api/traces/${delId}/restore`)).status, 409, "a live set cannot be restored");

    await editor.delete(`/api/traces/${delId}`).expect(200);
    const row = t.ctx.db.select().from(schema.traceSets).where(eq(schema.traceSets.id, delId)).get()!;
    assert.ok(row.deletedAt, "soft delete keeps the row");
    const gone = await viewer.get(`/api/traces/${delId}`);
    assert.equal(gone.status, 404);
    assert.match(ApiErrorSchema.parse(gone.body).error.message, /traceSet/);
    assert.equal((await editor.patch(`/api/traces/${delId}`).send({ name: "x" })).status, 404, "PATCH");
    assert.equal((await viewer.get(`/api/traces/${delId}/export/metrics.csv`)).status, 404, "export");
    const match = await editor.post(`/api/traces/${delId}/match`).send({ runId: running });
    assert.equal(match.status, 404, "match");
    assert.match(match.body.error.message, /traceSet/);
    assert.equal(
      (await editor.delete(`/api/traces/${delId}`)).status,
      409,
      "a second delete (already deleted, as for runs and sweeps)",
    );
    const list = await viewer.get(`/api/labs/${lab}/traces`).expect(200);
    assert.ok(!list.body.items.some((x: { id: string }) => x.id === delId), "not listed");
    // Restore is for editors of the set's lab only.
    assert.equal((await outsider.post(`/api/traces/${delId}/restore`)).status, 404);
    assert.equal((await viewer.post(`/api/traces/${delId}/restore`)).status, 403);

    const restored = await editor.post(`/api/traces/${delId}/restore`).expect(200);
    const item = TraceSetListItemSchema.parse(restored.body);
    assert.equal(item.id, delId);
    assert.equal(item.name, "To delete");
    const back = TraceSetDetailSchema.parse((await viewer.get(`/api/traces/${delId}`).expect(200)).body);
    assert.equal(back.cells.length, 2);
    assert.ok(
      (await viewer.get(`/api/labs/${lab}/traces`).expect(200)).body.items.some((x: { id: string }) => x.id === delId),
      "listed again",
    );
    assert.equal((await editor.post(`/api/traces/${delId}/restore`)).status, 409, "restoring twice");

    const events = listAudit(t.ctx, lab, { limit: 20 })
      .filter((e) => e.targetId === delId)
      .map((e) => e.action);
    assert.deepEqual(events.slice(0, 2), ["traces.restored", "traces.deleted"]);
  });

  test(`a deleted set is purged after the undo period (${API_LIMITS.undoDays} days), not before`, async () => {
    const r = await post(editor, `/api/labs/${lab}/traces`, smallCsv(), { ...OPTIONS, name: "To purge" });
    const purgeId = TraceSetDetailSchema.parse(r.body).id;
    const keepId = TraceSetDetailSchema.parse(
      (await post(editor, `/api/labs/${lab}/traces`, smallCsv(), { ...OPTIONS, name: "Kept" })).body,
    ).id;
    await editor.delete(`/api/traces/${purgeId}`).expect(200);
    const deletedAt = t.ctx.db
      .select()
      .from(schema.traceSets)
      .where(eq(schema.traceSets.id, purgeId))
      .get()!
      .deletedAt!.getTime();
    const day = 86_400_000;
    const exists = (id: string) => !!t.ctx.db.select().from(schema.traceSets).where(eq(schema.traceSets.id, id)).get();
    const cells = (id: string) =>
      t.ctx.db.select({ n: count() }).from(schema.traceCells).where(eq(schema.traceCells.traceSetId, id)).get()!.n;

    purgeDeletedTraceSets(t.ctx, deletedAt + API_LIMITS.undoDays * day - 60_000);
    assert.ok(exists(purgeId), "one minute before the end of the undo period the set is still there");
    // Still restorable then: restore, delete again (deletedAt moves on a little).
    await editor.post(`/api/traces/${purgeId}/restore`).expect(200);
    await editor.delete(`/api/traces/${purgeId}`).expect(200);

    // The boot-time purge (runs.service purgeDeleted) includes trace sets.
    purgeDeleted(t.ctx, Date.now() + API_LIMITS.undoDays * day + 60_000);
    assert.equal(exists(purgeId), false, "purged after the undo period");
    assert.equal(cells(purgeId), 0, "its cells go with it");
    assert.ok(exists(keepId), "a set that is not deleted stays");
    assert.equal(cells(keepId), 2);
    assert.equal((await editor.post(`/api/traces/${purgeId}/restore`)).status, 404, "nothing left to restore");
  });
});

describe("matching and the demo set", () => {
  let demoId: string;
  before(() => {
    seedDemoTraces(t.ctx, t.demoLab!);
    seedDemoTraces(t.ctx, t.demoLab!); // idempotent
    const rows = t.ctx.db.select().from(schema.traceSets).where(eq(schema.traceSets.demoKey, DEMO_TRACES_KEY)).all();
    assert.equal(rows.length, 1);
    demoId = rows[0].id;
  });

  test("the demo set is labelled synthetic, has about 40 cells and the demo options parse its file", async () => {
    const d = TraceSetDetailSchema.parse((await viewer.get(`/api/traces/${demoId}`).expect(200)).body);
    assert.equal(d.name, DEMO_TRACES_NAME);
    assert.equal(d.synthetic, true);
    assert.equal(d.cellCount, 40);
    assert.ok(d.analysis.summary.analysis.counts.passed > 0);
    const csv = await viewer.get(`/api/traces/${demoId}/export/metrics.csv`).expect(200);
    // labelled synthetic in every row (a column, so the file still loads in one line) and in its dictionary
    const rows = csv.text.trim().split("\n");
    assert.ok(rows[0].endsWith(",synthetic"));
    assert.ok(rows.slice(1).every((l) => l.endsWith(",true")));
    const pkg = (await viewer.get(`/api/traces/${demoId}/export/datapackage.json`).expect(200)).body;
    assert.equal(pkg.synthetic, true);
    assert.match(pkg.description, /SYNTHETIC/);
    assert.equal(DEMO_UPLOAD_OPTIONS.name, DEMO_TRACES_NAME);
  });

  test("the committed demo file is what the recipe makes, and uploads with the demo options", async () => {
    const text = readFileSync(join(__dirname, "..", "..", "docs", "examples", DEMO_TRACES_FILE), "utf8");
    assert.equal(
      text.replace(/^#.*\n/, ""),
      demoTracesCsv(),
      "docs/examples/demo-traces.csv is stale: run npx tsx scripts/make-demo-traces.ts",
    );
    const r = await post(editor, `/api/labs/${lab}/traces/preview`, text, DEMO_UPLOAD_OPTIONS, DEMO_TRACES_FILE);
    assert.equal(r.status, 200, JSON.stringify(r.body).slice(0, 500));
    const p = TracePreviewSchema.parse(r.body);
    assert.equal(p.cellCount, 40);
    assert.equal(p.schedule.length, 7, "the Duration ladder's seven pulses");
  });

  test("match a run: one ranked point, stored, readable by a viewer; notes name a schedule difference", async () => {
    const traces = (await post(editor, `/api/labs/${lab}/traces`, smallCsv(), { ...OPTIONS, name: "For run match" }))
      .body.id;
    const runId = insertRun(lab, spec(100, "one-run"));
    const r = await editor.post(`/api/traces/${traces}/match`).send({ runId });
    assert.equal(r.status, 201, JSON.stringify(r.body));
    const m = MatchDetailSchema.parse(r.body);
    assert.equal(m.result.pointCount, 1);
    assert.equal(m.result.points[0].accepted, true);
    assert.ok(m.result.notes.some((n) => /differs from the traces' schedule/.test(n)));
    const again = MatchDetailSchema.parse((await viewer.get(`/api/matches/${m.id}`).expect(200)).body);
    assert.deepEqual(again.result.points, m.result.points);
    assert.equal((await outsider.get(`/api/matches/${m.id}`)).status, 404);
    // The match goes with its trace set: hidden while the set is deleted, back when it is restored.
    await editor.delete(`/api/traces/${traces}`).expect(200);
    assert.equal((await viewer.get(`/api/matches/${m.id}`)).status, 404);
    await editor.post(`/api/traces/${traces}/restore`).expect(200);
    await viewer.get(`/api/matches/${m.id}`).expect(200);
  });

  test("match a sweep: ranked points with parameters, 5% tolerance by default, unfinished points skipped", async () => {
    const sweepId = newId("swp_");
    const ks = [40, 100, 250];
    t.ctx.db
      .insert(schema.sweeps)
      .values({
        id: sweepId,
        labId: lab,
        name: "K sweep",
        baseSpec: spec(100, "base"),
        axes: [{ parameter: "K(makeZ,hldB)", values: [...ks, 600] }],
        status: "running",
        pointCount: 4,
        createdAt: new Date(),
      })
      .run();
    ks.forEach((k, i) => insertRun(lab, spec(k, `pt-${i}`), "finished", { id: sweepId, point: i }));
    insertRun(lab, spec(600, "pt-3"), "running", { id: sweepId, point: 3 });
    const traces = (await post(editor, `/api/labs/${lab}/traces`, smallCsv(), { ...OPTIONS, name: "For sweep match" }))
      .body.id;
    const r = await editor.post(`/api/traces/${traces}/match`).send({ sweepId });
    assert.equal(r.status, 201, JSON.stringify(r.body));
    const m = MatchDetailSchema.parse(r.body).result;
    assert.equal(m.pointCount, 3);
    assert.equal(m.acceptedCount, 1, "ceil(5% of 3) = 1");
    assert.deepEqual(
      m.points.map((p) => p.rank),
      [1, 2, 3],
    );
    assert.deepEqual(
      m.points.map((p) => p.parameters["K(makeZ,hldB)"]).sort((a, b) => a - b),
      ks,
    );
    assert.equal(m.skippedRuns.length, 1);
    assert.deepEqual(m.ranges[0].sweptMin, 40);
    const d = await viewer.get(`/api/traces/${traces}`).expect(200);
    assert.equal(d.body.matches.length, 1);
  });
});
