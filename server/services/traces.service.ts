/**
 * Single-cell trace sets: upload (multipart, parsed and checked before anything
 * is stored), preview, detail with the pulse figures, settings changes, soft
 * delete with restore for the undo period (then purged), and the metrics CSV. Parsing and analysis live in sim/traces (pure);
 * this file does the I/O. Contract: shared/schemas/api-traces.ts.
 */
import type { NextFunction, Request, Response } from "express";
import multer from "multer";
import { and, desc, eq, isNotNull, isNull, lt, sql } from "drizzle-orm";
import type { AppContext } from "@/server/context";
import { inTransaction, schema } from "@/db/client";
import { newId } from "@/server/ids";
import { HttpError, badRequest, conflict, notFound, parseOr400 } from "@/server/http-error";
import { recordAudit } from "./audit.service";
import { keyset, pageLimit } from "./pagination";
import type { Page, PageQuery } from "@/shared/schemas/pagination";
import { traceMetricsCsv } from "@/sim/analysis/trace-export";
import { compileProgram } from "@/sim/inputs/compile-program";
import { InputProgramSchema } from "@/shared/schemas/input-program";
import { API_LIMITS } from "@/shared/schemas/api-runs";
import {
  TRACE_LIMITS,
  TraceSettingsSchema,
  TraceUploadOptionsSchema,
  type TraceAnalysis,
  type TraceParseError,
  type TracePreview,
  type TracePulse,
  type TraceSetDetail,
  type TraceSetListItem,
  type TraceSettings,
  type TraceUploadOptions,
} from "@/shared/schemas/api-traces";
import { parseTraces, type ParsedCell } from "@/sim/traces/parse-traces";
import { analyseTraces, chartCells } from "@/sim/traces/trace-metrics";
import type { RawCell } from "@/sim/traces/preprocess";
import { assertRestorable } from "./undo";

export const toBlob = (a: Float64Array) => Buffer.from(a.buffer, a.byteOffset, a.byteLength);
export const fromBlob = (b: Buffer | Uint8Array): Float64Array => {
  const copy = new Uint8Array(b.byteLength);
  copy.set(b);
  return new Float64Array(copy.buffer);
};

// ---------------------------------------------------------------- upload middleware

const upload = multer({
  storage: multer.memoryStorage(),
  // Browsers send the file name as raw UTF-8 bytes; multer's default (Latin-1) would turn 名前.csv into mojibake.
  defParamCharset: "utf8",
  limits: { fileSize: TRACE_LIMITS.maxFileBytes, files: 1, fields: 8, fieldSize: 64 * 1024, parts: 12 },
} as multer.Options & { defParamCharset: string }).single("file"); // multer 2.x option, not yet in @types/multer

/** multer with its errors turned into clear 4xx answers (never a 500). */
export function traceUpload(req: Request, res: Response, next: NextFunction): void {
  upload(req, res, (err: unknown) => {
    if (!err) return next();
    if (err instanceof multer.MulterError) {
      if (err.code === "LIMIT_FILE_SIZE") {
        return next(
          new HttpError(
            413,
            "file_too_large",
            `The file is larger than ${TRACE_LIMITS.maxFileBytes / (1024 * 1024)} MB; split it or drop columns you do not need.`,
          ),
        );
      }
      if (err.code === "LIMIT_UNEXPECTED_FILE")
        return next(
          badRequest(`Send one file, in the form field "file" (got "${err.field}").`, undefined, "bad_upload"),
        );
      return next(badRequest(`The upload was refused: ${err.message}.`, undefined, "bad_upload"));
    }
    const e = err as { status?: number; message?: string };
    if (typeof e.status === "number" && e.status < 500)
      return next(
        badRequest(`The upload could not be read: ${e.message ?? "bad multipart body"}.`, undefined, "bad_upload"),
      );
    next(badRequest("The upload could not be read as a multipart form.", undefined, "bad_upload"));
  });
}

/** The upload's file text and options, or a 400. */
export function readUpload(req: Request): { fileName: string | null; text: string; options: TraceUploadOptions } {
  const file = (req as Request & { file?: Express.Multer.File }).file;
  if (!file)
    throw badRequest(
      'Attach the traces file (CSV or TSV) in the form field "file".',
      [{ path: "file", message: "missing" }],
      "bad_upload",
    );
  const raw = (req.body as Record<string, unknown> | undefined)?.options;
  let json: unknown = {};
  if (typeof raw === "string" && raw.trim() !== "") {
    try {
      json = JSON.parse(raw);
    } catch {
      throw badRequest(
        'The form field "options" is not valid JSON.',
        [{ path: "options", message: "not JSON" }],
        "invalid",
      );
    }
  } else if (raw !== undefined && typeof raw !== "string") {
    throw badRequest(
      'The form field "options" must be JSON text.',
      [{ path: "options", message: "not text" }],
      "invalid",
    );
  }
  const options = parseOr400(TraceUploadOptionsSchema, json, "options");
  const buf = file.buffer;
  if (buf.includes(0))
    throw badRequest(
      "The file is not text (CSV or TSV expected).",
      [{ path: "file", message: "binary" }],
      "invalid_traces",
    );
  return { fileName: cleanFileName(file.originalname), text: buf.toString("utf8"), options };
}

/** An uploaded file's name as stored: control characters (C0, DEL, C1) and any path removed; null when nothing is left. */
export function cleanFileName(name: string | undefined): string | null {
  const clean = (name ?? "")
    .replace(/[\u0000-\u001f\u007f-\u009f]/g, "")
    .replace(/^.*[\\/]/, "")
    .trim();
  return clean ? clean.slice(0, 255) : null;
}

// ---------------------------------------------------------------- building a set

export interface BuiltTraceSet {
  fileName: string | null;
  options: TraceUploadOptions;
  layout: "long" | "wide";
  delimiter: "comma" | "tab" | "semicolon";
  rows: number;
  cells: ParsedCell[];
  schedule: TracePulse[];
  warnings: string[];
  analysis: TraceAnalysis;
  prepared: ReturnType<typeof analyseTraces>["prepared"];
}

/** Answers 400 with the first problems by line and column. */
export class TraceFileError extends HttpError {
  constructor(readonly lines: TraceParseError[]) {
    super(
      400,
      "invalid_traces",
      `The file was not accepted: ${lines
        .slice(0, 3)
        .map((e) => `line ${e.line}${e.column ? `, column ${e.column}` : ""}: ${e.message}`)
        .join("; ")}${lines.length > 3 ? `; and ${lines.length - 3} more` : ""}.`,
      lines.map((e) => ({ path: `line ${e.line}${e.column ? `, column ${e.column}` : ""}`, message: e.message })),
    );
  }
}

/** Writes a TraceFileError with its structured `lines` list; other errors go to the error handler. */
export function sendTraceError(err: unknown, res: Response): boolean {
  if (!(err instanceof TraceFileError)) return false;
  res.status(400).json({ error: { code: err.code, message: err.message, fields: err.fields, lines: err.lines } });
  return true;
}

function scheduleFromProgram(ctx: AppContext, labId: string, programId: string, endMinutes: number): TracePulse[] {
  const row = ctx.db
    .select({ body: schema.inputPrograms.body })
    .from(schema.inputPrograms)
    .where(and(eq(schema.inputPrograms.id, programId), eq(schema.inputPrograms.labId, labId)))
    .get();
  if (!row)
    throw badRequest("That input program was not found in this lab.", [
      { path: "schedule.programId", message: "not found" },
    ]);
  const program = InputProgramSchema.parse(row.body);
  if (program.kind === "random" && program.perReplicate) {
    throw badRequest("That program draws a new schedule per replicate; traces need one schedule for every cell.", [
      { path: "schedule.programId", message: "per-replicate program" },
    ]);
  }
  return compileProgram(program, endMinutes).pulses.map((p) => ({ on: p.on, off: p.off, durationBin: p.durationBin }));
}

function analyse(cells: RawCell[], schedule: TracePulse[], settings: TraceSettings) {
  try {
    return analyseTraces(cells, schedule, settings);
  } catch (e) {
    if (e instanceof RangeError)
      throw badRequest(`Preprocessing: ${e.message}.`, [{ path: "settings.scale", message: e.message }], "invalid");
    throw e;
  }
}

/** Parses, checks and analyses an upload without storing anything. */
export function buildTraceSet(
  ctx: AppContext,
  labId: string,
  up: { fileName: string | null; text: string; options: TraceUploadOptions },
): BuiltTraceSet {
  const { options } = up;
  const parsed = parseTraces(up.text, {
    layout: options.layout,
    delimiter: options.delimiter,
    timeUnit: options.timeUnit,
    channel: options.channel,
    scheduleColumn: options.schedule.source === "column" ? options.schedule.column : undefined,
    onAbove: options.schedule.source === "column" ? options.schedule.onAbove : undefined,
  });
  if (!parsed.ok) throw new TraceFileError(parsed.errors);
  let end = 0;
  for (const c of parsed.cells) end = Math.max(end, c.times[c.times.length - 1]);
  const schedule =
    options.schedule.source === "column"
      ? (parsed.schedule ?? [])
      : scheduleFromProgram(ctx, labId, options.schedule.programId, end);
  const { analysis, prepared } = analyse(parsed.cells, schedule, options.settings);
  const warnings = [...parsed.warnings];
  if (schedule.length === 0) warnings.push("No input pulse: there is nothing to score; check the schedule.");
  return {
    fileName: up.fileName,
    options,
    layout: parsed.layout,
    delimiter: parsed.delimiter,
    rows: parsed.rows,
    cells: parsed.cells,
    schedule,
    warnings,
    analysis,
    prepared,
  };
}

export function previewOf(b: BuiltTraceSet): TracePreview {
  let t0 = Infinity;
  let t1 = -Infinity;
  for (const c of b.cells) {
    t0 = Math.min(t0, c.times[0]);
    t1 = Math.max(t1, c.times[c.times.length - 1]);
  }
  return {
    fileName: b.fileName,
    layout: b.layout,
    delimiter: b.delimiter,
    timeUnit: b.options.timeUnit,
    rows: b.rows,
    cellCount: b.cells.length,
    timeRangeMinutes: [t0, t1],
    schedule: b.schedule,
    warnings: b.warnings,
    sample: chartCells(b.prepared.slice(0, 8), TRACE_LIMITS.maxChartPointsPerCell),
    analysis: b.analysis,
  };
}

/** Stores a built set and its cells in one transaction; returns the id. */
export function saveTraceSet(
  ctx: AppContext,
  labId: string,
  userId: string | null,
  b: Pick<BuiltTraceSet, "fileName" | "layout" | "cells" | "schedule"> & {
    timeUnit: "s" | "min" | "h";
    settings: TraceSettings;
    name: string;
  },
  extra: { synthetic?: boolean; demoKey?: string } = {},
): string {
  const id = newId("trs_");
  inTransaction(ctx, () => {
    ctx.db
      .insert(schema.traceSets)
      .values({
        id,
        labId,
        name: b.name,
        synthetic: extra.synthetic ?? false,
        fileName: b.fileName,
        layout: b.layout,
        timeUnit: b.timeUnit,
        schedule: b.schedule,
        settings: b.settings,
        cellCount: b.cells.length,
        uploadedBy: userId,
        createdAt: new Date(),
        demoKey: extra.demoKey ?? null,
      })
      .run();
    for (const c of b.cells) {
      ctx.db
        .insert(schema.traceCells)
        .values({ traceSetId: id, cell: c.cell, times: toBlob(c.times), values: toBlob(c.values) })
        .run();
    }
    recordAudit(ctx, {
      labId,
      userId,
      action: "traces.uploaded",
      targetType: "traceSet",
      targetId: id,
      detail: { name: b.name, cells: b.cells.length },
    });
  });
  return id;
}

// ---------------------------------------------------------------- reading

type TraceSetRow = typeof schema.traceSets.$inferSelect;

/**
 * A live (not deleted) set, or 404. Every route but restore reads through
 * this: the access check finds deleted sets too (so restore can reach them).
 */
function getRow(ctx: AppContext, id: string): TraceSetRow {
  const row = ctx.db
    .select()
    .from(schema.traceSets)
    .where(and(eq(schema.traceSets.id, id), isNull(schema.traceSets.deletedAt)))
    .get();
  if (!row) throw notFound("That trace set");
  return row;
}

function userName(ctx: AppContext, id: string | null): string | null {
  if (!id) return null;
  return (
    ctx.db.select({ n: schema.users.displayName }).from(schema.users).where(eq(schema.users.id, id)).get()?.n ?? null
  );
}

function listItem(row: TraceSetRow, name: string | null): TraceSetListItem {
  return {
    id: row.id,
    labId: row.labId,
    name: row.name,
    synthetic: row.synthetic,
    fileName: row.fileName,
    layout: row.layout,
    timeUnit: row.timeUnit,
    cellCount: row.cellCount,
    uploadedBy: row.uploadedBy,
    uploadedByName: name,
    createdAt: row.createdAt.getTime(),
  };
}

const traceSetOrder = keyset([
  { col: schema.traceSets.createdAt, dir: "desc", type: "number" },
  { col: schema.traceSets.id, dir: "asc", type: "string" },
]);

/** One page of the lab's trace sets, newest first (ties by id); keyset on (created time, id). */
export function listTraceSets(ctx: AppContext, labId: string, q: PageQuery = {}): Page<TraceSetListItem> {
  const rows = ctx.db
    .select()
    .from(schema.traceSets)
    .where(and(eq(schema.traceSets.labId, labId), isNull(schema.traceSets.deletedAt), traceSetOrder.after(q.cursor)))
    .orderBy(...traceSetOrder.orderBy)
    .limit(pageLimit(q) + 1)
    .all();
  const names = new Map<string, string | null>();
  return traceSetOrder.page(
    rows,
    q,
    (r) => [r.createdAt.getTime(), r.id],
    (page) =>
      page.map((r) => {
        if (r.uploadedBy && !names.has(r.uploadedBy)) names.set(r.uploadedBy, userName(ctx, r.uploadedBy));
        return listItem(r, r.uploadedBy ? (names.get(r.uploadedBy) ?? null) : null);
      }),
  );
}

export function readCells(ctx: AppContext, id: string): RawCell[] {
  return (
    ctx.db
      .select()
      .from(schema.traceCells)
      .where(eq(schema.traceCells.traceSetId, id))
      // upload order
      .orderBy(sql`rowid`)
      .all()
      .map((c) => ({ cell: c.cell, times: fromBlob(c.times), values: fromBlob(c.values) }))
  );
}

function settingsOf(row: TraceSetRow): TraceSettings {
  const r = TraceSettingsSchema.safeParse(row.settings);
  if (!r.success)
    throw new HttpError(
      409,
      "bad_settings",
      "This trace set's stored settings are incomplete; save new settings (PATCH) to analyse it.",
    );
  return r.data;
}

/** The analysis of a stored set (recomputed from its cells: the settings may have changed). */
export function analyseStored(ctx: AppContext, id: string) {
  const row = getRow(ctx, id);
  const settings = settingsOf(row);
  const cells = readCells(ctx, id);
  const { analysis, prepared } = analyse(cells, row.schedule as TracePulse[], settings);
  return { row, settings, analysis, prepared };
}

export function traceSetDetail(ctx: AppContext, id: string): TraceSetDetail {
  const { row, settings, analysis, prepared } = analyseStored(ctx, id);
  const matches = ctx.db
    .select({
      id: schema.matches.id,
      runId: schema.matches.runId,
      sweepId: schema.matches.sweepId,
      createdAt: schema.matches.createdAt,
    })
    .from(schema.matches)
    .where(eq(schema.matches.traceSetId, id))
    .orderBy(desc(schema.matches.createdAt))
    .all();
  return {
    ...listItem(row, userName(ctx, row.uploadedBy)),
    schedule: row.schedule as TracePulse[],
    settings,
    cells: chartCells(prepared.slice(0, TRACE_LIMITS.maxChartCells), TRACE_LIMITS.maxChartPointsPerCell),
    analysis,
    matches: matches.map((m) => ({ ...m, createdAt: m.createdAt.getTime() })),
  };
}

export function updateTraceSet(
  ctx: AppContext,
  userId: string,
  id: string,
  patch: { name?: string; settings?: TraceSettings },
): void {
  const row = getRow(ctx, id);
  if (patch.settings) {
    // Check the new settings analyse before storing them (a fitted scale may fail).
    analyse(readCells(ctx, id), row.schedule as TracePulse[], patch.settings);
  }
  const set: Partial<TraceSetRow> = {};
  if (patch.name !== undefined) set.name = patch.name;
  if (patch.settings !== undefined) set.settings = patch.settings;
  if (Object.keys(set).length === 0) return;
  ctx.db.update(schema.traceSets).set(set).where(eq(schema.traceSets.id, id)).run();
  recordAudit(ctx, {
    labId: row.labId,
    userId,
    action: "traces.updated",
    targetType: "traceSet",
    targetId: id,
    detail: { fields: Object.keys(set) },
  });
}

/** Soft delete: the set disappears from every route but restore, and is purged after the undo period. */
export function deleteTraceSet(ctx: AppContext, userId: string, id: string): void {
  const row = ctx.db.select().from(schema.traceSets).where(eq(schema.traceSets.id, id)).get();
  if (!row) throw notFound("That trace set");
  if (row.deletedAt) throw conflict("That trace set is already deleted.", "already_deleted");
  inTransaction(ctx, () => {
    ctx.db.update(schema.traceSets).set({ deletedAt: new Date() }).where(eq(schema.traceSets.id, id)).run();
    recordAudit(ctx, {
      labId: row.labId,
      userId,
      action: "traces.deleted",
      targetType: "traceSet",
      targetId: id,
      detail: { name: row.name },
    });
  });
}

/** Undoes a delete (until the purge); 409 when the set is not deleted. Answers the list item (no analysis). */
export function restoreTraceSet(ctx: AppContext, userId: string, id: string): TraceSetListItem {
  const row = ctx.db.select().from(schema.traceSets).where(eq(schema.traceSets.id, id)).get();
  if (!row) throw notFound("That traceSet");
  assertRestorable("trace set", row.deletedAt);
  inTransaction(ctx, () => {
    ctx.db.update(schema.traceSets).set({ deletedAt: null }).where(eq(schema.traceSets.id, id)).run();
    recordAudit(ctx, {
      labId: row.labId,
      userId,
      action: "traces.restored",
      targetType: "traceSet",
      targetId: id,
      detail: { name: row.name },
    });
  });
  return listItem({ ...row, deletedAt: null }, userName(ctx, row.uploadedBy));
}

/** Removes trace sets deleted longer ago than the undo period (cells and matches cascade); returns how many. */
export function purgeDeletedTraceSets(ctx: Pick<AppContext, "db">, now = Date.now()): number {
  const cutoff = new Date(now - API_LIMITS.undoDays * 86400_000);
  const t = schema.traceSets;
  return ctx.db
    .delete(t)
    .where(and(isNotNull(t.deletedAt), lt(t.deletedAt, cutoff)))
    .run().changes;
}

// ---------------------------------------------------------------- CSV export

/**
 * One row per cell and analysed pulse (times in minutes, levels in trace units), by the export rule of
 * docs/metrics.md (sim/analysis/trace-export.ts); synthetic sets say so in a column of every row.
 */
export function metricsCsv(analysis: TraceAnalysis, synthetic: boolean): string {
  return traceMetricsCsv(analysis, synthetic);
}
