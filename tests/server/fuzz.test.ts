/**
 * Fuzzed bodies over every write route of the route table (walked like
 * tests/server/authorization.test.ts, so a new route is fuzzed without writing
 * a test for it). The caller is the owner of a fixture lab who is also a site
 * admin, so every access rule lets the body through to validation. For each
 * route fast-check (fixed seed) generates bodies: any JSON value, objects with
 * the route's own field names holding any JSON value, and objects of those
 * names holding strings, numbers and nested arrays that are near the limits.
 *
 * Checked for every request: the answer is never a 5xx; and when the answer is
 * a 4xx, the stored data (every table but the sessions table) is byte for
 * byte what it was before the request. A request that is accepted (2xx) may
 * change data; the fixture is then rebuilt so later requests still reach
 * their objects.
 */
import { describe, test, before, after } from "node:test";
import assert from "node:assert/strict";
import { createHash } from "node:crypto";
import type { AddressInfo } from "node:net";
import type { Server } from "node:http";
import * as fc from "fast-check";
import type { ZodType } from "zod";
import { eq } from "drizzle-orm";
import { allRoutes } from "@/server/routes";
import type { RouteDef } from "@/server/routes/route-table";
import type { ResourceKind } from "@/server/services/access.service";
import { schema } from "@/db/client";
import { newId } from "@/server/ids";
import { fixtureSpec } from "@/tests/helpers/fixture-spec";
import { makeTestContext, DEMO_PASSWORD, type TestApp } from "@/tests/helpers/test-app";

/** Fixed so a failure replays exactly; change it only on purpose. */
const SEED = 20261202;
/** Bodies per write route (about 50 write routes: a few thousand requests in all). */
const RUNS_PER_ROUTE = 40;
/** Routes whose success would end the caller's session; their bodies are ignored anyway. */
const SKIP = new Set(["post /auth/sign-out"]);

const { circuit, program, spec } = fixtureSpec("Fuzz circuit", "fuzz");

type Fixture = { labId: string } & Partial<Record<ResourceKind, string>>;

/** A fresh lab owned by `owner` with one object of every resource kind. */
function buildFixture(t: TestApp, owner: string): Fixture {
  return t.ctx.sqlite.transaction(() => insertFixture(t, owner))();
}

function insertFixture(t: TestApp, owner: string): Fixture {
  const db = t.ctx.db;
  const now = new Date();
  const labId = newId("lab_");
  db.insert(schema.labs).values({ id: labId, name: "Fuzz lab", createdAt: now }).run();
  db.insert(schema.memberships).values({ labId, userId: owner, role: "owner", createdAt: now }).run();
  const cir = newId("cir_");
  db.insert(schema.circuits)
    .values({
      id: cir,
      labId,
      name: "Fuzz circuit",
      currentVersion: 1,
      createdBy: owner,
      createdAt: now,
      updatedAt: now,
    })
    .run();
  db.insert(schema.circuitVersions)
    .values({ circuitId: cir, version: 1, body: circuit, createdBy: owner, createdAt: now })
    .run();
  const prg = newId("prg_");
  db.insert(schema.inputPrograms)
    .values({ id: prg, labId, name: "Fuzz program", body: program, createdBy: owner, createdAt: now, updatedAt: now })
    .run();
  const run = newId("run_");
  db.insert(schema.runs)
    .values({
      id: run,
      labId,
      name: "Fuzz run",
      status: "finished",
      spec,
      seed: spec.seed,
      replicates: spec.replicates,
      chunkSize: spec.replicates,
      engineVersion: "fixture",
      circuitId: cir,
      circuitVersion: 1,
      programId: prg,
      replicatesDone: spec.replicates,
      createdBy: owner,
      createdAt: now,
      startedAt: now,
      finishedAt: now,
    })
    .run();
  const swp = newId("swp_");
  db.insert(schema.sweeps)
    .values({
      id: swp,
      labId,
      name: "Fuzz sweep",
      baseSpec: spec,
      axes: [{ parameter: "rate(make)", values: [1, 2] }],
      status: "finished",
      pointCount: 2,
      createdBy: owner,
      createdAt: now,
      finishedAt: now,
    })
    .run();
  const trs = newId("trs_");
  db.insert(schema.traceSets)
    .values({
      id: trs,
      labId,
      name: "Fuzz traces",
      synthetic: true,
      layout: "long",
      timeUnit: "min",
      schedule: [{ on: 10, off: 30 }],
      settings: {},
      cellCount: 0,
      uploadedBy: owner,
      createdAt: now,
    })
    .run();
  const mat = newId("mat_");
  db.insert(schema.matches)
    .values({
      id: mat,
      labId,
      traceSetId: trs,
      runId: run,
      tolerance: 0.1,
      result: {},
      createdBy: owner,
      createdAt: now,
    })
    .run();
  const rmp = newId("rmp_");
  const verdict = { label: "steady", evidence: {} };
  db.insert(schema.regimeMaps)
    .values({
      id: rmp,
      labId,
      name: "Fuzz map",
      baseSpec: spec,
      axes: [{ parameter: "rate(make)", values: [1, 2] }],
      points: [
        { index: 0, values: { "rate(make)": 1 }, refined: false, verdict },
        { index: 1, values: { "rate(make)": 2 }, refined: false, verdict },
      ],
      createdBy: owner,
      createdAt: now,
    })
    .run();
  return {
    labId,
    lab: labId,
    circuit: cir,
    program: prg,
    run,
    sweep: swp,
    traceSet: trs,
    match: mat,
    regimeMap: rmp,
  };
}

/** True while the fixture's lab, the owner's membership and every object are there and not deleted. */
function fixtureIntact(t: TestApp, f: Fixture, owner: string): boolean {
  const one = (sql: string, ...args: string[]) => t.ctx.sqlite.prepare(sql).get(...args) !== undefined;
  return (
    one("SELECT 1 FROM labs WHERE id = ?", f.labId) &&
    one("SELECT 1 FROM memberships WHERE lab_id = ? AND user_id = ? AND role = 'owner'", f.labId, owner) &&
    one("SELECT 1 FROM runs WHERE id = ? AND deleted_at IS NULL", f.run!) &&
    one("SELECT 1 FROM sweeps WHERE id = ? AND deleted_at IS NULL", f.sweep!) &&
    one("SELECT 1 FROM trace_sets WHERE id = ? AND deleted_at IS NULL", f.traceSet!) &&
    one("SELECT 1 FROM circuits WHERE id = ?", f.circuit!) &&
    one("SELECT 1 FROM input_programs WHERE id = ?", f.program!) &&
    one("SELECT 1 FROM matches WHERE id = ?", f.match!) &&
    one("SELECT 1 FROM regime_maps WHERE id = ?", f.regimeMap!)
  );
}

function fillPath(route: RouteDef, f: Fixture, ownerId: string): string {
  const path = route.path.replace(/[{}]/g, "").replace(/[:*]([A-Za-z_][A-Za-z0-9_]*)/g, (_m, name: string) => {
    if (name === "labId") return f.labId;
    if (name === "id") {
      if (route.access.kind !== "object") return "fuzz-id";
      const id = f[route.access.resource];
      if (!id) throw new Error(`${route.method} ${route.path}: no fixture for "${route.access.resource}"`);
      return id;
    }
    if (name === "userId") return ownerId;
    if (name === "token") return "no-such-token";
    return "1";
  });
  return `/api${path}`;
}

/** Field names a body schema knows at its top level (objects, pipes, unions, optional wrappers). */
function fieldNames(s: ZodType | undefined, depth = 0): string[] {
  if (!s || depth > 6) return [];
  const any = s as any;
  if (any.shape && typeof any.shape === "object") return Object.keys(any.shape);
  const def = any._zod?.def ?? any.def ?? {};
  const inner = [def.in, def.out, def.innerType, def.schema, ...(def.options ?? []), def.left, def.right];
  return [...new Set(inner.flatMap((x) => (x ? fieldNames(x, depth + 1) : [])))];
}

/** Values near the edges: huge and tiny numbers, long and odd strings, deep arrays. */
const edgy = fc.oneof(
  fc.constantFrom(0, -1, 1e308, -1e308, 1e-308, 2 ** 53 + 1, 1e12, 0.5, "", " ", "=SUM(1+1)", "名前", "\u0000"),
  fc.string({ maxLength: 40 }),
  fc.double(),
  fc.integer(),
  fc.boolean(),
  fc.constant(null),
  fc.array(fc.oneof(fc.string({ maxLength: 8 }), fc.integer(), fc.constant({})), { maxLength: 5 }),
  fc.string({ minLength: 3000, maxLength: 3000 }),
);

function bodies(route: RouteDef): fc.Arbitrary<unknown> {
  const names = fieldNames(route.body);
  const json = fc.jsonValue({ maxDepth: 3 });
  if (!names.length) return json;
  const key = fc.constantFrom(...names);
  return fc.oneof(
    json,
    fc.dictionary(key, json, { maxKeys: names.length }),
    fc.dictionary(key, edgy, { minKeys: 1, maxKeys: names.length }),
    // Every known field present: the most likely to pass the first checks and reach deeper ones.
    fc.record(Object.fromEntries(names.map((n) => [n, fc.oneof(edgy, json)]))),
  );
}

/** sha256 over every table's rows in a fixed order, sessions aside (touched by every signed-in request). */
function dataDigest(t: TestApp): string {
  const h = createHash("sha256");
  const tables = t.ctx.sqlite
    .prepare("SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT IN ('sessions') ORDER BY name")
    .all() as { name: string }[];
  for (const { name } of tables) {
    h.update(`\u0001${name}\u0001`);
    const rows = t.ctx.sqlite.prepare(`SELECT * FROM "${name}" ORDER BY rowid`).raw().all() as unknown[][];
    for (const row of rows)
      h.update(JSON.stringify(row, (_k, v) => (Buffer.isBuffer(v) ? v.toString("hex") : v)) + "\n");
  }
  return h.digest("hex");
}

describe("fuzzed bodies on every write route: no 5xx, rejected requests change nothing", () => {
  let t: TestApp;
  let server: Server;
  let base = "";
  let cookie = "";
  let ownerId = "";
  let fixture: Fixture;
  let sent = 0;
  let digest: string | null = null;

  before(async () => {
    t = await makeTestContext({ mailer: "null" });
    const owner = t.ctx.db.select().from(schema.users).where(eq(schema.users.email, "owner@example.org")).get()!;
    ownerId = owner.id;
    t.ctx.db.update(schema.users).set({ isSiteAdmin: true }).where(eq(schema.users.id, ownerId)).run();
    server = t.app.listen(0, "127.0.0.1");
    await new Promise<void>((r) => server.once("listening", () => r()));
    base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
    cookie = await signInCookie();
    fixture = buildFixture(t, ownerId);
  });
  after(async () => {
    await new Promise<void>((r) => server.close(() => r()));
    await t.close();
  });

  async function signInCookie(): Promise<string> {
    const res = await fetch(`${base}/api/auth/sign-in`, {
      method: "POST",
      headers: { "Content-Type": "application/json" },
      body: JSON.stringify({ email: "owner@example.org", password: DEMO_PASSWORD }),
    });
    assert.equal(res.status, 200);
    return res.headers.getSetCookie()[0].split(";")[0];
  }

  const writeRoutes = allRoutes.filter((r) => r.method !== "get" && !SKIP.has(`${r.method} ${r.path}`));

  test("the route table has write routes to fuzz", () => {
    assert.ok(writeRoutes.length >= 30, `only ${writeRoutes.length} write routes`);
  });

  for (const route of writeRoutes) {
    test(`${route.method.toUpperCase()} /api${route.path}`, async () => {
      await fc.assert(
        fc.asyncProperty(bodies(route), async (body) => {
          const path = fillPath(route, fixture, ownerId);
          // The digest after the last request, unless something was accepted since (nothing else writes).
          const before = (digest ??= dataDigest(t));
          const res = await fetch(base + path, {
            method: route.method.toUpperCase(),
            headers: { "Content-Type": "application/json", Accept: "application/json", Cookie: cookie },
            body: JSON.stringify(body),
            redirect: "manual",
          });
          const text = await res.text();
          sent++;
          assert.ok(res.status < 500, `${res.status} for ${JSON.stringify(body).slice(0, 300)}: ${text.slice(0, 300)}`);
          if (res.status >= 400) {
            assert.equal(dataDigest(t), before, `a ${res.status} changed stored data: ${text.slice(0, 200)}`);
          } else {
            digest = null;
            // Accepted: it may have deleted or left the lab, or signed the caller out.
            if (!fixtureIntact(t, fixture, ownerId)) fixture = buildFixture(t, ownerId);
            if ((await fetch(`${base}/api/me`, { headers: { Cookie: cookie } })).status === 401)
              cookie = await signInCookie();
          }
        }),
        { seed: SEED, numRuns: RUNS_PER_ROUTE, endOnFailure: true },
      );
    });
  }

  test("a few thousand requests were sent", () => {
    assert.equal(sent, writeRoutes.length * RUNS_PER_ROUTE);
    assert.ok(sent >= 2000, `sent ${sent}`);
  });
});
