/**
 * Authorization, generated from the route table: every API route in
 * `allRoutes` is called by every persona (anonymous, a member of another lab,
 * viewer, editor and owner of the lab, a site admin who is in no lab), and the
 * answer is checked against the route's access rule:
 *
 *   anonymous            -> 401 (public routes: never an access denial)
 *   member of another lab -> 404, as if the lab or object did not exist
 *   role too low          -> 403
 *   not a site admin      -> 403 on site-admin routes
 *   allowed               -> anything but an access denial (400 for an empty body is fine), never a 5xx
 *
 * Every write route is also sent bodies of the wrong shape (arrays, null,
 * wrong types, out-of-range numbers): the answer must be a 4xx, never a 5xx.
 *
 * Each call gets a fresh lab with one object of every resource kind, so a
 * delete or a departure in one call cannot change another's answer. A route
 * added later is tested automatically; a route whose rule the test cannot
 * satisfy (unknown resource kind, missing :labId or :id) fails loudly.
 */
import { describe, test, before, after } from "node:test";
import assert from "node:assert/strict";
import type { AddressInfo } from "node:net";
import type { Server } from "node:http";
import { allRoutes } from "@/server/routes";
import type { Access, LabRole, RouteDef } from "@/server/routes/route-table";
import { roleAtLeast } from "@/server/routes/route-table";
import type { ResourceKind } from "@/server/services/access.service";
import { resourceLab } from "@/server/services/access.service";
import { schema } from "@/db/client";
import { newId } from "@/server/ids";
import { hashPassword } from "@/server/services/password";
import { fixtureSpec } from "@/tests/helpers/fixture-spec";
import { makeTestContext, type TestApp } from "@/tests/helpers/test-app";

const PASSWORD = "persona-password";
const ACCESS_KINDS = new Set<Access["kind"]>(["public", "signedIn", "siteAdmin", "lab", "object"]);

type PersonaName = "anonymous" | "otherLab" | "viewer" | "editor" | "owner" | "siteAdmin";
interface Persona {
  name: PersonaName;
  email: string | null;
  userId: string;
  /** Role in the fixture lab (lab A). */
  role: LabRole | null;
  isSiteAdmin: boolean;
  cookie: string;
}

// ---------------------------------------------------------------- fixture objects

const { circuit, program, spec } = fixtureSpec("Fixture circuit", "fixture");

type Fixture = Record<ResourceKind, string>;

/**
 * One builder per resource kind of access.service.ts. A kind missing here makes
 * every route that uses it fail (add a builder when adding a kind).
 */
const BUILDERS: Record<string, (t: TestApp, labId: string, made: Partial<Fixture>, who: string) => string> = {
  lab: (_t, labId) => labId,
  circuit: (t, labId, _m, who) => {
    const id = newId("cir_");
    const now = new Date();
    t.ctx.db
      .insert(schema.circuits)
      .values({ id, labId, name: "Fixture circuit", currentVersion: 1, createdBy: who, createdAt: now, updatedAt: now })
      .run();
    t.ctx.db
      .insert(schema.circuitVersions)
      .values({ circuitId: id, version: 1, body: circuit, createdBy: who, createdAt: now })
      .run();
    return id;
  },
  program: (t, labId, _m, who) => {
    const id = newId("prg_");
    const now = new Date();
    t.ctx.db
      .insert(schema.inputPrograms)
      .values({ id, labId, name: "Fixture program", body: program, createdBy: who, createdAt: now, updatedAt: now })
      .run();
    return id;
  },
  run: (t, labId, made, who) => {
    const id = newId("run_");
    const now = new Date();
    t.ctx.db
      .insert(schema.runs)
      .values({
        id,
        labId,
        name: "Fixture run",
        status: "finished",
        spec,
        seed: spec.seed,
        replicates: spec.replicates,
        chunkSize: spec.replicates,
        engineVersion: "fixture",
        circuitId: made.circuit ?? null,
        circuitVersion: 1,
        programId: made.program ?? null,
        replicatesDone: spec.replicates,
        createdBy: who,
        createdAt: now,
        startedAt: now,
        finishedAt: now,
      })
      .run();
    return id;
  },
  sweep: (t, labId, _m, who) => {
    const id = newId("swp_");
    t.ctx.db
      .insert(schema.sweeps)
      .values({
        id,
        labId,
        name: "Fixture sweep",
        baseSpec: spec,
        axes: [{ parameter: "rate(make)", values: [1, 2] }],
        status: "finished",
        pointCount: 2,
        createdBy: who,
        createdAt: new Date(),
        finishedAt: new Date(),
      })
      .run();
    return id;
  },
  traceSet: (t, labId, _m, who) => {
    const id = newId("trs_");
    t.ctx.db
      .insert(schema.traceSets)
      .values({
        id,
        labId,
        name: "Fixture traces",
        synthetic: true,
        layout: "long",
        timeUnit: "min",
        schedule: [{ on: 10, off: 30 }],
        settings: {},
        cellCount: 0,
        uploadedBy: who,
        createdAt: new Date(),
      })
      .run();
    return id;
  },
  match: (t, labId, made, who) => {
    const id = newId("mat_");
    t.ctx.db
      .insert(schema.matches)
      .values({
        id,
        labId,
        traceSetId: made.traceSet!,
        runId: made.run ?? null,
        tolerance: 0.1,
        result: {},
        createdBy: who,
        createdAt: new Date(),
      })
      .run();
    return id;
  },
  regimeMap: (t, labId, _m, who) => {
    const id = newId("rmp_");
    const verdict = { label: "steady", evidence: {} };
    t.ctx.db
      .insert(schema.regimeMaps)
      .values({
        id,
        labId,
        name: "Fixture map",
        baseSpec: spec,
        axes: [{ parameter: "rate(make)", values: [1, 2] }],
        points: [
          { index: 0, values: { "rate(make)": 1 }, refined: false, verdict },
          { index: 1, values: { "rate(make)": 2 }, refined: false, verdict },
        ],
        createdBy: who,
        createdAt: new Date(),
      })
      .run();
    return id;
  },
};
// Order matters: a match refers to a trace set and a run.
const BUILD_ORDER = ["lab", "circuit", "program", "run", "sweep", "traceSet", "match", "regimeMap"];

function resourceKindsUsed(): string[] {
  const kinds = new Set<string>();
  for (const r of allRoutes) if (r.access.kind === "object") kinds.add(r.access.resource);
  return [...kinds];
}

/** A fresh lab A with the three lab personas as members and one object of each kind. */
function buildLab(t: TestApp, personas: Persona[]): { labId: string; objects: Partial<Fixture> } {
  const labId = newId("lab_");
  const now = new Date();
  t.ctx.db.insert(schema.labs).values({ id: labId, name: "Fixture lab", createdAt: now }).run();
  for (const p of personas)
    if (p.role)
      t.ctx.db.insert(schema.memberships).values({ labId, userId: p.userId, role: p.role, createdAt: now }).run();
  const owner = personas.find((p) => p.role === "owner")!.userId;
  const objects: Partial<Fixture> = {};
  for (const kind of BUILD_ORDER) objects[kind as ResourceKind] = BUILDERS[kind](t, labId, objects, owner);
  return { labId, objects };
}

// ---------------------------------------------------------------- requests

function fillPath(
  route: RouteDef,
  labId: string,
  objects: Partial<Fixture>,
  persona: Persona,
  ownerId: string,
): string {
  let path = route.path.replace(/[{}]/g, "");
  path = path.replace(/[:*]([A-Za-z_][A-Za-z0-9_]*)/g, (_m, name: string) => {
    if (name === "labId") return labId;
    if (name === "id") {
      if (route.access.kind === "object") {
        const id = objects[route.access.resource];
        if (!id)
          throw new Error(
            `${route.method.toUpperCase()} ${route.path}: no fixture for resource kind "${route.access.resource}"`,
          );
        return id;
      }
      return "fixture-id";
    }
    if (name === "userId") return persona.role || persona.email ? persona.userId : ownerId;
    if (name === "token") return "no-such-token";
    return "1";
  });
  return `/api${path}`;
}

interface Answer {
  status: number;
  code: string | null;
  message: string | null;
}

/** Bodies of the wrong shape: every write route must answer them with a 4xx, never a 5xx. */
const MALFORMED_BODIES = [
  "[]",
  '"text"',
  "null",
  JSON.stringify({
    name: 123,
    notes: [],
    settings: "x",
    circuit: [],
    program: null,
    bundle: 5,
    body: { reactions: [null] },
    axes: [{}],
    runIds: "a",
    email: {},
    role: "emperor",
  }),
  JSON.stringify({
    name: "x".repeat(5000),
    settings: { replicates: 1e12, endTimeMinutes: -1, gridStepMinutes: 0 },
    circuit: { species: [{ name: "1bad" }] },
  }),
];

async function call(base: string, method: string, path: string, cookie: string, rawBody = "{}"): Promise<Answer> {
  const ctl = new AbortController();
  const timer = setTimeout(() => ctl.abort(), 10_000);
  try {
    const headers: Record<string, string> = { Accept: "application/json" };
    if (cookie) headers.Cookie = cookie;
    let body: string | undefined;
    if (method !== "GET") {
      headers["Content-Type"] = "application/json";
      body = rawBody;
    }
    const res = await fetch(base + path, { method, headers, body, signal: ctl.signal, redirect: "manual" });
    const type = res.headers.get("content-type") ?? "";
    if (!type.includes("application/json")) {
      // Streams (server-sent events), CSV and other files: the status is enough.
      ctl.abort();
      return { status: res.status, code: null, message: null };
    }
    const json: any = await res.json().catch(() => null);
    return { status: res.status, code: json?.error?.code ?? null, message: json?.error?.message ?? null };
  } finally {
    clearTimeout(timer);
  }
}

async function signInCookie(base: string, email: string): Promise<string> {
  const res = await fetch(`${base}/api/auth/sign-in`, {
    method: "POST",
    headers: { "Content-Type": "application/json" },
    body: JSON.stringify({ email, password: PASSWORD }),
  });
  assert.equal(res.status, 200, `sign-in as ${email}`);
  const set = res.headers.getSetCookie().find((c) => c.startsWith("linger.sid="));
  assert.ok(set, "session cookie");
  return set.split(";")[0];
}

// ---------------------------------------------------------------- expectations

type Expect = { kind: "allowed" } | { kind: "deny"; status: 401 | 403 | 404 };

function expected(access: Access, p: Persona): Expect {
  if (access.kind === "public") return { kind: "allowed" };
  if (p.name === "anonymous") return { kind: "deny", status: 401 };
  if (access.kind === "signedIn") return { kind: "allowed" };
  if (access.kind === "siteAdmin") return p.isSiteAdmin ? { kind: "allowed" } : { kind: "deny", status: 403 };
  if (!p.role) return { kind: "deny", status: 404 };
  return roleAtLeast(p.role, access.role) ? { kind: "allowed" } : { kind: "deny", status: 403 };
}

/** The not-found message checkAccess gives for this rule. */
function accessNotFoundMessage(access: Access): string {
  return access.kind === "object" ? `That ${access.resource} was not found.` : "That lab was not found.";
}

function isAccessDenial(access: Access, a: Answer): boolean {
  if (a.status === 401) return true;
  if (a.status === 403 && (a.code === "forbidden" || a.code === "cross_site")) return true;
  if (
    a.status === 404 &&
    a.code === "not_found" &&
    access.kind !== "public" &&
    a.message === accessNotFoundMessage(access)
  )
    return true;
  return false;
}

// ---------------------------------------------------------------- the test

describe("authorization of every API route (generated from the route table)", () => {
  let t: TestApp;
  let server: Server;
  let base = "";
  const personas: Persona[] = [];

  before(async () => {
    t = await makeTestContext({ seed: "none" });
    server = t.app.listen(0, "127.0.0.1");
    await new Promise<void>((r) => server.once("listening", () => r()));
    base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
    const hash = await hashPassword(PASSWORD);
    const now = new Date();
    const make = (name: PersonaName, role: LabRole | null, isSiteAdmin = false): Persona => {
      if (name === "anonymous")
        return { name, email: null, userId: "usr_anonymous", role: null, isSiteAdmin: false, cookie: "" };
      const id = newId("usr_");
      const email = `${name.toLowerCase()}@authz.example.org`;
      t.ctx.db
        .insert(schema.users)
        .values({
          id,
          email,
          displayName: name,
          passwordHash: hash,
          isSiteAdmin,
          notifyOnRunEnd: false,
          createdAt: now,
        })
        .run();
      return { name, email, userId: id, role, isSiteAdmin, cookie: "" };
    };
    personas.push(
      make("anonymous", null),
      make("otherLab", null),
      make("viewer", "viewer"),
      make("editor", "editor"),
      make("owner", "owner"),
      make("siteAdmin", null, true),
    );
    // Lab B, where the other-lab persona is the owner (with objects of its own).
    const labB = newId("lab_");
    t.ctx.db.insert(schema.labs).values({ id: labB, name: "Lab B", createdAt: now }).run();
    t.ctx.db
      .insert(schema.memberships)
      .values({ labId: labB, userId: personas[1].userId, role: "owner", createdAt: now })
      .run();
    for (const p of personas) if (p.email) p.cookie = await signInCookie(base, p.email);
  });

  after(async () => {
    server?.closeAllConnections();
    await new Promise<void>((r) => (server ? server.close(() => r()) : r()));
    await t?.close();
  });

  test("the route table is well-formed: every route has a known access rule and unique method+path", () => {
    const seen = new Set<string>();
    for (const r of allRoutes) {
      const key = `${r.method.toUpperCase()} ${r.path}`;
      assert.ok(r.access && ACCESS_KINDS.has(r.access.kind), `${key} has no valid access rule`);
      assert.ok(!seen.has(key), `${key} is declared twice`);
      seen.add(key);
      if (r.access.kind === "lab") assert.match(r.path, /:labId\b/, `${key}: lab access needs a :labId path parameter`);
      if (r.access.kind === "object")
        assert.match(r.path, /:id\b/, `${key}: object access needs an :id path parameter`);
    }
    assert.ok(allRoutes.length >= 20, "the route table looks incomplete");
  });

  test("every resource kind used by a route has a fixture builder, and resourceLab finds it", () => {
    const missing = resourceKindsUsed().filter((k) => !BUILDERS[k]);
    assert.deepEqual(
      missing,
      [],
      `no fixture builder for resource kind(s) ${missing.join(", ")}: add one to BUILDERS in this file`,
    );
    const { labId, objects } = buildLab(t, personas);
    for (const kind of BUILD_ORDER)
      assert.equal(
        resourceLab(t.ctx, kind as ResourceKind, objects[kind as ResourceKind]!),
        labId,
        `resourceLab(${kind})`,
      );
  });

  for (const route of allRoutes) {
    const key = `${route.method.toUpperCase()} /api${route.path}`;
    const access = route.access;
    const rule =
      access.kind === "lab" || access.kind === "object"
        ? `${access.kind}${access.kind === "object" ? `(${access.resource})` : ""} >= ${access.role}`
        : access.kind;
    test(`${key} [${rule}]`, async () => {
      if (access.kind === "object")
        assert.ok(
          BUILDERS[access.resource],
          `${key}: the test cannot build a "${access.resource}" object; add a builder`,
        );
      const problems: string[] = [];
      for (const p of personas) {
        const { labId, objects } = buildLab(t, personas);
        const ownerId = personas.find((x) => x.role === "owner")!.userId;
        const path = fillPath(route, labId, objects, p, ownerId);
        const a = await call(base, route.method.toUpperCase(), path, p.cookie);
        const want = expected(access, p);
        const got = `${a.status}${a.code ? ` ${a.code}` : ""}${a.message ? ` "${a.message}"` : ""}`;
        if (a.status === 404 && a.message?.startsWith("No API route")) {
          problems.push(`${p.name}: route not mounted (${got})`);
        } else if (want.kind === "deny") {
          const ok =
            a.status === want.status &&
            (want.status === 401
              ? a.code === "unauthorized"
              : want.status === 403
                ? a.code === "forbidden"
                : a.message === accessNotFoundMessage(access));
          if (!ok) problems.push(`${p.name}: expected access denial ${want.status}, got ${got}`);
        } else {
          if (isAccessDenial(access, a)) problems.push(`${p.name}: expected access, got denial ${got}`);
          if (a.status >= 500) problems.push(`${p.name}: an empty body got a server error ${got}`);
          // Wrong-shaped bodies: a clear 4xx, never a 5xx (checked once per route, by the most privileged persona allowed).
          const probe =
            route.method !== "get" && (p.name === "owner" || (p.name === "siteAdmin" && access.kind === "siteAdmin"));
          if (probe) {
            for (const raw of MALFORMED_BODIES) {
              const fresh = buildLab(t, personas);
              const b = await call(
                base,
                route.method.toUpperCase(),
                fillPath(route, fresh.labId, fresh.objects, p, ownerId),
                p.cookie,
                raw,
              );
              if (b.status >= 500)
                problems.push(`${p.name}: body ${raw.slice(0, 60)} got a server error ${b.status} ${b.message ?? ""}`);
            }
          }
        }
        // A call may end the persona's session (sign-out): sign in again.
        if (p.email) {
          const me = await call(base, "GET", "/api/me", p.cookie);
          if (me.status === 401) p.cookie = await signInCookie(base, p.email);
        }
      }
      assert.deepEqual(problems, [], `${key}:\n  ${problems.join("\n  ")}`);
    });
  }
});
