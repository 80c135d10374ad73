/**
 * Cursor pagination of list routes (shared/schemas/pagination.ts): pages in
 * the documented order, every item once, a null cursor on the last page,
 * stable when items are added between pages, and a 400 naming the field for a
 * bad cursor or limit.
 */
import { describe, test, before, after } from "node:test";
import assert from "node:assert/strict";
import { makeTestContext, signIn, type TestApp } from "@/tests/helpers/test-app";
import { launchBody } from "@/tests/helpers/run-helpers";
import { schema } from "@/db/client";
import { eq } from "drizzle-orm";
import { API_LIMITS, RunListPageSchema, SweepListPageSchema } from "@/shared/schemas/api-runs";
import { PAGE_SIZE } from "@/shared/schemas/pagination";
import { assertContract } from "@/tests/helpers/contract";
import { getRunRow, toListItem } from "@/server/services/runs.service";

describe("run list pages", () => {
  let t: TestApp;
  let editor: Awaited<ReturnType<typeof signIn>>;
  let labId: string;
  /** Launched ids with the created time and status set by hand. */
  const made: { id: string; created: number; status: "running" | "queued" | "finished" }[] = [];

  async function make(created: number, status: "running" | "queued" | "finished") {
    const r = await editor
      .post(`/api/labs/${labId}/runs`)
      .send(launchBody({ replicates: 100, seed: `p${made.length}` }));
    assert.equal(r.status, 201, JSON.stringify(r.body));
    t.ctx.db
      .update(schema.runs)
      .set({ createdAt: new Date(created), status })
      .where(eq(schema.runs.id, r.body.id))
      .run();
    made.push({ id: r.body.id, created, status });
  }

  before(async () => {
    t = await makeTestContext();
    editor = await signIn(t.app, "editor@example.org");
    labId = t.demoLab!.id;
    // Two share a created time, so the id breaks the tie.
    const base = Date.UTC(2026, 0, 1);
    for (const [minutes, status] of [
      [1, "finished"],
      [2, "finished"],
      [2, "finished"],
      [3, "queued"],
      [4, "finished"],
      [5, "running"],
      [6, "finished"],
    ] as const)
      await make(base + minutes * 60_000, status);
  });
  after(async () => t.close());

  /** The documented order: running, queued, then newest first; ties by id. */
  function expectedOrder(): string[] {
    const rank = (s: string) => (s === "running" ? 0 : s === "queued" ? 1 : 2);
    return [...made]
      .sort((a, b) => rank(a.status) - rank(b.status) || b.created - a.created || (a.id < b.id ? -1 : 1))
      .map((r) => r.id);
  }

  async function allPages(limit: number, between?: () => Promise<void>): Promise<{ ids: string[]; pages: number }> {
    const ids: string[] = [];
    let cursor: string | null = null;
    let pages = 0;
    do {
      const qs: string = `?limit=${limit}${cursor ? `&cursor=${encodeURIComponent(cursor)}` : ""}`;
      const r = await editor.get(`/api/labs/${labId}/runs${qs}`).expect(200);
      assertContract(RunListPageSchema, r.body, "GET /api/labs/:labId/runs");
      assert.ok(r.body.items.length <= limit);
      ids.push(...r.body.items.map((i: { id: string }) => i.id));
      cursor = r.body.nextCursor;
      pages++;
      if (pages === 1 && between) await between();
    } while (cursor);
    return { ids, pages };
  }

  test("pages of 3 give every run once, in order, and end with a null cursor", async () => {
    const { ids, pages } = await allPages(3);
    assert.deepEqual(ids, expectedOrder());
    assert.equal(pages, 3, "7 runs in pages of 3");
  });

  test("the default page holds up to PAGE_SIZE items and says there is no more", async () => {
    const r = await editor.get(`/api/labs/${labId}/runs`).expect(200);
    assert.ok(made.length < PAGE_SIZE);
    assert.equal(r.body.items.length, made.length);
    assert.equal(r.body.nextCursor, null);
  });

  test("a run added after the first page does not repeat or shift the later pages", async () => {
    const before = expectedOrder();
    const { ids } = await allPages(2, async () => {
      // First page (2): the running run, then the queued one. A second running run sorts before that cursor.
      await make(Date.UTC(2026, 0, 1), "running");
    });
    assert.equal(new Set(ids).size, ids.length, "no run twice");
    assert.deepEqual(ids, before, "the new run is before the cursor, so it is not in the later pages");
    // ...and a fresh walk has it in its place.
    assert.deepEqual((await allPages(2)).ids, expectedOrder());
  });

  test("list items read lean from SQL equal the full item the detail is built from", async () => {
    // One run with (hand-made) summary figures, so the headline is read too.
    t.ctx.db
      .update(schema.runs)
      .set({
        summary: {
          d50: 12.5,
          falsePassRate: 0.1,
          delay: { median: 3 },
          byDuration: [
            { duration: 1, passProbability: 0 },
            { duration: 80, passProbability: 0.9 },
          ],
        } as any,
      })
      .where(eq(schema.runs.id, made[0].id))
      .run();
    const items = (await editor.get(`/api/labs/${labId}/runs?limit=200`).expect(200)).body.items;
    assert.equal(items.length, made.length);
    const full = (id: string) => {
      const row = getRunRow(t.ctx, id);
      const names = new Map([[row.createdBy!, "Demo editor"]]);
      return JSON.parse(JSON.stringify(toListItem(t.ctx, row, names)));
    };
    for (const item of items) assert.deepEqual(item, full(item.id));
    const withSummary = items.find((i: { id: string }) => i.id === made[0].id);
    assert.deepEqual(withSummary.headline, {
      d50: 12.5,
      falsePassRate: 0.1,
      medianDelay: 3,
      longestDuration: 80,
      passAtLongest: 0.9,
    });
  });

  test("a cursor that is not one, or a limit out of range, is a 400 naming the field", async () => {
    for (const [qs, field] of [
      ["cursor=not-a-cursor", "cursor"],
      [`cursor=${Buffer.from('["x"]').toString("base64url")}`, "cursor"],
      ["limit=0", "limit"],
      ["limit=201", "limit"],
    ]) {
      const r = await editor.get(`/api/labs/${labId}/runs?${qs}`);
      assert.equal(r.status, 400, `${qs}: ${JSON.stringify(r.body)}`);
      assert.ok(
        r.body.error.fields.some((f: { path: string }) => f.path === field),
        `${qs}: ${JSON.stringify(r.body.error)}`,
      );
    }
  });
});

describe("sweep list pages", () => {
  test("pages of 2 give every sweep once, newest first, ending with a null cursor", async () => {
    const t = await makeTestContext();
    try {
      const editor = await signIn(t.app, "editor@example.org");
      const labId = t.demoLab!.id;
      const ids: string[] = [];
      for (let i = 0; i < 5; i++) {
        const id = `swp_page${i}`;
        t.ctx.db
          .insert(schema.sweeps)
          .values({
            id,
            labId,
            name: `Sweep ${i}`,
            baseSpec: {} as any,
            axes: [{ parameter: "rate(make)", values: [1, 2] }],
            status: "finished",
            pointCount: 2,
            createdBy: null,
            // two share a time: the id breaks the tie
            createdAt: new Date(Date.UTC(2026, 0, 1, 0, Math.min(i, 3))),
          })
          .run();
        ids.push(id);
      }
      const seen: string[] = [];
      let cursor: string | null = null;
      let pages = 0;
      do {
        const qs: string = `?limit=2${cursor ? `&cursor=${encodeURIComponent(cursor)}` : ""}`;
        const r = await editor.get(`/api/labs/${labId}/sweeps${qs}`).expect(200);
        assertContract(SweepListPageSchema, r.body, "GET /api/labs/:labId/sweeps");
        seen.push(...r.body.items.map((s: { id: string }) => s.id));
        cursor = r.body.nextCursor;
        pages++;
      } while (cursor);
      assert.equal(pages, 3);
      assert.deepEqual(seen, ["swp_page3", "swp_page4", "swp_page2", "swp_page1", "swp_page0"]);
      await editor.get(`/api/labs/${labId}/sweeps?cursor=bad`).expect(400);
    } finally {
      await t.close();
    }
  });
});

describe("runs by id and matched controls", () => {
  test("?ids= finds runs beyond the first page (archived too), in the order asked, only the lab's own", async () => {
    const t = await makeTestContext();
    try {
      const editor = await signIn(t.app, "editor@example.org");
      const labId = t.demoLab!.id;
      const ids: string[] = [];
      for (let i = 0; i < 4; i++) {
        const r = await editor.post(`/api/labs/${labId}/runs`).send(launchBody({ replicates: 100, seed: `ids${i}` }));
        assert.equal(r.status, 201, JSON.stringify(r.body));
        ids.push(r.body.id);
      }
      // The oldest is archived and is a matched control of the newest.
      t.ctx.db
        .update(schema.runs)
        .set({ archivedAt: new Date(), controlOf: ids[3] })
        .where(eq(schema.runs.id, ids[0]))
        .run();
      const first = await editor.get(`/api/labs/${labId}/runs?limit=1`).expect(200);
      assert.equal(first.body.items.length, 1);
      const wanted = [ids[1], ids[0], "run_nope"];
      const r = await editor.get(`/api/labs/${labId}/runs?ids=${wanted.join(",")}`).expect(200);
      assertContract(RunListPageSchema, r.body, "GET /api/labs/:labId/runs?ids=");
      assert.deepEqual(
        r.body.items.map((i: { id: string }) => i.id),
        [ids[1], ids[0]],
      );
      assert.equal(r.body.nextCursor, null);

      // Another lab's owner asking its own lab for these ids gets none of them.
      const other = await signIn(t.app, "viewer@example.org");
      const otherLab = (await other.post("/api/labs").send({ name: "Elsewhere" }).expect(201)).body.lab.id;
      const none = await other.get(`/api/labs/${otherLab}/runs?ids=${ids.join(",")}`).expect(200);
      assert.deepEqual(none.body.items, []);

      // The cap is documented (API_LIMITS.maxRunIdsPerLookup) and a 400 names `ids`.
      const many = Array.from({ length: API_LIMITS.maxRunIdsPerLookup + 1 }, (_, i) => `run_${i}`).join(",");
      const tooMany = await editor.get(`/api/labs/${labId}/runs?ids=${many}`);
      assert.equal(tooMany.status, 400);
      assert.ok(
        tooMany.body.error.fields.some((f: { path: string }) => f.path === "ids"),
        JSON.stringify(tooMany.body),
      );

      // ?controlOf= finds the control wherever it sits in the list (archived ones with ?archived=1).
      const controls = await editor.get(`/api/labs/${labId}/runs?controlOf=${ids[3]}&archived=1`).expect(200);
      assert.deepEqual(
        controls.body.items.map((i: { id: string }) => i.id),
        [ids[0]],
      );
      const noControl = await editor.get(`/api/labs/${labId}/runs?controlOf=${ids[2]}`).expect(200);
      assert.deepEqual(noControl.body.items, []);
    } finally {
      await t.close();
    }
  });
});
