/**
 * Every list route pages the same way (shared/schemas/pagination.ts): for each one, a walk in pages of 2
 * gives every item once, in the order of one big page, ending with a null cursor; an item added between
 * pages repeats nothing and loses nothing; a bad cursor is a 400 naming `cursor`; and another lab's items
 * never appear. The run and sweep lists have their own tests (tests/server/pagination.test.ts).
 */
import { describe, test, before, after } from "node:test";
import assert from "node:assert/strict";
import { eq } from "drizzle-orm";
import type { ZodType } from "zod";
import { makeTestContext, signIn, type TestApp } from "@/tests/helpers/test-app";
import { assertContract } from "@/tests/helpers/contract";
import { schema } from "@/db/client";
import { newId } from "@/server/ids";
import { recordAudit } from "@/server/services/audit.service";
import { CircuitListResponseSchema } from "@/shared/schemas/api-circuits";
import { ProgramListResponseSchema } from "@/shared/schemas/api-programs";
import { TraceSetListPageSchema } from "@/shared/schemas/api-traces";
import {
  AdminUsersSchema,
  AuditPageSchema,
  InvitationListSchema,
  LabListSchema,
  OutboxSchema,
} from "@/shared/schemas/api-accounts";

type Agent = Awaited<ReturnType<typeof signIn>>;
type Id = string | number;

let t: TestApp;
let owner: Agent; // owner of the demo lab (lab A)
let other: Agent; // owner of lab B, not a member of lab A
let admin: Agent;
let labA: string;
let labB: string;
let counter = 0;

before(async () => {
  t = await makeTestContext();
  labA = t.demoLab!.id;
  t.ctx.db.update(schema.users).set({ isSiteAdmin: true }).where(eq(schema.users.email, "viewer@example.org")).run();
  owner = await signIn(t.app, "owner@example.org");
  admin = await signIn(t.app, "viewer@example.org");
  // A newcomer's own lab: lab B.
  other = await signIn(t.app, "editor@example.org");
  labB = (await other.post("/api/labs").send({ name: "Other tank lab" }).expect(201)).body.lab.id;
});
after(async () => t.close());

interface ListCase {
  name: string;
  /** The list URL for lab A (and lab B when the list is per lab). */
  url: (lab: string) => string;
  schema: ZodType;
  agent: () => Agent;
  /** Adds one item to `lab`'s list and returns its id. */
  make: (lab: string) => Promise<Id>;
  /** false for lists that are not per lab (the site admin's). */
  perLab?: boolean;
}

const LADDER = { kind: "ladder", start: 10, durations: [1, 5, 20], gap: 30 };

const cases: ListCase[] = [
  {
    name: "circuits",
    url: (lab) => `/api/labs/${lab}/circuits`,
    schema: CircuitListResponseSchema,
    agent: () => owner,
    make: async (lab) =>
      (
        await (lab === labA ? owner : other)
          .post(`/api/labs/${lab}/circuits`)
          .send({ name: `Paged circuit ${++counter}`, template: "c1ffl-and" })
          .expect(201)
      ).body.circuit.id,
  },
  {
    name: "programs",
    url: (lab) => `/api/labs/${lab}/programs`,
    schema: ProgramListResponseSchema,
    agent: () => owner,
    make: async (lab) =>
      (
        await (lab === labA ? owner : other)
          .post(`/api/labs/${lab}/programs`)
          .send({ name: `Paged program ${++counter}`, body: LADDER })
          .expect(201)
      ).body.program.id,
  },
  {
    name: "trace sets",
    url: (lab) => `/api/labs/${lab}/traces`,
    schema: TraceSetListPageSchema,
    agent: () => owner,
    make: async (lab) => {
      const id = newId("trs_");
      t.ctx.db
        .insert(schema.traceSets)
        .values({
          id,
          labId: lab,
          name: `Paged traces ${++counter}`,
          synthetic: true,
          layout: "long",
          timeUnit: "min",
          schedule: [{ on: 10, off: 30 }],
          settings: {},
          cellCount: 0,
          uploadedBy: null,
          // a few share a created time, so the id breaks ties
          createdAt: new Date(Date.UTC(2026, 0, 1, 0, Math.floor(counter / 2))),
        })
        .run();
      return id;
    },
  },
  {
    name: "invitations",
    url: (lab) => `/api/labs/${lab}/invitations`,
    schema: InvitationListSchema,
    agent: () => owner,
    make: async (lab) => {
      const email = `paged${++counter}@example.org`;
      const who = lab === labA ? owner : other;
      await who.post(`/api/labs/${lab}/invitations`).send({ email, role: "viewer" }).expect(201);
      // The answer names the address; the list gives the invitation's id.
      const list = await who.get(`/api/labs/${lab}/invitations?limit=200`).expect(200);
      return list.body.items.find((i: { email: string }) => i.email === email).id;
    },
  },
  {
    name: "audit trail",
    url: (lab) => `/api/labs/${lab}/audit`,
    schema: AuditPageSchema,
    agent: () => owner,
    make: async (lab) => {
      recordAudit(t.ctx, { labId: lab, userId: null, action: "lab.renamed", targetType: "lab", targetId: lab });
      const rows = t.ctx.db.select({ id: schema.auditEvents.id }).from(schema.auditEvents).all();
      return Math.max(...rows.map((r) => r.id));
    },
  },
  {
    name: "labs",
    url: () => "/api/labs",
    schema: LabListSchema,
    agent: () => owner,
    make: async (lab) => {
      const who = lab === labA ? owner : other;
      return (
        await who
          .post("/api/labs")
          .send({ name: `Lab ${String(++counter).padStart(3, "0")}` })
          .expect(201)
      ).body.lab.id;
    },
  },
  {
    name: "admin users",
    url: () => "/api/admin/users",
    schema: AdminUsersSchema,
    agent: () => admin,
    perLab: false,
    make: async () => {
      const id = newId("usr_");
      t.ctx.db
        .insert(schema.users)
        .values({ id, email: `user${++counter}@example.org`, displayName: `User ${counter}`, createdAt: new Date() })
        .run();
      return id;
    },
  },
  {
    name: "outbox",
    url: () => "/api/admin/outbox",
    schema: OutboxSchema,
    agent: () => admin,
    perLab: false,
    make: async () => {
      t.ctx.db
        .insert(schema.outbox)
        .values({
          to: `box${++counter}@example.org`,
          from: "linger@example.org",
          subject: "s",
          text: "t",
          receivedAt: new Date(),
        })
        .run();
      const rows = t.ctx.db.select({ id: schema.outbox.id }).from(schema.outbox).all();
      return Math.max(...rows.map((r) => r.id));
    },
  },
];

async function walk(c: ListCase, url: string, limit: number, between?: () => Promise<void>) {
  const ids: Id[] = [];
  let cursor: string | null = null;
  let pages = 0;
  do {
    const sep = url.includes("?") ? "&" : "?";
    const qs: string = `${sep}limit=${limit}${cursor ? `&cursor=${encodeURIComponent(cursor)}` : ""}`;
    const r = await c.agent().get(url + qs);
    assert.equal(r.status, 200, `${c.name}: ${JSON.stringify(r.body)}`);
    assertContract(c.schema, r.body, `GET ${url}`);
    assert.ok(r.body.items.length <= limit, `${c.name}: a page holds at most the limit`);
    ids.push(...r.body.items.map((i: { id: Id }) => i.id));
    cursor = r.body.nextCursor;
    pages++;
    if (pages === 1 && between) await between();
  } while (cursor && pages < 100);
  return { ids, pages };
}

for (const c of cases) {
  describe(`${c.name} list pages`, () => {
    const madeA: Id[] = [];
    const madeB: Id[] = [];
    before(async () => {
      for (let i = 0; i < 5; i++) madeA.push(await c.make(labA));
      if (c.perLab !== false) madeB.push(await c.make(labB));
    });

    test("pages of 2 give every item once, in the order of one big page, ending with a null cursor", async () => {
      const url = c.url(labA);
      const all = await c.agent().get(`${url}?limit=200`).expect(200);
      assert.equal(all.body.nextCursor, null);
      const everything: Id[] = all.body.items.map((i: { id: Id }) => i.id);
      const { ids, pages } = await walk(c, url, 2);
      assert.ok(pages >= 3, `${c.name}: ${everything.length} items in pages of 2 (${pages} pages)`);
      assert.deepEqual(ids, everything);
      assert.equal(new Set(ids).size, ids.length, "no item twice");
      for (const id of madeA) assert.ok(ids.includes(id), `${c.name}: ${id} is listed`);
    });

    if (c.perLab !== false)
      test("another lab's items never appear", async () => {
        const { ids } = await walk(c, c.url(labA), 2);
        for (const id of madeB) assert.ok(!ids.includes(id), `${c.name}: lab B's ${id} is not in lab A's list`);
        if (c.url(labA) !== c.url(labB)) {
          const b = await walk({ ...c, agent: () => other }, c.url(labB), 2);
          for (const id of madeA) assert.ok(!b.ids.includes(id), `${c.name}: lab A's ${id} is not in lab B's list`);
          await owner.get(c.url(labB)).expect(404);
        }
      });

    test("an item added between pages repeats nothing and loses nothing", async () => {
      const url = c.url(labA);
      const before = (await walk(c, url, 2)).ids;
      let added: Id | null = null;
      const { ids } = await walk(c, url, 2, async () => {
        added = await c.make(labA);
      });
      assert.equal(new Set(ids).size, ids.length, `${c.name}: no item twice`);
      for (const id of before) assert.ok(ids.includes(id), `${c.name}: ${id} still listed`);
      assert.ok(added !== null);
      const fresh = (await walk(c, url, 2)).ids;
      assert.ok(fresh.includes(added!), `${c.name}: a fresh walk lists the new item`);
    });

    test("a cursor that is not one is a 400 naming the cursor", async () => {
      const sep = c.url(labA).includes("?") ? "&" : "?";
      for (const bad of [
        "not-a-cursor",
        Buffer.from('[{"x":1}]').toString("base64url"),
        Buffer.from("[true]").toString("base64url"),
      ]) {
        const r = await c.agent().get(`${c.url(labA)}${sep}cursor=${bad}`);
        assert.equal(r.status, 400, `${c.name} ${bad}: ${JSON.stringify(r.body)}`);
        assert.ok(
          r.body.error.fields.some((f: { path: string }) => f.path === "cursor"),
          `${c.name}: ${JSON.stringify(r.body.error)}`,
        );
      }
      const r = await c.agent().get(`${c.url(labA)}${sep}limit=201`);
      assert.equal(r.status, 400);
    });
  });
}
