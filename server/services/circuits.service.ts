/**
 * Circuits: named per lab, every save a new version (a run keeps the version it
 * used). The stored body's `name` always mirrors the circuit's name. Names are
 * unique per lab among non-archived circuits (case-insensitive).
 */
import { and, desc, eq, isNotNull, isNull, ne, sql } from "drizzle-orm";
import type { ZodType } from "zod";
import type { AppContext } from "@/server/context";
import { inTransaction, schema } from "@/db/client";
import { newId } from "@/server/ids";
import { badRequest, conflict, notFound } from "@/server/http-error";
import { recordAudit } from "./audit.service";
import { keyset, pageLimit } from "./pagination";
import type { Page, PageQuery } from "@/shared/schemas/pagination";
import { findFeedForwardLoops, wiringOf } from "@/sim/circuit/feed-forward";
import { listParameters, validateCircuit } from "@/sim";
import { allTemplates } from "@/sim/circuit/templates";
import { CircuitSchema, type Circuit } from "@/shared/schemas/circuit";
import {
  TEMPLATE_KEYS,
  type CheckCircuitResponse,
  type CircuitDetailResponse,
  type CircuitSummary,
  type CircuitVersionResponse,
  type FieldError,
  type Template,
  type TemplateKey,
} from "@/shared/schemas/api-circuits";

const c = schema.circuits;
const v = schema.circuitVersions;

export interface Actor {
  userId: string | null;
}

// ---------------------------------------------------------------- validation helpers

/** "reactions[2].rate" (engine form) -> "reactions.2.rate" (dot form of the wire). */
export function dotPath(path: string): string {
  return path.replace(/\[(\d+)\]/g, ".$1").replace(/^\./, "");
}

/**
 * Parse a request with a zod schema; a failure is a 400 whose fields carry the
 * dot path from the request root and, inside a circuit body, a message naming
 * the reaction (or species, signal) by its name.
 */
export function parseCircuitRequest<T>(zschema: ZodType<T>, raw: unknown, bodyKey = "body"): T {
  const r = zschema.safeParse(raw ?? {});
  if (r.success) return r.data;
  const circuitRaw = (raw as Record<string, unknown> | null)?.[bodyKey];
  const fields = r.error.issues.map((i) => {
    const path = i.path.map(String).join(".");
    return { path, message: nameItem(circuitRaw, i.path.slice(1), i.path[0] === bodyKey) + i.message };
  });
  throw badRequest(
    `Invalid request: ${fields.map((f) => `${f.path || "body"}: ${f.message}`).join("; ")}`,
    fields,
    "invalid",
  );
}

function nameItem(circuitRaw: unknown, rest: readonly PropertyKey[], inBody: boolean): string {
  if (!inBody || rest.length < 2 || typeof rest[1] !== "number") return "";
  const list = rest[0];
  if (list !== "reactions" && list !== "species" && list !== "signals") return "";
  const item = (circuitRaw as Record<string, unknown[]> | null)?.[list]?.[rest[1] as number] as
    { name?: unknown } | undefined;
  const what = list === "reactions" ? "reaction" : list === "species" ? "species" : "signal";
  return typeof item?.name === "string" && item.name ? `${what} "${item.name}": ` : `${what} ${rest[1] as number}: `;
}

/** Semantic checks (the engine's validateCircuit) as a 400 with dot paths under `prefix`. */
function assertSemanticallyValid(body: Circuit, prefix = "body"): void {
  const errors = semanticFieldErrors(body, prefix);
  if (errors.length) throw badRequest(`Invalid circuit: ${errors.map((e) => e.message).join("; ")}`, errors, "invalid");
}

function semanticFieldErrors(body: unknown, prefix: string): FieldError[] {
  const r = validateCircuit(body);
  if (r.ok) return [];
  return r.errors.map((e: { path: string; message: string }) => ({
    path: [prefix, dotPath(e.path)].filter(Boolean).join("."),
    message: e.message,
  }));
}

/** Live check for the editor: zod + semantic checks, never throws for a bad body. */
export function checkCircuit(raw: unknown): CheckCircuitResponse {
  const parsed = CircuitSchema.safeParse(raw);
  if (!parsed.success) {
    const fields = parsed.error.issues.map((i) => ({
      path: ["body", ...i.path.map(String)].join("."),
      message: nameItem(raw, i.path, true) + i.message,
    }));
    return { ok: false, errors: fields, feedForward: null };
  }
  const errors = semanticFieldErrors(parsed.data, "body");
  if (errors.length) return { ok: false, errors, feedForward: null };
  return { ok: true, errors: [], feedForward: findFeedForwardLoops(parsed.data)[0] ?? null };
}

// ---------------------------------------------------------------- templates

export function listTemplates(): Template[] {
  return TEMPLATE_KEYS.map((key) => {
    const t = allTemplates[key];
    const circuit = CircuitSchema.parse(t.circuit);
    return {
      key,
      title: t.title,
      description: t.description,
      circuit,
      inputSignal: t.inputSignal,
      feedForward: findFeedForwardLoops(circuit)[0] ?? null,
    };
  });
}

export function templateCircuit(key: TemplateKey): Circuit {
  return CircuitSchema.parse(structuredClone(allTemplates[key].circuit));
}

// ---------------------------------------------------------------- reading

type CircuitRow = typeof c.$inferSelect;

function userName(ctx: AppContext, userId: string | null): string | null {
  if (!userId) return null;
  return (
    ctx.db.select({ n: schema.users.displayName }).from(schema.users).where(eq(schema.users.id, userId)).get()?.n ??
    null
  );
}

function currentBody(ctx: AppContext, row: CircuitRow): Circuit {
  const ver = ctx.db
    .select()
    .from(v)
    .where(and(eq(v.circuitId, row.id), eq(v.version, row.currentVersion)))
    .get();
  if (!ver) throw new Error(`circuit ${row.id} has no version ${row.currentVersion}`);
  return CircuitSchema.parse(ver.body);
}

function summarize(ctx: AppContext, row: CircuitRow, body: Circuit, createdByName?: string | null): CircuitSummary {
  const ffl = findFeedForwardLoops(body)[0] ?? null;
  return {
    id: row.id,
    labId: row.labId,
    name: row.name,
    description: body.description,
    currentVersion: row.currentVersion,
    speciesCount: body.species.length,
    reactionCount: body.reactions.length,
    outputSpecies: body.outputSpecies,
    feedForwardLabel: ffl?.label ?? null,
    createdByName: createdByName === undefined ? userName(ctx, row.createdBy) : createdByName,
    createdAt: row.createdAt.toISOString(),
    updatedAt: row.updatedAt.toISOString(),
    archivedAt: row.archivedAt ? row.archivedAt.toISOString() : null,
    demoKey: row.demoKey ?? null,
  };
}

function getRow(ctx: AppContext, id: string): CircuitRow {
  const row = ctx.db.select().from(c).where(eq(c.id, id)).get();
  if (!row) throw notFound("That circuit");
  return row;
}

const circuitOrder = keyset([
  { col: c.updatedAt, dir: "desc", type: "number" },
  { col: c.id, dir: "asc", type: "string" },
]);

/** One page of the lab's circuits, most recently changed first (ties by id); keyset on (updated time, id). */
export function listCircuits(
  ctx: AppContext,
  labId: string,
  opts: { archived?: boolean } & PageQuery = {},
): Page<CircuitSummary> {
  const rows = ctx.db
    .select({ row: c, body: v.body, createdByName: schema.users.displayName })
    .from(c)
    .innerJoin(v, and(eq(v.circuitId, c.id), eq(v.version, c.currentVersion)))
    .leftJoin(schema.users, eq(schema.users.id, c.createdBy))
    .where(
      and(
        eq(c.labId, labId),
        opts.archived ? isNotNull(c.archivedAt) : isNull(c.archivedAt),
        circuitOrder.after(opts.cursor),
      ),
    )
    .orderBy(...circuitOrder.orderBy)
    .limit(pageLimit(opts) + 1)
    .all();
  return circuitOrder.page(
    rows,
    opts,
    (r) => [r.row.updatedAt.getTime(), r.row.id],
    (page) => page.map((r) => summarize(ctx, r.row, CircuitSchema.parse(r.body), r.createdByName ?? null)),
  );
}

export function getCircuitDetail(ctx: AppContext, id: string): CircuitDetailResponse {
  const row = getRow(ctx, id);
  const body = currentBody(ctx, row);
  const versions = ctx.db
    .select({ version: v.version, note: v.note, createdAt: v.createdAt, createdByName: schema.users.displayName })
    .from(v)
    .leftJoin(schema.users, eq(schema.users.id, v.createdBy))
    .where(eq(v.circuitId, id))
    .orderBy(desc(v.version))
    .all();
  const wiring = wiringOf(body);
  const loops = findFeedForwardLoops(body, wiring);
  return {
    circuit: summarize(ctx, row, body),
    body,
    versions: versions.map((x) => ({
      version: x.version,
      note: x.note ?? null,
      createdAt: x.createdAt.toISOString(),
      createdByName: x.createdByName ?? null,
    })),
    wiring,
    feedForward: loops[0] ?? null,
    feedForwardLoops: loops,
    parameters: listParameters(body).map((p: { ref: string; label: string; value: number; unit: string }) => ({
      ref: p.ref,
      label: p.label,
      value: p.value,
      unit: p.unit,
    })),
    behaviour: latestBehaviour(ctx, id),
  };
}

/** The behaviour labels of the circuit's latest finalised runs and sweep points (docs/regimes.md). */
function latestBehaviour(ctx: AppContext, circuitId: string): NonNullable<CircuitDetailResponse["behaviour"]> {
  const r = schema.runs;
  return ctx.db
    .select({
      runId: r.id,
      runName: r.name,
      circuitVersion: r.circuitVersion,
      sweepId: r.sweepId,
      finishedAt: r.finishedAt,
      regime: r.regime,
    })
    .from(r)
    .where(and(eq(r.circuitId, circuitId), isNotNull(r.regime), isNull(r.deletedAt)))
    .orderBy(desc(r.finishedAt))
    .limit(3)
    .all()
    .map((x) => ({
      runId: x.runId,
      runName: x.runName,
      circuitVersion: x.circuitVersion ?? null,
      sweepId: x.sweepId ?? null,
      finishedAt: x.finishedAt ? x.finishedAt.toISOString() : null,
      regime: x.regime as NonNullable<CircuitDetailResponse["behaviour"]>[number]["regime"],
    }));
}

export function getCircuitVersion(ctx: AppContext, id: string, version: number): CircuitVersionResponse {
  const row = getRow(ctx, id);
  const ver = ctx.db
    .select({
      version: v.version,
      note: v.note,
      body: v.body,
      createdAt: v.createdAt,
      createdByName: schema.users.displayName,
    })
    .from(v)
    .leftJoin(schema.users, eq(schema.users.id, v.createdBy))
    .where(and(eq(v.circuitId, id), eq(v.version, version)))
    .get();
  if (!ver) throw notFound(`Version ${version} of that circuit`);
  const body = CircuitSchema.parse(ver.body);
  const wiring = wiringOf(body);
  return {
    circuitId: id,
    version: ver.version,
    note: ver.note ?? null,
    createdAt: ver.createdAt.toISOString(),
    createdByName: ver.createdByName ?? null,
    isCurrent: ver.version === row.currentVersion,
    body,
    wiring,
    feedForward: findFeedForwardLoops(body, wiring)[0] ?? null,
  };
}

// ---------------------------------------------------------------- writing

/** 409 when another non-archived circuit of the lab has this name (case-insensitive). */
function assertNameFree(ctx: AppContext, labId: string, name: string, exceptId?: string): void {
  const clash = ctx.db
    .select({ id: c.id })
    .from(c)
    .where(
      and(
        eq(c.labId, labId),
        isNull(c.archivedAt),
        sql`lower(${c.name}) = lower(${name})`,
        exceptId ? ne(c.id, exceptId) : undefined,
      ),
    )
    .get();
  if (clash) throw conflict(`The lab already has a circuit named "${name}". Choose another name.`, "name_taken");
}

/** A free name: `base`, else "base (copy)", "base (copy 2)", ... */
function freeName(ctx: AppContext, labId: string, base: string): string {
  const taken = (n: string) =>
    !!ctx.db
      .select({ id: c.id })
      .from(c)
      .where(and(eq(c.labId, labId), isNull(c.archivedAt), sql`lower(${c.name}) = lower(${n})`))
      .get();
  const stem = base.length > 100 ? base.slice(0, 100) : base;
  for (let i = 1; ; i++) {
    const n = i === 1 ? `${stem} (copy)` : `${stem} (copy ${i})`;
    if (!taken(n)) return n;
  }
}

function assertNotArchived(row: CircuitRow): void {
  if (row.archivedAt) throw conflict(`"${row.name}" is archived. Unarchive it before changing it.`, "archived");
}

export interface CreateCircuitInput {
  name: string;
  body?: Circuit;
  template?: TemplateKey;
  note?: string;
  /** Stable key of a seeded demo item. */
  demoKey?: string;
  /** Set by duplicate: recorded in the audit trail. */
  copiedFrom?: { id: string; version: number };
}

/** Creates a circuit with version 1. Returns its id. */
export function createCircuit(ctx: AppContext, actor: Actor, labId: string, input: CreateCircuitInput): string {
  const name = input.name.trim();
  const base = input.body ?? (input.template ? templateCircuit(input.template) : undefined);
  if (!base)
    throw badRequest(
      "Give a circuit body or a template key.",
      [{ path: "body", message: "give a circuit body or a template key" }],
      "invalid",
    );
  const body: Circuit = { ...base, name };
  assertSemanticallyValid(body);
  const note =
    input.note?.trim() ||
    (input.body ? "Created" : `Created from the template "${allTemplates[input.template!].title}"`);
  const id = newId("cir_");
  const now = new Date();
  inTransaction(ctx, () => {
    assertNameFree(ctx, labId, name);
    ctx.db
      .insert(c)
      .values({
        id,
        labId,
        name,
        currentVersion: 1,
        createdBy: actor.userId,
        createdAt: now,
        updatedAt: now,
        archivedAt: null,
        demoKey: input.demoKey ?? null,
      })
      .run();
    ctx.db.insert(v).values({ circuitId: id, version: 1, body, note, createdBy: actor.userId, createdAt: now }).run();
    recordAudit(ctx, {
      labId,
      userId: actor.userId,
      action: input.copiedFrom ? "circuit.duplicated" : "circuit.created",
      targetType: "circuit",
      targetId: id,
      detail: input.copiedFrom
        ? { name, from: input.copiedFrom.id, fromVersion: input.copiedFrom.version }
        : { name, template: input.template ?? null },
    });
  });
  return id;
}

export interface UpdateCircuitInput {
  body: Circuit;
  note?: string;
  baseVersion?: number;
  name?: string;
}

/** Saves a new version (never overwrites). 409 when baseVersion is stale. */
export function updateCircuit(ctx: AppContext, actor: Actor, id: string, input: UpdateCircuitInput): void {
  inTransaction(ctx, () => {
    const row = getRow(ctx, id);
    assertNotArchived(row);
    if (input.baseVersion !== undefined && input.baseVersion !== row.currentVersion)
      throw conflict(
        `This circuit was saved as version ${row.currentVersion} since you opened version ${input.baseVersion}. Reload it and apply your changes again.`,
        "stale_version",
      );
    const name = input.name?.trim() || row.name;
    if (name.toLowerCase() !== row.name.toLowerCase()) assertNameFree(ctx, row.labId, name, id);
    const body: Circuit = { ...input.body, name };
    assertSemanticallyValid(body);
    const version = row.currentVersion + 1;
    const now = new Date();
    ctx.db
      .insert(v)
      .values({
        circuitId: id,
        version,
        body,
        note: input.note?.trim() || null,
        createdBy: actor.userId,
        createdAt: now,
      })
      .run();
    ctx.db.update(c).set({ currentVersion: version, name, updatedAt: now }).where(eq(c.id, id)).run();
    recordAudit(ctx, {
      labId: row.labId,
      userId: actor.userId,
      action: "circuit.saved",
      targetType: "circuit",
      targetId: id,
      detail: { version, ...(name !== row.name ? { renamedFrom: row.name, name } : {}) },
    });
  });
}

/** Copies the current version into a new circuit (version 1). Returns the new id. */
export function duplicateCircuit(ctx: AppContext, actor: Actor, id: string, newName?: string): string {
  const row = getRow(ctx, id);
  const body = currentBody(ctx, row);
  const name = newName?.trim() || freeName(ctx, row.labId, row.name);
  return createCircuit(ctx, actor, row.labId, {
    name,
    body,
    note: `Copied from "${row.name}" version ${row.currentVersion}`,
    copiedFrom: { id, version: row.currentVersion },
  });
}

export function setCircuitArchived(ctx: AppContext, actor: Actor, id: string, archived: boolean): CircuitSummary {
  inTransaction(ctx, () => {
    const row = getRow(ctx, id);
    if (!!row.archivedAt === archived) return;
    if (!archived) assertNameFree(ctx, row.labId, row.name, id);
    ctx.db
      .update(c)
      .set({ archivedAt: archived ? new Date() : null })
      .where(eq(c.id, id))
      .run();
    recordAudit(ctx, {
      labId: row.labId,
      userId: actor.userId,
      action: archived ? "circuit.archived" : "circuit.unarchived",
      targetType: "circuit",
      targetId: id,
      detail: { name: row.name },
    });
  });
  const row = getRow(ctx, id);
  return summarize(ctx, row, currentBody(ctx, row));
}
