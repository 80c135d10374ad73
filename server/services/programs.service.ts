/**
 * Input programs: named schedules per lab. Not versioned (a run stores the
 * whole program it used), so a save replaces the body. Names are unique per
 * lab among non-archived programs (case-insensitive).
 */
import { and, eq, isNotNull, isNull, ne, sql } from "drizzle-orm";
import type { AppContext } from "@/server/context";
import { inTransaction, schema } from "@/db/client";
import { newId } from "@/server/ids";
import { badRequest, conflict, notFound } from "@/server/http-error";
import { recordAudit } from "./audit.service";
import { keyset, pageLimit } from "./pagination";
import type { Page, PageQuery } from "@/shared/schemas/pagination";
import { compileProgram } from "@/sim";
import { InputProgramSchema, type DurationDistribution, type InputProgram } from "@/shared/schemas/input-program";
import type { FieldError } from "@/shared/schemas/api-circuits";
import type { PreviewProgramResponse, ProgramDetailResponse, ProgramSummary } from "@/shared/schemas/api-programs";
import type { Actor } from "./circuits.service";

const p = schema.inputPrograms;
type ProgramRow = typeof p.$inferSelect;

// ---------------------------------------------------------------- checks and wording

/** Checks beyond the schema, with dot paths under `prefix` (e.g. "body.durations.max"). */
export function programFieldErrors(program: InputProgram, prefix: string): FieldError[] {
  const errors: FieldError[] = [];
  const at = (path: string) => [prefix, path].filter(Boolean).join(".");
  if (
    program.kind === "random" &&
    program.durations.dist === "uniform" &&
    program.durations.min > program.durations.max
  )
    errors.push({ path: at("durations.max"), message: "the longest duration must not be shorter than the shortest" });
  return errors;
}

function assertProgramValid(program: InputProgram, prefix: string): void {
  const errors = programFieldErrors(program, prefix);
  if (errors.length)
    throw badRequest(`Invalid program: ${errors.map((e) => `${e.path}: ${e.message}`).join("; ")}`, errors, "invalid");
}

const fmt = (x: number) => (Number.isInteger(x) ? String(x) : String(Number(x.toPrecision(3))));
const range = (xs: number[]) => {
  const lo = Math.min(...xs);
  const hi = Math.max(...xs);
  return lo === hi ? `${fmt(lo)} min` : `${fmt(lo)}-${fmt(hi)} min`;
};
function describeDurations(d: DurationDistribution): string {
  if (d.dist === "uniform") return `${fmt(d.min)}-${fmt(d.max)} min (uniform)`;
  if (d.dist === "exponential") return `mean ${fmt(d.mean)} min (exponential)`;
  return `mean ${fmt(d.mean)} min (gamma, shape ${fmt(d.shape)})`;
}

/** One line describing a program, for lists. */
export function describeProgram(b: InputProgram): string {
  switch (b.kind) {
    case "pulses":
      return `${b.pulses.length} pulse${b.pulses.length === 1 ? "" : "s"}, ${range(b.pulses.map((x) => x.duration))}`;
    case "periodic":
      return `on ${fmt(b.onDuration)} min, off ${fmt(b.offDuration)} min${b.count ? `, ${b.count} pulses` : ""}, from ${fmt(b.start)} min`;
    case "ladder":
      return `ladder of ${b.durations.length} duration${b.durations.length === 1 ? "" : "s"} (${range(b.durations)})${b.repeats > 1 ? ` x${b.repeats}` : ""}, gap ${fmt(b.gap)} min`;
    case "random": {
      const extra = b.extraPulses.length
        ? `, plus ${b.extraPulses.length} set pulse${b.extraPulses.length === 1 ? "" : "s"}`
        : "";
      return `random pulses about every ${fmt(b.meanInterval)} min, ${describeDurations(b.durations)}${extra}${b.perReplicate ? ", drawn per replicate" : ""}`;
    }
  }
}

// ---------------------------------------------------------------- reading

function summarize(row: ProgramRow, body: InputProgram, createdByName: string | null): ProgramSummary {
  return {
    id: row.id,
    labId: row.labId,
    name: row.name,
    kind: body.kind,
    description: describeProgram(body),
    createdByName,
    createdAt: row.createdAt.toISOString(),
    updatedAt: row.updatedAt.toISOString(),
    archivedAt: row.archivedAt ? row.archivedAt.toISOString() : null,
    demoKey: row.demoKey ?? null,
  };
}

function getRow(ctx: AppContext, id: string): ProgramRow {
  const row = ctx.db.select().from(p).where(eq(p.id, id)).get();
  if (!row) throw notFound("That program");
  return row;
}

function userName(ctx: AppContext, userId: string | null): string | null {
  if (!userId) return null;
  return (
    ctx.db.select({ n: schema.users.displayName }).from(schema.users).where(eq(schema.users.id, userId)).get()?.n ??
    null
  );
}

const programOrder = keyset([
  { col: p.updatedAt, dir: "desc", type: "number" },
  { col: p.id, dir: "asc", type: "string" },
]);

/** One page of the lab's programs, most recently changed first (ties by id); keyset on (updated time, id). */
export function listPrograms(
  ctx: AppContext,
  labId: string,
  opts: { archived?: boolean } & PageQuery = {},
): Page<ProgramSummary> {
  const rows = ctx.db
    .select({ row: p, createdByName: schema.users.displayName })
    .from(p)
    .leftJoin(schema.users, eq(schema.users.id, p.createdBy))
    .where(
      and(
        eq(p.labId, labId),
        opts.archived ? isNotNull(p.archivedAt) : isNull(p.archivedAt),
        programOrder.after(opts.cursor),
      ),
    )
    .orderBy(...programOrder.orderBy)
    .limit(pageLimit(opts) + 1)
    .all();
  return programOrder.page(
    rows,
    opts,
    (r) => [r.row.updatedAt.getTime(), r.row.id],
    (page) => page.map((r) => summarize(r.row, InputProgramSchema.parse(r.row.body), r.createdByName ?? null)),
  );
}

export function getProgramDetail(ctx: AppContext, id: string): ProgramDetailResponse {
  const row = getRow(ctx, id);
  const body = InputProgramSchema.parse(row.body);
  return { program: summarize(row, body, userName(ctx, row.createdBy)), body };
}

// ---------------------------------------------------------------- writing

function assertNameFree(ctx: AppContext, labId: string, name: string, exceptId?: string): void {
  const clash = ctx.db
    .select({ id: p.id })
    .from(p)
    .where(
      and(
        eq(p.labId, labId),
        isNull(p.archivedAt),
        sql`lower(${p.name}) = lower(${name})`,
        exceptId ? ne(p.id, exceptId) : undefined,
      ),
    )
    .get();
  if (clash) throw conflict(`The lab already has an input program named "${name}". Choose another name.`, "name_taken");
}

function freeName(ctx: AppContext, labId: string, base: string): string {
  const taken = (n: string) =>
    !!ctx.db
      .select({ id: p.id })
      .from(p)
      .where(and(eq(p.labId, labId), isNull(p.archivedAt), sql`lower(${p.name}) = lower(${n})`))
      .get();
  const stem = base.length > 100 ? base.slice(0, 100) : base;
  for (let i = 1; ; i++) {
    const n = i === 1 ? `${stem} (copy)` : `${stem} (copy ${i})`;
    if (!taken(n)) return n;
  }
}

export function createProgram(
  ctx: AppContext,
  actor: Actor,
  labId: string,
  input: { name: string; body: InputProgram; demoKey?: string; copiedFrom?: string },
): string {
  const name = input.name.trim();
  assertProgramValid(input.body, "body");
  const id = newId("prg_");
  const now = new Date();
  inTransaction(ctx, () => {
    assertNameFree(ctx, labId, name);
    ctx.db
      .insert(p)
      .values({
        id,
        labId,
        name,
        body: input.body,
        createdBy: actor.userId,
        createdAt: now,
        updatedAt: now,
        archivedAt: null,
        demoKey: input.demoKey ?? null,
      })
      .run();
    recordAudit(ctx, {
      labId,
      userId: actor.userId,
      action: input.copiedFrom ? "program.duplicated" : "program.created",
      targetType: "program",
      targetId: id,
      detail: input.copiedFrom ? { name, from: input.copiedFrom } : { name, kind: input.body.kind },
    });
  });
  return id;
}

export function updateProgram(
  ctx: AppContext,
  actor: Actor,
  id: string,
  input: { name?: string; body?: InputProgram },
): void {
  inTransaction(ctx, () => {
    const row = getRow(ctx, id);
    if (row.archivedAt) throw conflict(`"${row.name}" is archived. Unarchive it before changing it.`, "archived");
    const name = input.name?.trim() || row.name;
    if (name.toLowerCase() !== row.name.toLowerCase()) assertNameFree(ctx, row.labId, name, id);
    if (input.body) assertProgramValid(input.body, "body");
    ctx.db
      .update(p)
      .set({ name, ...(input.body ? { body: input.body } : {}), updatedAt: new Date() })
      .where(eq(p.id, id))
      .run();
    recordAudit(ctx, {
      labId: row.labId,
      userId: actor.userId,
      action: "program.saved",
      targetType: "program",
      targetId: id,
      detail: {
        ...(input.body ? { kind: input.body.kind } : {}),
        ...(name !== row.name ? { renamedFrom: row.name, name } : {}),
      },
    });
  });
}

export function duplicateProgram(ctx: AppContext, actor: Actor, id: string, newName?: string): string {
  const row = getRow(ctx, id);
  const body = InputProgramSchema.parse(row.body);
  const name = newName?.trim() || freeName(ctx, row.labId, row.name);
  return createProgram(ctx, actor, row.labId, { name, body, copiedFrom: id });
}

export function setProgramArchived(ctx: AppContext, actor: Actor, id: string, archived: boolean): ProgramSummary {
  inTransaction(ctx, () => {
    const row = getRow(ctx, id);
    if (!!row.archivedAt === archived) return;
    if (!archived) assertNameFree(ctx, row.labId, row.name, id);
    ctx.db
      .update(p)
      .set({ archivedAt: archived ? new Date() : null })
      .where(eq(p.id, id))
      .run();
    recordAudit(ctx, {
      labId: row.labId,
      userId: actor.userId,
      action: archived ? "program.archived" : "program.unarchived",
      targetType: "program",
      targetId: id,
      detail: { name: row.name },
    });
  });
  return getProgramDetail(ctx, id).program;
}

// ---------------------------------------------------------------- preview

/** Compiles a program for the live preview plot (one realisation for random programs). */
export function previewProgram(program: InputProgram, endTimeMinutes: number): PreviewProgramResponse {
  assertProgramValid(program, "program");
  let compiled: {
    pulses: { on: number; off: number; level: number; durationBin: number }[];
    switchTimes: ArrayLike<number>;
    levels: ArrayLike<number>;
  };
  try {
    compiled = compileProgram(program, endTimeMinutes);
  } catch (e) {
    const message = e instanceof Error ? e.message : String(e);
    throw badRequest(`This program cannot be compiled: ${message}`, [{ path: "program", message }], "invalid");
  }
  const note =
    program.kind === "random" && program.perReplicate
      ? "Drawn afresh for every replicate; this is one example realisation."
      : compiled.pulses.length === 0
        ? `No pulse starts before the end time (${fmt(endTimeMinutes)} min).`
        : null;
  return {
    pulses: compiled.pulses.map((x) => ({ on: x.on, off: x.off, level: x.level, durationBin: x.durationBin })),
    switchTimes: Array.from(compiled.switchTimes),
    levels: Array.from(compiled.levels),
    endTimeMinutes,
    note,
  };
}
