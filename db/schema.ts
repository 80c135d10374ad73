/**
 * The whole database. One file, SQLite through Drizzle; migrations in drizzle/
 * are generated from this file (npm run db:generate), never edited by hand.
 *
 * Ids are random text ids (not guessable). JSON columns hold documents whose
 * shape is a zod schema in shared/ (validated on the way in). Large numeric
 * series are Float64 little-endian BLOBs.
 */
import { sqliteTable, text, integer, real, blob, primaryKey, index, uniqueIndex } from "drizzle-orm/sqlite-core";

const createdAt = () => integer("created_at", { mode: "timestamp_ms" }).notNull();

// ---------------------------------------------------------------- accounts
export const users = sqliteTable(
  "users",
  {
    id: text("id").primaryKey(),
    email: text("email").notNull(),
    displayName: text("display_name").notNull(),
    passwordHash: text("password_hash"),
    isSiteAdmin: integer("is_site_admin", { mode: "boolean" }).notNull().default(false),
    notifyOnRunEnd: integer("notify_on_run_end", { mode: "boolean" }).notNull().default(true),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("users_email_idx").on(t.email)],
);

export const labs = sqliteTable(
  "labs",
  {
    id: text("id").primaryKey(),
    name: text("name").notNull(),
    /** Stable key for seeded demo items, so seeding is idempotent item by item. */
    demoKey: text("demo_key"),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("labs_demo_key_idx").on(t.demoKey)],
);

export const memberships = sqliteTable(
  "memberships",
  {
    labId: text("lab_id")
      .notNull()
      .references(() => labs.id, { onDelete: "cascade" }),
    userId: text("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    role: text("role", { enum: ["owner", "editor", "viewer"] }).notNull(),
    createdAt: createdAt(),
  },
  (t) => [primaryKey({ columns: [t.labId, t.userId] }), index("memberships_user_idx").on(t.userId)],
);

export const sessions = sqliteTable(
  "sessions",
  {
    sid: text("sid").primaryKey(),
    data: text("data").notNull(),
    expiresAt: integer("expires_at").notNull(),
  },
  (t) => [index("sessions_expires_idx").on(t.expiresAt)],
);

/** One-time tokens: password reset, invitation, first-admin set-up, sign-up confirmation. Only the hash is stored. */
export const tokens = sqliteTable("tokens", {
  tokenHash: text("token_hash").primaryKey(),
  purpose: text("purpose", { enum: ["reset", "invite", "setup", "signup"] }).notNull(),
  userId: text("user_id").references(() => users.id, { onDelete: "cascade" }),
  labId: text("lab_id").references(() => labs.id, { onDelete: "cascade" }),
  email: text("email"),
  role: text("role", { enum: ["owner", "editor", "viewer"] }),
  createdBy: text("created_by"),
  /** Sign-up confirmation: the pending account's display name and password hash (JSON). */
  payload: text("payload", { mode: "json" }).$type<{ displayName: string; passwordHash: string }>(),
  expiresAt: integer("expires_at", { mode: "timestamp_ms" }).notNull(),
  usedAt: integer("used_at", { mode: "timestamp_ms" }),
  createdAt: createdAt(),
});

/** Mail kept by the local fake SMTP server (development and tests). */
export const outbox = sqliteTable("outbox", {
  id: integer("id").primaryKey({ autoIncrement: true }),
  to: text("to").notNull(),
  from: text("from").notNull(),
  subject: text("subject").notNull(),
  text: text("text").notNull(),
  receivedAt: createdAt(),
});

export const auditEvents = sqliteTable(
  "audit_events",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    labId: text("lab_id"),
    userId: text("user_id"),
    action: text("action").notNull(),
    targetType: text("target_type"),
    targetId: text("target_id"),
    detail: text("detail", { mode: "json" }),
    at: integer("at", { mode: "timestamp_ms" }).notNull(),
  },
  (t) => [index("audit_lab_idx").on(t.labId, t.at)],
);

/** Small instance-wide settings (key/value), e.g. the generated session secret. */
export const appSettings = sqliteTable("app_settings", {
  key: text("key").primaryKey(),
  value: text("value").notNull(),
});

// ---------------------------------------------------------------- models
export const circuits = sqliteTable(
  "circuits",
  {
    id: text("id").primaryKey(),
    labId: text("lab_id")
      .notNull()
      .references(() => labs.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    currentVersion: integer("current_version").notNull().default(1),
    createdBy: text("created_by"),
    createdAt: createdAt(),
    updatedAt: integer("updated_at", { mode: "timestamp_ms" }).notNull(),
    archivedAt: integer("archived_at", { mode: "timestamp_ms" }),
    demoKey: text("demo_key"),
  },
  (t) => [index("circuits_lab_idx").on(t.labId), uniqueIndex("circuits_demo_key_idx").on(t.labId, t.demoKey)],
);

/** Every saved version of a circuit; a run keeps the version it used. Body: shared/schemas/circuit.ts. */
export const circuitVersions = sqliteTable(
  "circuit_versions",
  {
    circuitId: text("circuit_id")
      .notNull()
      .references(() => circuits.id, { onDelete: "cascade" }),
    version: integer("version").notNull(),
    body: text("body", { mode: "json" }).notNull(),
    note: text("note"),
    createdBy: text("created_by"),
    createdAt: createdAt(),
  },
  (t) => [primaryKey({ columns: [t.circuitId, t.version] })],
);

/** Body: shared/schemas/input-program.ts. */
export const inputPrograms = sqliteTable(
  "input_programs",
  {
    id: text("id").primaryKey(),
    labId: text("lab_id")
      .notNull()
      .references(() => labs.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    body: text("body", { mode: "json" }).notNull(),
    createdBy: text("created_by"),
    createdAt: createdAt(),
    updatedAt: integer("updated_at", { mode: "timestamp_ms" }).notNull(),
    archivedAt: integer("archived_at", { mode: "timestamp_ms" }),
    demoKey: text("demo_key"),
  },
  (t) => [index("programs_lab_idx").on(t.labId), uniqueIndex("programs_demo_key_idx").on(t.labId, t.demoKey)],
);

// ---------------------------------------------------------------- runs
export const RUN_STATUSES = ["queued", "running", "finished", "failed", "capped", "cancelled"] as const;

export const runs = sqliteTable(
  "runs",
  {
    id: text("id").primaryKey(),
    labId: text("lab_id")
      .notNull()
      .references(() => labs.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    notes: text("notes").notNull().default(""),
    status: text("status", { enum: RUN_STATUSES }).notNull(),
    statusReason: text("status_reason"),
    /** The full RunSpec as launched (circuit and program embedded). */
    spec: text("spec", { mode: "json" }).notNull(),
    seed: text("seed").notNull(),
    replicates: integer("replicates").notNull(),
    chunkSize: integer("chunk_size").notNull(),
    engineVersion: text("engine_version").notNull(),
    circuitId: text("circuit_id"),
    circuitVersion: integer("circuit_version"),
    programId: text("program_id"),
    sweepId: text("sweep_id"),
    sweepPoint: integer("sweep_point"),
    /** The run this one is the matched simple-regulation control of. */
    controlOf: text("control_of"),
    /** Reproduction: the run (or "bundle") this run re-computes, and the stats hash it must match. */
    reproduceOf: text("reproduce_of"),
    expectedStatsHash: text("expected_stats_hash"),
    /** Engine version of the original (run or bundle). */
    expectedEngineVersion: text("expected_engine_version"),
    replicatesDone: integer("replicates_done").notNull().default(0),
    eventsTotal: integer("events_total").notNull().default(0),
    cappedReplicates: integer("capped_replicates").notNull().default(0),
    computeSeconds: real("compute_seconds").notNull().default(0),
    /** Aggregated figures (shared/schemas/analysis.ts), written once when the run finishes. */
    summary: text("summary", { mode: "json" }),
    /** Content hash of the stored statistics, for verified reproduction. */
    statsHash: text("stats_hash"),
    /** Behaviour labels {deterministic, stochastic} with their evidence (docs/regimes.md), written at finalisation. */
    regime: text("regime", { mode: "json" }),
    /** The two labels alone, for maps and lists. */
    regimeDeterministic: text("regime_deterministic"),
    regimeStochastic: text("regime_stochastic"),
    /** Compact per-replicate figures (sim/regimes/replicate-figures.ts), written at finalisation; for design targets. */
    replicateFigures: text("replicate_figures", { mode: "json" }),
    createdBy: text("created_by"),
    createdAt: createdAt(),
    startedAt: integer("started_at", { mode: "timestamp_ms" }),
    finishedAt: integer("finished_at", { mode: "timestamp_ms" }),
    archivedAt: integer("archived_at", { mode: "timestamp_ms" }),
    /** Soft delete: undo within the grace period, purged after it. */
    deletedAt: integer("deleted_at", { mode: "timestamp_ms" }),
    demoKey: text("demo_key"),
  },
  (t) => [
    index("runs_lab_idx").on(t.labId, t.createdAt),
    index("runs_status_idx").on(t.status),
    index("runs_sweep_idx").on(t.sweepId, t.sweepPoint),
    uniqueIndex("runs_demo_key_idx").on(t.labId, t.demoKey),
  ],
);

/**
 * One row per finished chunk of replicates (chunk boundaries depend only on the
 * spec). Written in the same transaction as the chunk's replicate and pulse rows,
 * so a crash never leaves half a chunk. Grid sums let aggregates be reduced in
 * chunk order; they are dropped when the run finishes.
 */
export const runChunks = sqliteTable(
  "run_chunks",
  {
    runId: text("run_id")
      .notNull()
      .references(() => runs.id, { onDelete: "cascade" }),
    chunkIndex: integer("chunk_index").notNull(),
    replicateStart: integer("replicate_start").notNull(),
    count: integer("count").notNull(),
    events: integer("events").notNull(),
    /** Float64 [species][grid] sums and sums of squares. */
    gridSum: blob("grid_sum", { mode: "buffer" }),
    gridSumSq: blob("grid_sum_sq", { mode: "buffer" }),
    /** Float64 [grid]: replicates with a valid value per grid point (a capped replicate stops early). */
    gridCount: blob("grid_count", { mode: "buffer" }),
    seconds: real("seconds").notNull(),
  },
  (t) => [primaryKey({ columns: [t.runId, t.chunkIndex] })],
);

export const replicateStats = sqliteTable(
  "replicate_stats",
  {
    runId: text("run_id")
      .notNull()
      .references(() => runs.id, { onDelete: "cascade" }),
    replicate: integer("replicate").notNull(),
    events: integer("events").notNull(),
    capped: integer("capped", { mode: "boolean" }).notNull(),
    /** Output mean and variance over the steady-state part of the grid, for CV and Fano. */
    outputMean: real("output_mean"),
    outputVar: real("output_var"),
    /** Cell-to-cell parameter factors drawn for this replicate, JSON {ref: factor}. */
    factors: text("factors", { mode: "json" }),
  },
  (t) => [primaryKey({ columns: [t.runId, t.replicate] })],
);

export const pulseStats = sqliteTable(
  "pulse_stats",
  {
    runId: text("run_id")
      .notNull()
      .references(() => runs.id, { onDelete: "cascade" }),
    replicate: integer("replicate").notNull(),
    pulseIndex: integer("pulse_index").notNull(),
    on: real("on").notNull(),
    off: real("off").notNull(),
    durationBin: real("duration_bin").notNull(),
    excluded: integer("excluded", { mode: "boolean" }).notNull(),
    passed: integer("passed", { mode: "boolean" }).notNull(),
    delay: real("delay"),
    offDelay: real("off_delay"),
    /** First output pulse width, and all of them as JSON. */
    width: real("width"),
    widths: text("widths", { mode: "json" }),
    peak: real("peak").notNull(),
    timeToPeak: real("time_to_peak").notNull(),
    fwhm: real("fwhm"),
    baseline: real("baseline").notNull(),
  },
  (t) => [
    primaryKey({ columns: [t.runId, t.replicate, t.pulseIndex] }),
    index("pulse_stats_duration_idx").on(t.runId, t.durationBin),
  ],
);

/**
 * A stored chunk's pulse statistics as one BLOB of typed-array columns
 * (encoding in server/compute/pulse-store.ts, the only code that reads or
 * writes it), written in the chunk's transaction. Runs stored before this table
 * keep their pulse_stats rows; a run has its pulses in one of the two, never both.
 */
export const pulseChunks = sqliteTable(
  "pulse_chunks",
  {
    runId: text("run_id")
      .notNull()
      .references(() => runs.id, { onDelete: "cascade" }),
    chunkIndex: integer("chunk_index").notNull(),
    /** First replicate of the chunk: chunks read in this order give (replicate, pulse) order. */
    replicateStart: integer("replicate_start").notNull(),
    pulseCount: integer("pulse_count").notNull(),
    data: blob("data", { mode: "buffer" }).notNull(),
  },
  (t) => [primaryKey({ columns: [t.runId, t.chunkIndex] })],
);

/** Grid series per species: mean, sd, ode (mean-field overlay), and the input signal. Float64 BLOB. */
export const runSeries = sqliteTable(
  "run_series",
  {
    runId: text("run_id")
      .notNull()
      .references(() => runs.id, { onDelete: "cascade" }),
    species: text("species").notNull(),
    kind: text("kind", { enum: ["mean", "sd", "ode"] }).notNull(),
    values: blob("values", { mode: "buffer" }).notNull(),
  },
  (t) => [primaryKey({ columns: [t.runId, t.species, t.kind] })],
);

/** Grid trajectories of the first replicates (for plotting). Float64 BLOB. */
export const runTrajectories = sqliteTable(
  "run_trajectories",
  {
    runId: text("run_id")
      .notNull()
      .references(() => runs.id, { onDelete: "cascade" }),
    replicate: integer("replicate").notNull(),
    species: text("species").notNull(),
    values: blob("values", { mode: "buffer" }).notNull(),
  },
  (t) => [primaryKey({ columns: [t.runId, t.replicate, t.species] })],
);

export const sweeps = sqliteTable("sweeps", {
  id: text("id").primaryKey(),
  labId: text("lab_id")
    .notNull()
    .references(() => labs.id, { onDelete: "cascade" }),
  name: text("name").notNull(),
  /** The base RunSpec; each point overrides the swept parameters and derives its seed. */
  baseSpec: text("base_spec", { mode: "json" }).notNull(),
  /** One or two axes: {parameter, values[]}. */
  axes: text("axes", { mode: "json" }).notNull(),
  status: text("status", { enum: RUN_STATUSES }).notNull(),
  statusReason: text("status_reason"),
  pointCount: integer("point_count").notNull(),
  /** Points added by boundary refinement: [{index, values}], index from the grid's point count on. */
  refinedPoints: text("refined_points", { mode: "json" }),
  createdBy: text("created_by"),
  createdAt: createdAt(),
  finishedAt: integer("finished_at", { mode: "timestamp_ms" }),
  archivedAt: integer("archived_at", { mode: "timestamp_ms" }),
  deletedAt: integer("deleted_at", { mode: "timestamp_ms" }),
});

// ---------------------------------------------------------------- deterministic regime maps
/** A mean-field-only behaviour map (docs/regimes.md): computed at request time, no stochastic simulation. */
export const regimeMaps = sqliteTable("regime_maps", {
  id: text("id").primaryKey(),
  labId: text("lab_id")
    .notNull()
    .references(() => labs.id, { onDelete: "cascade" }),
  name: text("name").notNull(),
  /** The base RunSpec (circuit, system size, threshold); each point overrides the mapped parameters. */
  baseSpec: text("base_spec", { mode: "json" }).notNull(),
  /** One or two axes: {parameter, values[]}. */
  axes: text("axes", { mode: "json" }).notNull(),
  /** [{index, values, refined, verdict}] in index order; grid points first, then refined ones. */
  points: text("points", { mode: "json" }).notNull(),
  computeSeconds: real("compute_seconds").notNull().default(0),
  createdBy: text("created_by"),
  createdAt: createdAt(),
  /** Soft delete: hidden from every route but restore for the undo period, then purged. */
  deletedAt: integer("deleted_at", { mode: "timestamp_ms" }),
});

// ---------------------------------------------------------------- traces
export const traceSets = sqliteTable(
  "trace_sets",
  {
    id: text("id").primaryKey(),
    labId: text("lab_id")
      .notNull()
      .references(() => labs.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    /** Synthetic sets are labelled as such everywhere they appear. */
    synthetic: integer("synthetic", { mode: "boolean" }).notNull().default(false),
    fileName: text("file_name"),
    layout: text("layout", { enum: ["long", "wide"] }).notNull(),
    timeUnit: text("time_unit", { enum: ["s", "min", "h"] }).notNull(),
    /** The input schedule as pulses in minutes, JSON. */
    schedule: text("schedule", { mode: "json" }).notNull(),
    /** Preprocessing: background, scale, smoothing, threshold settings. JSON. */
    settings: text("settings", { mode: "json" }).notNull(),
    cellCount: integer("cell_count").notNull(),
    uploadedBy: text("uploaded_by"),
    createdAt: createdAt(),
    deletedAt: integer("deleted_at", { mode: "timestamp_ms" }),
    demoKey: text("demo_key"),
  },
  (t) => [index("trace_sets_lab_idx").on(t.labId), uniqueIndex("trace_sets_demo_key_idx").on(t.labId, t.demoKey)],
);

export const traceCells = sqliteTable(
  "trace_cells",
  {
    traceSetId: text("trace_set_id")
      .notNull()
      .references(() => traceSets.id, { onDelete: "cascade" }),
    cell: text("cell").notNull(),
    /** Minutes, Float64 BLOB; missing frames are simply absent. */
    times: blob("times", { mode: "buffer" }).notNull(),
    values: blob("values", { mode: "buffer" }).notNull(),
  },
  (t) => [primaryKey({ columns: [t.traceSetId, t.cell] })],
);

export const matches = sqliteTable("matches", {
  id: text("id").primaryKey(),
  labId: text("lab_id")
    .notNull()
    .references(() => labs.id, { onDelete: "cascade" }),
  traceSetId: text("trace_set_id")
    .notNull()
    .references(() => traceSets.id, { onDelete: "cascade" }),
  runId: text("run_id"),
  sweepId: text("sweep_id"),
  tolerance: real("tolerance").notNull(),
  result: text("result", { mode: "json" }).notNull(),
  createdBy: text("created_by"),
  createdAt: createdAt(),
});
