/**
 * Runs: building a RunSpec from stored circuit and program versions, launching
 * (with limits), listing, detail, series, per-replicate pages, archive, delete
 * with undo, and cancel. The queue computes; this module stores and reads.
 */
import { randomBytes } from "node:crypto";
import { and, asc, count, desc, eq, inArray, isNotNull, isNull, lt, sql, type SQL } from "drizzle-orm";
import type { AppContext } from "@/server/context";
import { schema } from "@/db/client";
import { RunSpecSchema, RUN_LIMITS, type RunSpec } from "@/shared/schemas/run-spec";
import {
  API_LIMITS,
  type LaunchRun,
  type RunDetail,
  type RunListItem,
  type RunSeries,
  type RunSettings,
} from "@/shared/schemas/api-runs";
import type { Circuit } from "@/shared/schemas/circuit";
import type { InputProgram } from "@/shared/schemas/input-program";
import type { RunSummary } from "@/shared/schemas/analysis";
import {
  ENGINE_VERSION,
  OdeBudget,
  chunkLayout,
  compileProgram,
  gridTimes,
  resolveThreshold,
  validateCircuit,
  withOdeBudget,
} from "@/sim";
import { badRequest, conflict, notFound, tooMany, parseOr400 } from "@/server/http-error";
import { newId } from "@/server/ids";
import { fromBlob } from "@/server/compute/run-store";
import { readPulsePage, type PulsePageQuery } from "@/server/compute/pulse-store";
import { runSettingsBlock } from "@/sim/analysis/run-settings";
import { purgeDeletedTraceSets } from "./traces.service";
import { assertRestorable } from "./undo";
import { objectHistory } from "./audit.service";
import { decodeCursor, pageFromRows, pageLimit } from "./pagination";
import type { Page, PageQuery } from "@/shared/schemas/pagination";

export const randomSeed = () => randomBytes(6).toString("hex");

export type RunRow = typeof schema.runs.$inferSelect;

export interface ResolvedInputs {
  circuit: Circuit;
  circuitId: string | null;
  circuitVersion: number | null;
  program: InputProgram;
  programId: string | null;
  inputSignal?: string;
}

/** Load the circuit (a given or the current version) and program of a lab. 404 for another lab's items. */
export function resolveInputs(
  ctx: AppContext,
  labId: string,
  b: {
    circuitId?: string;
    circuitVersion?: number;
    circuit?: Circuit;
    programId?: string;
    program?: InputProgram;
    inputSignal?: string;
  },
): ResolvedInputs {
  let circuit = b.circuit ?? null;
  let circuitVersion: number | null = null;
  if (b.circuitId) {
    const c = ctx.db
      .select()
      .from(schema.circuits)
      .where(and(eq(schema.circuits.id, b.circuitId), eq(schema.circuits.labId, labId)))
      .get();
    if (!c) throw notFound("That circuit");
    circuitVersion = b.circuitVersion ?? c.currentVersion;
    const v = ctx.db
      .select()
      .from(schema.circuitVersions)
      .where(and(eq(schema.circuitVersions.circuitId, c.id), eq(schema.circuitVersions.version, circuitVersion)))
      .get();
    if (!v) throw notFound(`Version ${circuitVersion} of that circuit`);
    circuit = v.body as Circuit;
  }
  let program = b.program ?? null;
  if (b.programId) {
    const p = ctx.db
      .select()
      .from(schema.inputPrograms)
      .where(and(eq(schema.inputPrograms.id, b.programId), eq(schema.inputPrograms.labId, labId)))
      .get();
    if (!p) throw notFound("That input program");
    program = p.body as InputProgram;
  }
  return {
    circuit: circuit!,
    circuitId: b.circuitId ?? null,
    circuitVersion,
    program: program!,
    programId: b.programId ?? null,
    inputSignal: b.inputSignal,
  };
}

/** A complete, validated RunSpec, or a 400 naming the field. */
export function buildSpec(inputs: ResolvedInputs, settings: RunSettings): RunSpec {
  const signal = inputs.inputSignal ?? inputs.circuit.signals?.[0]?.name;
  if (!signal)
    throw badRequest("The circuit has no input signal for the program to drive; add a signal to the circuit.", [
      { path: "inputSignal", message: "the circuit has no signal" },
    ]);
  if (!inputs.circuit.signals?.some((s) => s.name === signal)) {
    throw badRequest(`The circuit has no signal "${signal}".`, [
      { path: "inputSignal", message: `no signal "${signal}" in the circuit` },
    ]);
  }
  const spec = parseOr400(
    RunSpecSchema,
    {
      ...settings,
      seed: settings.seed ?? randomSeed(),
      circuit: inputs.circuit,
      program: inputs.program,
      inputSignal: signal,
    },
    "run",
  );
  const v = validateCircuit(spec.circuit);
  if (!v.ok)
    throw badRequest(
      `The circuit is not valid: ${v.errors.map((e) => `${e.path}: ${e.message}`).join("; ")}`,
      v.errors.map((e) => ({ path: `circuit.${e.path}`, message: e.message })),
      "invalid_circuit",
    );
  checkLimits(spec);
  return spec;
}

export function checkLimits(spec: RunSpec) {
  const gridPoints = Math.floor(spec.endTimeMinutes / spec.gridStepMinutes + 1e-9) + 1;
  if (gridPoints > RUN_LIMITS.maxGridPoints) {
    throw badRequest(
      `The grid has ${gridPoints} points; at most ${RUN_LIMITS.maxGridPoints.toLocaleString("en-US")} are stored. Use a larger grid step.`,
      [{ path: "settings.gridStepMinutes", message: "too many grid points" }],
      "limit",
    );
  }
  let pulses = 0;
  try {
    pulses = compileProgram(spec.program, spec.endTimeMinutes).pulses.length;
  } catch (e) {
    throw badRequest(`The input program cannot be compiled: ${(e as Error).message}`, [
      { path: "program", message: (e as Error).message },
    ]);
  }
  const rows = pulses * spec.replicates;
  if (rows > API_LIMITS.maxPulseRowsPerRun) {
    throw badRequest(
      `${spec.replicates} replicates x ${pulses} pulses = ${rows} stored rows; the limit is ${API_LIMITS.maxPulseRowsPerRun}. Use fewer replicates or a shorter program.`,
      [{ path: "settings.replicates", message: "too many stored rows" }],
      "limit",
    );
  }
}

/**
 * The threshold check on the event loop, for trusted content only (demo
 * seeding). Requests use checkThresholds, which runs off the event loop with a budget.
 */
export function checkThresholdNow(spec: RunSpec) {
  try {
    resolveThreshold(spec);
  } catch (e) {
    throw badRequest(`The threshold cannot be set: ${(e as Error).message}`, [
      { path: "settings.threshold", message: (e as Error).message },
    ]);
  }
}

/** ODE steps a read route may spend on the event loop re-resolving a stored run's threshold (well under a second). */
const ON_LOOP_THRESHOLD_STEPS = 50_000;

/**
 * A stored run's threshold for read routes (detail, series, comparisons) on the
 * event loop, under a small ODE budget: past it the default threshold throws
 * (the caller shows none) and a given one comes without its mean-field warnings.
 */
export function thresholdOnLoop(spec: RunSpec, runId?: string) {
  if (runId === undefined) return solveThresholdOnLoop(spec);
  // A stored run's spec never changes, so its threshold (or the reason it has none) is solved once per process
  // and kept for the most recently read runs: a run's detail, series and comparisons don't repeat the ODE work.
  let kept = keptThresholds.get(runId);
  if (kept === undefined) {
    try {
      kept = { ok: true, value: solveThresholdOnLoop(spec) };
    } catch (e) {
      kept = { ok: false, error: e };
    }
    if (keptThresholds.size >= KEPT_THRESHOLDS) keptThresholds.delete(keptThresholds.keys().next().value!);
  } else keptThresholds.delete(runId);
  keptThresholds.set(runId, kept); // most recent last
  if (!kept.ok) throw kept.error;
  return kept.value;
}

type Resolved = ReturnType<typeof resolveThreshold>;
/** How many stored runs' thresholds are kept (least recently read dropped first). */
const KEPT_THRESHOLDS = 500;
const keptThresholds = new Map<string, { ok: true; value: Resolved } | { ok: false; error: unknown }>();
let thresholdSolvesOnLoop = 0;
/** Threshold solves done on the event loop so far (for tests: a second read of a run must not add one). */
export const thresholdSolveCount = () => thresholdSolvesOnLoop;

function solveThresholdOnLoop(spec: RunSpec): Resolved {
  thresholdSolvesOnLoop++;
  return withOdeBudget(new OdeBudget({ maxSteps: ON_LOOP_THRESHOLD_STEPS }), () => resolveThreshold(spec));
}

/** The threshold of each spec resolved in the compute thread: 400 when one cannot be set, 422 past the budget. */
export async function checkThresholds(ctx: AppContext, labId: string, specs: RunSpec[]): Promise<void> {
  await ctx.compute.checkThresholds(labId, specs);
}

export async function estimate(ctx: AppContext, labId: string, spec: RunSpec) {
  const pulses = compileProgram(spec.program, spec.endTimeMinutes).pulses.length;
  const estimatedEvents = await ctx.compute.estimateEvents(labId, spec);
  return {
    estimatedEvents,
    // A conservative engine speed for the estimate (docs/benchmarks.md has measured figures).
    estimatedSeconds: estimatedEvents / 10e6,
    gridPoints: gridTimes(spec).length,
    pulses,
    storedPulseRows: pulses * spec.replicates,
  };
}

export function activeRunCount(ctx: AppContext, labId: string): number {
  return ctx.db
    .select({ n: count() })
    .from(schema.runs)
    .where(
      and(
        eq(schema.runs.labId, labId),
        inArray(schema.runs.status, ["queued", "running"]),
        isNull(schema.runs.sweepId),
        isNull(schema.runs.deletedAt),
      ),
    )
    .get()!.n;
}

/**
 * `base` when no run of the lab (deleted ones included, as they can be restored) has that name, else
 * `base 2`, `base 3`... (e.g. "Hold sensor (reproduction 2)" when written as `${name} (reproduction)`).
 */
export function distinctRunName(ctx: AppContext, labId: string, base: string): string {
  const taken = new Set(
    ctx.db
      .select({ name: schema.runs.name })
      .from(schema.runs)
      .where(and(eq(schema.runs.labId, labId), sql`instr(${schema.runs.name}, ${base.slice(0, -1)}) = 1`))
      .all()
      .map((r) => r.name),
  );
  if (!taken.has(base)) return base;
  // "X (reproduction)" -> "X (reproduction 2)"; a name without a closing bracket gets " 2".
  const withNumber = (n: number) => (base.endsWith(")") ? `${base.slice(0, -1)} ${n})` : `${base} ${n}`);
  for (let n = 2; ; n++) if (!taken.has(withNumber(n))) return withNumber(n);
}

export function insertRun(
  ctx: AppContext,
  v: {
    labId: string;
    name: string;
    notes?: string;
    spec: RunSpec;
    inputs?: Partial<ResolvedInputs>;
    userId: string | null;
    sweepId?: string;
    sweepPoint?: number;
    controlOf?: string;
    demoKey?: string;
  },
): string {
  const id = newId("run_");
  ctx.db
    .insert(schema.runs)
    .values({
      id,
      labId: v.labId,
      name: v.name,
      notes: v.notes ?? "",
      status: "queued",
      spec: v.spec,
      seed: v.spec.seed,
      replicates: v.spec.replicates,
      chunkSize: chunkLayout(v.spec).chunkSize,
      engineVersion: ENGINE_VERSION,
      circuitId: v.inputs?.circuitId ?? null,
      circuitVersion: v.inputs?.circuitVersion ?? null,
      programId: v.inputs?.programId ?? null,
      sweepId: v.sweepId ?? null,
      sweepPoint: v.sweepPoint ?? null,
      controlOf: v.controlOf ?? null,
      createdBy: v.userId,
      createdAt: new Date(),
      demoKey: v.demoKey ?? null,
    })
    .run();
  return id;
}

export async function launchRun(ctx: AppContext, labId: string, userId: string, body: LaunchRun): Promise<string> {
  const full = () => {
    if (activeRunCount(ctx, labId) >= API_LIMITS.maxActiveRunsPerLab)
      throw tooMany(
        `This lab already has ${API_LIMITS.maxActiveRunsPerLab} runs queued or running; wait for some to finish or cancel one.`,
      );
  };
  full();
  const inputs = resolveInputs(ctx, labId, body);
  const spec = buildSpec(inputs, body.settings);
  await checkThresholds(ctx, labId, [spec]);
  full(); // again: other launches may have landed while the threshold was computed
  const id = insertRun(ctx, { labId, name: body.name, notes: body.notes, spec, inputs, userId });
  ctx.queue.kick();
  return id;
}

export function getRunRow(ctx: AppContext, id: string): RunRow {
  const row = ctx.db.select().from(schema.runs).where(eq(schema.runs.id, id)).get();
  if (!row) throw notFound("That run");
  return row;
}

/** The figures a phone glance needs: d50, false-pass rate, median delay, and the pass probability at the longest pulse. */
function headlineOf(s: RunSummary): NonNullable<RunListItem["headline"]> {
  const longest = s.byDuration?.length ? s.byDuration[s.byDuration.length - 1] : null;
  return {
    d50: s.d50 ?? null,
    falsePassRate: s.falsePassRate ?? null,
    medianDelay: s.delay?.median ?? null,
    longestDuration: longest?.duration ?? null,
    passAtLongest: longest?.passProbability ?? null,
  };
}

const iso = (d: Date | null | undefined) => (d ? d.toISOString() : null);

function userNames(ctx: AppContext, ids: (string | null)[]): Map<string, string> {
  const want = [...new Set(ids.filter((x): x is string => !!x))];
  if (!want.length) return new Map();
  return new Map(
    ctx.db
      .select({ id: schema.users.id, name: schema.users.displayName })
      .from(schema.users)
      .where(inArray(schema.users.id, want))
      .all()
      .map((u) => [u.id, u.name]),
  );
}

function progressView(ctx: AppContext, row: RunRow) {
  const live = ctx.queue.progress(row.id);
  const done = live?.replicatesDone ?? row.replicatesDone;
  return {
    replicatesDone: done,
    replicates: row.replicates,
    fraction: row.replicates ? done / row.replicates : 0,
    eventsPerSecond: live?.eventsPerSecond ?? (row.computeSeconds > 0 ? row.eventsTotal / row.computeSeconds : null),
    secondsLeft: live?.secondsLeft ?? null,
  };
}

function programNames(ctx: AppContext, ids: (string | null)[]): Map<string, string> {
  const want = [...new Set(ids.filter((x): x is string => !!x))];
  if (!want.length) return new Map();
  return new Map(
    ctx.db
      .select({ id: schema.inputPrograms.id, name: schema.inputPrograms.name })
      .from(schema.inputPrograms)
      .where(inArray(schema.inputPrograms.id, want))
      .all()
      .map((p) => [p.id, p.name]),
  );
}

const PROGRAM_KIND_LABEL: Record<string, string> = {
  pulses: "pulse list",
  periodic: "periodic train",
  ladder: "duration ladder",
  random: "random train",
};

export function toListItem(
  ctx: AppContext,
  row: RunRow,
  names: Map<string, string>,
  programs: Map<string, string> = programNames(ctx, [row.programId]),
): RunListItem {
  const spec = row.spec as RunSpec;
  const s = row.summary as RunSummary | null;
  return {
    id: row.id,
    labId: row.labId,
    name: row.name,
    status: row.status,
    statusReason: row.statusReason,
    replicates: row.replicates,
    seed: row.seed,
    circuitName: spec.circuit.name,
    programName:
      (row.programId && programs.get(row.programId)) ||
      (spec.program ? `inline ${PROGRAM_KIND_LABEL[spec.program.kind] ?? spec.program.kind}` : "no input pulses"),
    sweepId: row.sweepId,
    controlOf: row.controlOf,
    progress: progressView(ctx, row),
    createdAt: row.createdAt.toISOString(),
    finishedAt: iso(row.finishedAt),
    archived: !!row.archivedAt,
    createdBy: row.createdBy ? (names.get(row.createdBy) ?? null) : null,
    headline: s ? headlineOf(s) : null,
  };
}

const statusRank = sql<number>`CASE ${schema.runs.status} WHEN 'running' THEN 0 WHEN 'queued' THEN 1 ELSE 2 END`;

/**
 * One page of the lab's runs: running and queued first, then newest (ties by id). Keyset pagination in SQL
 * on (status rank, created time descending, id): the cursor holds the last run's key, so only one page of rows
 * is read and turned into list items. A run that finishes meanwhile moves to its new place.
 */
export function listRuns(
  ctx: AppContext,
  labId: string,
  q: {
    archived?: boolean;
    status?: string;
    includeSweepPoints?: boolean;
    /** Only these runs (any archive state, sweep points too), in this order; one page, no cursor. */
    ids?: string[];
    /** Only the matched controls of this run. */
    controlOf?: string;
  } & PageQuery,
): Page<RunListItem> {
  if (q.ids) {
    const found = listRunRows(ctx, [
      eq(schema.runs.labId, labId),
      isNull(schema.runs.deletedAt),
      inArray(schema.runs.id, q.ids),
    ]);
    const byId = new Map(found.map((r) => [r.id, r]));
    return { items: q.ids.flatMap((id) => byId.get(id)?.item ?? []), nextCursor: null };
  }
  const conds = [
    eq(schema.runs.labId, labId),
    isNull(schema.runs.deletedAt),
    q.archived ? isNotNull(schema.runs.archivedAt) : isNull(schema.runs.archivedAt),
  ];
  if (!q.includeSweepPoints) conds.push(isNull(schema.runs.sweepId));
  if (q.status) conds.push(eq(schema.runs.status, q.status as any));
  if (q.controlOf) conds.push(eq(schema.runs.controlOf, q.controlOf));
  if (q.cursor) {
    const [rank, negCreated, id] = decodeCursor(q.cursor, 3);
    if (typeof rank !== "number" || typeof negCreated !== "number" || typeof id !== "string")
      throw badRequest("Invalid query: cursor: not a cursor from this list; start again without it.", [
        { path: "cursor", message: "not a cursor from this list" },
      ]);
    const created = -negCreated;
    conds.push(
      sql`(${statusRank} > ${rank} OR (${statusRank} = ${rank} AND (${schema.runs.createdAt} < ${created} OR (${schema.runs.createdAt} = ${created} AND ${schema.runs.id} > ${id}))))`,
    );
  }
  const limit = pageLimit(q);
  const rows = listRunRows(ctx, conds, limit + 1, true);
  return pageFromRows(
    rows,
    limit,
    (x) => [x.rank, -x.createdAt.getTime(), x.id],
    (page) => page.map((x) => x.item),
  );
}

/** What a list item shows from a run's spec and summary JSON: read by json_extract once, then cached by its stamp. */
interface ListJson {
  /** finished time, stats hash and the summary's byte length: a new summary (a re-run sweep point) changes it. */
  stamp: string;
  circuitName: string;
  programKind: string | null;
  headline: RunListItem["headline"];
}

/**
 * Per database: run id -> the figures a list item takes from its JSON columns. A run's spec never changes and
 * its summary is written when it finishes (again only if it is re-run), so an entry is used only while the
 * run's stamp (finished time, stats hash, summary length: all read without parsing the JSON) is the same.
 */
const listJsonCache = new WeakMap<object, Map<string, ListJson>>();
const LIST_JSON_CACHE_MAX = 20_000;

const stampOf = (x: { finishedAt: Date | null; statsHash: string | null; summaryBytes: number | null }) =>
  `${x.finishedAt?.getTime() ?? ""}|${x.statsHash ?? ""}|${x.summaryBytes ?? ""}`;

/** The list JSON of these runs (ids with their current stamps): from the cache, the rest by one json_extract query. */
function listJsonOf(ctx: AppContext, rows: { id: string; stamp: string }[]): Map<string, ListJson> {
  let cache = listJsonCache.get(ctx.sqlite);
  if (!cache) listJsonCache.set(ctx.sqlite, (cache = new Map()));
  const out = new Map<string, ListJson>();
  const missing: string[] = [];
  for (const x of rows) {
    const hit = cache.get(x.id);
    if (hit && hit.stamp === x.stamp) out.set(x.id, hit);
    else missing.push(x.id);
  }
  if (!missing.length) return out;
  const r = schema.runs;
  const num = (path: string) => sql<number | null>`json_extract(${r.summary}, ${path})`;
  const found = ctx.db
    .select({
      id: r.id,
      finishedAt: r.finishedAt,
      statsHash: r.statsHash,
      summaryBytes: sql<number | null>`octet_length(${r.summary})`,
      circuitName: sql<string>`json_extract(${r.spec}, '$.circuit.name')`,
      programKind: sql<string | null>`json_extract(${r.spec}, '$.program.kind')`,
      d50: num("$.d50"),
      falsePassRate: num("$.falsePassRate"),
      medianDelay: num("$.delay.median"),
      longestDuration: num("$.byDuration[#-1].duration"),
      passAtLongest: num("$.byDuration[#-1].passProbability"),
    })
    .from(r)
    .where(inArray(r.id, missing))
    .all();
  if (cache.size + found.length > LIST_JSON_CACHE_MAX) cache.clear();
  for (const x of found) {
    const entry: ListJson = {
      stamp: stampOf(x),
      circuitName: x.circuitName,
      programKind: x.programKind,
      headline:
        x.summaryBytes !== null
          ? {
              d50: x.d50 ?? null,
              falsePassRate: x.falsePassRate ?? null,
              medianDelay: x.medianDelay ?? null,
              longestDuration: x.longestDuration ?? null,
              passAtLongest: x.passAtLongest ?? null,
            }
          : null,
    };
    cache.set(x.id, entry);
    out.set(x.id, entry);
  }
  return out;
}

/**
 * The rows matching `conds` as list items (with their sort rank and created time), at most `limit`, in
 * list order when `ordered`. Lean: only the columns a list item shows; the spec and summary JSON are read
 * (json_extract) only for runs not seen since they last changed (listJsonOf).
 */
function listRunRows(ctx: AppContext, conds: SQL[], limit?: number, ordered = false) {
  const r = schema.runs;
  // A page is found first from the index (no JSON read), then only its rows are read.
  let where = and(...conds);
  let pageOrder: string[] | null = null;
  if (limit !== undefined) {
    pageOrder = ctx.db
      .select({ id: r.id })
      .from(r)
      .where(where)
      .orderBy(...(ordered ? [statusRank, desc(r.createdAt), asc(r.id)] : []))
      .limit(limit)
      .all()
      .map((x) => x.id);
    if (pageOrder.length === 0) return [];
    where = inArray(r.id, pageOrder);
  }
  const found = ctx.db
    .select({
      rank: statusRank,
      id: r.id,
      labId: r.labId,
      name: r.name,
      status: r.status,
      statusReason: r.statusReason,
      replicates: r.replicates,
      replicatesDone: r.replicatesDone,
      eventsTotal: r.eventsTotal,
      computeSeconds: r.computeSeconds,
      seed: r.seed,
      programId: r.programId,
      sweepId: r.sweepId,
      controlOf: r.controlOf,
      createdAt: r.createdAt,
      finishedAt: r.finishedAt,
      archivedAt: r.archivedAt,
      createdBy: r.createdBy,
      statsHash: r.statsHash,
      // The length from the record header: the summary itself is not read (IS NOT NULL would read it).
      summaryBytes: sql<number | null>`octet_length(${r.summary})`,
    })
    .from(r)
    .where(where)
    .orderBy(...(ordered && !pageOrder ? [statusRank, desc(r.createdAt), asc(r.id)] : []))
    .all();
  const byId = new Map(found.map((x) => [x.id, x]));
  const rows = pageOrder ? pageOrder.flatMap((id) => byId.get(id) ?? []) : found;
  const json = listJsonOf(
    ctx,
    rows.map((x) => ({ id: x.id, stamp: stampOf(x) })),
  );
  const names = userNames(
    ctx,
    rows.map((x) => x.createdBy),
  );
  const programs = programNames(
    ctx,
    rows.map((x) => x.programId),
  );
  return rows.flatMap((x) => {
    const j = json.get(x.id);
    // Deleted between the two reads: left out, as if read a moment later.
    if (!j) return [];
    return [
      {
        id: x.id,
        rank: x.rank,
        createdAt: x.createdAt,
        item: {
          id: x.id,
          labId: x.labId,
          name: x.name,
          status: x.status,
          statusReason: x.statusReason,
          replicates: x.replicates,
          seed: x.seed,
          circuitName: j.circuitName,
          programName:
            (x.programId && programs.get(x.programId)) ||
            (j.programKind ? `inline ${PROGRAM_KIND_LABEL[j.programKind] ?? j.programKind}` : "no input pulses"),
          sweepId: x.sweepId,
          controlOf: x.controlOf,
          progress: progressView(ctx, x as unknown as RunRow),
          createdAt: x.createdAt.toISOString(),
          finishedAt: iso(x.finishedAt),
          archived: !!x.archivedAt,
          createdBy: x.createdBy ? (names.get(x.createdBy) ?? null) : null,
          headline: j.headline,
        } satisfies RunListItem,
      },
    ];
  });
}

function historyWords(action: string, by: string | null, detail: Record<string, unknown>): string {
  const who = by ?? "Someone";
  switch (action) {
    case "run.launched":
      return `Launched by ${who}`;
    case "run.imported":
      return `Imported from a bundle by ${who}`;
    case "run.reproduced":
      return `Started by ${who} as a reproduction`;
    case "run.resumed": {
      const kept =
        typeof detail.chunksStored === "number" && typeof detail.chunks === "number"
          ? ` with ${detail.chunksStored} of ${detail.chunks} chunks kept`
          : "";
      return `Interrupted (the server stopped) and resumed${kept}`;
    }
    case "run.cancelled":
      return `Cancelled by ${who}`;
    case "run.deleted":
      return `Deleted by ${who}`;
    case "run.restored":
      return `Restored by ${who}`;
    default:
      return `${action}${by ? ` by ${by}` : ""}`;
  }
}

/** The run's history from the audit trail, oldest first. */
export function runHistory(ctx: AppContext, id: string): RunDetail["history"] {
  return objectHistory(ctx, "run", id).map((e) => {
    const detail = e.detail && typeof e.detail === "object" ? (e.detail as Record<string, unknown>) : {};
    return { action: e.action, at: e.at, by: e.userName, words: historyWords(e.action, e.userName, detail) };
  });
}

/** A run's detail from its id, or from its row when the caller has read it already (read once, parsed once). */
export function runDetail(ctx: AppContext, idOrRow: string | RunRow): RunDetail {
  const row = typeof idOrRow === "string" ? getRunRow(ctx, idOrRow) : idOrRow;
  const id = row.id;
  const names = userNames(ctx, [row.createdBy]);
  const spec = row.spec as RunSpec;
  let threshold: RunDetail["threshold"] = null;
  const stored = (row.summary as RunSummary | null)?.settings ?? null;
  let settings: RunDetail["settings"] = stored;
  try {
    const t = thresholdOnLoop(spec, id);
    settings ??= runSettingsBlock(spec, t);
    threshold = {
      theta: t.theta,
      downTheta: t.downTheta,
      hysteresis: t.hysteresis,
      windowMinutes: t.windowMinutes,
      outputLifetimeMinutes: t.outputLifetimeMinutes,
    };
  } catch {
    threshold = null;
  }
  return {
    ...toListItem(ctx, row, names),
    notes: row.notes,
    history: runHistory(ctx, id),
    spec,
    engineVersion: row.engineVersion,
    eventsTotal: row.eventsTotal,
    cappedReplicates: row.cappedReplicates,
    computeSeconds: row.computeSeconds,
    startedAt: iso(row.startedAt),
    deletedAt: iso(row.deletedAt),
    circuitId: row.circuitId,
    circuitVersion: row.circuitVersion,
    programId: row.programId,
    statsHash: row.statsHash,
    summary: row.summary ?? null,
    threshold,
    settings,
    regime: (row.regime as RunDetail["regime"]) ?? null,
  };
}

const arr = (a: Float64Array) => Array.from(a, (x) => (Number.isFinite(x) ? x : 0));

export function runSeries(ctx: AppContext, id: string, opts: { maxTrajectories?: number } = {}): RunSeries {
  const row = getRunRow(ctx, id);
  const spec = row.spec as RunSpec;
  const times = gridTimes(spec);
  const series = ctx.db.select().from(schema.runSeries).where(eq(schema.runSeries.runId, id)).all();
  const names = spec.circuit.species.map((s) => s.name);
  const pick = (name: string, kind: string) => {
    const s = series.find((x) => x.species === name && x.kind === kind);
    return s ? arr(fromBlob(s.values as Buffer)) : null;
  };
  const trajRows = ctx.db
    .select()
    .from(schema.runTrajectories)
    .where(and(eq(schema.runTrajectories.runId, id), lt(schema.runTrajectories.replicate, opts.maxTrajectories ?? 20)))
    .orderBy(asc(schema.runTrajectories.replicate))
    .all();
  const byRep = new Map<number, Record<string, number[]>>();
  for (const t of trajRows) {
    const m = byRep.get(t.replicate) ?? {};
    m[t.species] = arr(fromBlob(t.values as Buffer));
    byRep.set(t.replicate, m);
  }
  let threshold: RunSeries["threshold"] = null;
  try {
    const t = thresholdOnLoop(spec, id);
    threshold = { theta: t.theta, downTheta: t.downTheta };
  } catch {
    threshold = null;
  }
  const compiled = compileProgram(spec.program, spec.endTimeMinutes);
  return {
    times: Array.from(times),
    input: {
      signal: spec.inputSignal ?? "", // "" only for a run without input pulses (the CLI's imported models)
      pulses: compiled.pulses.map((p: any) => ({ on: p.on, off: p.off, level: p.level })),
    },
    outputSpecies: spec.circuit.outputSpecies,
    species: names.map((name) => ({
      name,
      mean: pick(name, "mean") ?? [],
      sd: pick(name, "sd") ?? [],
      ode: pick(name, "ode"),
    })),
    trajectories: [...byRep.entries()].map(([replicate, values]) => ({ replicate, values })),
    threshold,
  };
}

/** A page of a run's pulses (server/compute/pulse-store.ts reads them from chunk BLOBs or old rows). */
export function replicatePage(ctx: AppContext, id: string, q: PulsePageQuery) {
  const { total, rows } = readPulsePage(ctx.db, id, q);
  return { total, page: q.page, pageSize: q.pageSize, rows };
}

export function softDelete(ctx: AppContext, id: string) {
  const row = getRunRow(ctx, id);
  if (row.deletedAt) throw conflict("That run is already deleted.", "already_deleted");
  if (row.status === "queued" || row.status === "running") ctx.queue.cancel(id);
  ctx.db.update(schema.runs).set({ deletedAt: new Date() }).where(eq(schema.runs.id, id)).run();
}

export function restore(ctx: AppContext, id: string) {
  const row = getRunRow(ctx, id);
  assertRestorable("run", row.deletedAt);
  ctx.db.update(schema.runs).set({ deletedAt: null }).where(eq(schema.runs.id, id)).run();
}

/** Remove runs, sweeps, regime maps and trace sets deleted longer ago than the undo period. */
export function purgeDeleted(ctx: AppContext, now = Date.now()) {
  const cutoff = new Date(now - API_LIMITS.undoDays * 86400_000);
  ctx.db
    .delete(schema.runs)
    .where(and(isNotNull(schema.runs.deletedAt), lt(schema.runs.deletedAt, cutoff)))
    .run();
  ctx.db
    .delete(schema.sweeps)
    .where(and(isNotNull(schema.sweeps.deletedAt), lt(schema.sweeps.deletedAt, cutoff)))
    .run();
  ctx.db
    .delete(schema.regimeMaps)
    .where(and(isNotNull(schema.regimeMaps.deletedAt), lt(schema.regimeMaps.deletedAt, cutoff)))
    .run();
  purgeDeletedTraceSets(ctx, now);
}
