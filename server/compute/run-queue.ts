/**
 * The run queue: runs are split into chunks of replicates (boundaries fixed by
 * the spec, never by the pool), chunks are dispatched to the piscina pool
 * round-robin across runs (a sweep counts as one participant, its points in
 * order), results are written to SQLite one chunk per transaction, and a run is
 * finalised (grid mean/SD reduced in chunk order, ODE overlay, summary, hash)
 * when its last chunk lands. Runs found "running" at start resume from their
 * stored chunks; the result equals an uninterrupted run with the same seed.
 * Finalisations wait for the finalising thread round-robin across labs
 * (./fair-queue.ts), so one lab's backlog of slow finalisations (say stiff ODE
 * overlays) does not hold another lab's run behind all of it.
 */
import { EventEmitter } from "node:events";
import { and, eq, inArray, isNull } from "drizzle-orm";
import type Database from "better-sqlite3";
import type { Db } from "@/db/client";
import { schema } from "@/db/client";
import type { RunSpec } from "@/shared/schemas/run-spec";
import { ENDED_RUN_STATUSES } from "@/shared/schemas/api-runs";
import { resolve } from "node:path";
import { Piscina } from "piscina";
import { chunkLayout, gridTimes } from "@/sim";
import type { SimPool } from "@/server/compute/pool";
import { createInProcessDispatcher, type ChunkDispatcher, type DispatchStats } from "@/server/compute/dispatch";
import { newFeedState, pickNextChunk } from "@/server/compute/feed-window";
import type { DropTask, FinaliseResult, FinaliseTask, IngestTask, PrepareTask } from "@/server/compute/finalise-worker";
import { packPulseStats } from "@/sim/engine/pulse-columns";
import { createChunkWriter, readChunks, speciesNames } from "./run-store";
import { recordAudit } from "@/server/services/audit.service";
import { createFairQueue } from "./fair-queue";
import { storeFinalised } from "./store-finalised";

export interface RunQueueStats {
  queuedRuns: number;
  runningRuns: number;
  busyThreads: number;
  /** Where chunks run (embedded pool or Redis workers), window, queue depth, rate, workers. */
  dispatch: DispatchStats;
}

export interface RunProgress {
  runId: string;
  status: string;
  replicatesDone: number;
  replicates: number;
  eventsPerSecond: number | null;
  secondsLeft: number | null;
}

export interface RunQueue {
  stats(): RunQueueStats;
  /** Look for queued or interrupted runs in the database and start them. */
  kick(): void;
  cancel(runId: string): boolean;
  progress(runId: string): RunProgress | null;
  /** Emits "progress" (RunProgress) and "ended" ({runId, status}). */
  events: EventEmitter;
  /** Resolves when nothing is queued or running (tests, benchmarks). */
  idle(): Promise<void>;
  close(): Promise<void>;
}

interface ActiveRun {
  id: string;
  labId: string;
  group: string;
  order: number;
  spec: RunSpec;
  species: string[];
  gridLength: number;
  chunks: { index: number; replicateStart: number; count: number }[];
  pending: number[];
  inFlight: number;
  done: number;
  replicates: number;
  replicatesDone: number;
  sessionReplicates: number;
  sessionEvents: number;
  sessionStart: number;
  stopped: boolean;
  /** Chunks are reduced ahead in the finalising thread (not for a resumed run: it reads its rows back). */
  ingesting: boolean;
  /** The finalising thread was asked to prepare the run's finalisation (with its first chunk). */
  prepareSent: boolean;
}

export interface RunQueueOptions {
  db: Db;
  sqlite: Database.Database;
  /** The in-process pool (embedded mode); ignored when a dispatcher is given. */
  pool?: SimPool;
  /** Where chunks are computed; default: the in-process dispatcher over `pool`. */
  dispatcher?: ChunkDispatcher;
  /** The database file (the finalising worker opens it read-only); default: the open connection's file. */
  dbPath?: string;
  /** Wall-time cap per chunk, ms (enforced in the worker). */
  chunkWallMs?: number;
  /** Called after a run reaches an end state (finished, capped, failed). */
  onRunEnded?: (runId: string, status: string) => void | Promise<void>;
  /** Called when a run's finalisation starts in the finalising thread (tests: order of service). */
  onFinaliseStart?: (runId: string, labId: string) => void;
  log?: (msg: string) => void;
}

const END_STATES: ReadonlySet<string> = new Set(ENDED_RUN_STATUSES);

export function createIdleQueue(): RunQueue {
  return {
    stats: () => ({
      queuedRuns: 0,
      runningRuns: 0,
      busyThreads: 0,
      dispatch: {
        mode: "embedded",
        redis: null,
        window: 0,
        inFlight: 0,
        queueDepth: 0,
        chunksPerSecond: 0,
        workers: [],
      },
    }),
    kick: () => {},
    cancel: () => false,
    progress: () => null,
    events: new EventEmitter(),
    idle: async () => {},
    close: async () => {},
  };
}

export function createRunQueue(opts: RunQueueOptions): RunQueue {
  const { db, sqlite } = opts;
  if (!opts.dispatcher && !opts.pool) throw new Error("createRunQueue needs a pool or a dispatcher");
  const dispatcher = opts.dispatcher ?? createInProcessDispatcher(opts.pool!);
  const log = opts.log ?? ((m: string) => console.log(`[queue] ${m}`));
  const writer = createChunkWriter(sqlite);
  const dbPath = opts.dbPath ?? sqlite.name;
  const finaliser = new Piscina({
    filename: resolve(__dirname, "finalise-worker.ts"),
    execArgv: ["--import", "tsx"],
    // kept warm: a cold thread (loading tsx) would delay small runs' results by a second
    minThreads: 1,
    maxThreads: 1,
  });
  const finaliseQueue = createFairQueue(
    (run: ActiveRun) =>
      finaliser.run({ kind: "finalise", dbPath, runId: run.id } satisfies FinaliseTask) as Promise<FinaliseResult>,
    { concurrency: 1, onStart: (labId, run) => opts.onFinaliseStart?.(run.id, labId) },
  );
  const events = new EventEmitter();
  events.setMaxListeners(0);
  const active = new Map<string, ActiveRun>();
  let inFlight = 0;
  let closed = false;
  const feedState = newFeedState();
  let orderCounter = 0;
  let idleWaiters: (() => void)[] = [];
  const finalising = new Set<string>();
  /** End notifications under way (awaited by close so mail is not cut off). */
  const notifying = new Set<Promise<unknown>>();
  const notify = (runId: string, status: string) => {
    if (!opts.onRunEnded) return;
    const p = Promise.resolve()
      .then(() => opts.onRunEnded!(runId, status))
      .catch((e) => log(`run ${runId}: end notification failed: ${(e as Error).message}`))
      .finally(() => notifying.delete(p));
    notifying.add(p);
  };

  const capacity = () => Math.max(1, dispatcher.capacity());
  dispatcher.onWake(() => pump());

  function checkIdle() {
    if (active.size === 0 && inFlight === 0 && finalising.size === 0) {
      const w = idleWaiters;
      idleWaiters = [];
      w.forEach((f) => f());
    }
  }

  function activate(row: typeof schema.runs.$inferSelect) {
    if (active.has(row.id)) return;
    const spec = row.spec as RunSpec;
    let layout;
    try {
      layout = chunkLayout(spec);
    } catch (e) {
      markFailed(row.id, `The run cannot start: ${(e as Error).message}`);
      return;
    }
    if (layout.chunkSize !== row.chunkSize) {
      markFailed(
        row.id,
        `The stored chunk size (${row.chunkSize}) differs from this engine's (${layout.chunkSize}); the run cannot resume identically.`,
      );
      return;
    }
    const stored = new Set(readChunks(db, row.id).map((c) => c.chunkIndex));
    const pending = layout.chunks.filter((c) => !stored.has(c.index)).map((c) => c.index);
    const run: ActiveRun = {
      id: row.id,
      labId: row.labId,
      group: row.sweepId ?? row.id,
      order: (row.sweepPoint ?? 0) + orderCounter++ * 1e-9,
      spec,
      species: speciesNames(spec),
      gridLength: gridTimes(spec).length,
      chunks: layout.chunks,
      pending,
      inFlight: 0,
      done: stored.size,
      replicates: row.replicates,
      replicatesDone: layout.chunks.filter((c) => stored.has(c.index)).reduce((s, c) => s + c.count, 0),
      sessionReplicates: 0,
      sessionEvents: 0,
      sessionStart: Date.now(),
      stopped: false,
      ingesting: stored.size === 0,
      prepareSent: false,
    };
    active.set(row.id, run);
    // Found "running" but not active here: the server stopped during the run. Keep that in the run's history,
    // which outlives the status reason (cleared when the run finishes).
    if (row.status === "running")
      recordAudit(
        { db },
        {
          labId: row.labId,
          userId: null,
          action: "run.resumed",
          targetType: "run",
          targetId: row.id,
          detail: { chunksStored: stored.size, chunks: layout.chunks.length },
        },
      );
    db.update(schema.runs)
      .set({
        status: "running",
        startedAt: row.startedAt ?? new Date(),
        statusReason: stored.size ? `resumed with ${stored.size} of ${layout.chunks.length} chunks stored` : null,
      })
      .where(eq(schema.runs.id, row.id))
      .run();
    if (pending.length === 0) void finalise(run);
  }

  function kick() {
    if (closed) return;
    const rows = db
      .select()
      .from(schema.runs)
      .where(and(inArray(schema.runs.status, ["queued", "running"]), isNull(schema.runs.deletedAt)))
      .orderBy(schema.runs.createdAt)
      .all();
    for (const row of rows) activate(row);
    pump();
    checkIdle();
  }

  /** The next chunk to run: the feeding rule in ./feed-window.ts (labs by fewest chunks out, then round-robin). */
  function nextChunk(): { run: ActiveRun; chunkIndex: number } | null {
    return pickNextChunk(active.values(), feedState);
  }

  function pump() {
    while (!closed && inFlight < capacity()) {
      const next = nextChunk();
      if (!next) break;
      dispatch(next.run, next.chunkIndex);
    }
  }

  function dispatch(run: ActiveRun, chunkIndex: number) {
    const chunk = run.chunks[chunkIndex];
    inFlight++;
    run.inFlight++;
    if (run.ingesting && !run.prepareSent) prepareAhead(run);
    const t0 = performance.now();
    dispatcher
      .run({
        runId: run.id,
        labId: run.labId,
        chunkIndex,
        task: {
          spec: run.spec,
          replicateStart: chunk.replicateStart,
          count: chunk.count,
          options: { trajectoryReplicates: 20 },
          wallTimeLimitMs: opts.chunkWallMs,
        },
      })
      .then(
        (result: any) => {
          inFlight--;
          run.inFlight--;
          pump();
          if (run.stopped || closed) return;
          if (result.aborted) {
            fail(
              run,
              `A chunk of ${chunk.count} replicates ran past the wall-time cap of ${Math.round((opts.chunkWallMs ?? 0) / 1000)} s; lower the replicates or the end time, or raise LINGER_CHUNK_WALL_SECONDS.`,
            );
            return;
          }
          const seconds = result.seconds ?? (performance.now() - t0) / 1000;
          let written: boolean;
          try {
            written = writer.write(run.id, run.species, run.gridLength, {
              chunkIndex,
              replicateStart: chunk.replicateStart,
              count: chunk.count,
              events: result.events,
              seconds,
              gridSum: result.gridSum,
              gridSumSq: result.gridSumSq,
              gridCount: result.gridCount,
              replicates: result.replicates,
              pulses: result.packedPulses ?? result.pulses,
              trajectories: result.trajectories ?? [],
            });
          } catch (e) {
            fail(run, `Storing results failed: ${(e as Error).message}`);
            return;
          }
          // Keyed by (run, chunk index): a chunk that came back twice (a retried worker) is stored and counted once.
          if (!written) log(`run ${run.id}: chunk ${chunkIndex} was already stored; not counted again`);
          else if (run.ingesting) ingest(run, chunkIndex, result);
          run.done++;
          run.replicatesDone += chunk.count;
          run.sessionReplicates += chunk.count;
          run.sessionEvents += result.events;
          events.emit("progress", progressOf(run));
          if (run.done === run.chunks.length) void finalise(run);
        },
        (err: Error) => {
          inFlight--;
          run.inFlight--;
          if (!run.stopped && !closed) fail(run, `The simulation failed: ${err?.message ?? String(err)}`);
          pump();
          checkIdle();
        },
      );
  }

  /**
   * Hands a stored chunk to the finalising thread, which reduces it now (./finalise-worker.ts), so the run's
   * finalisation does not read back every row. Its buffers move there (the rows are already in SQLite). Should
   * this fail, finalisation reads the chunk from SQLite instead: nothing depends on it but speed.
   */
  function ingest(run: ActiveRun, chunkIndex: number, result: any) {
    const pulses = result.packedPulses ?? packPulseStats(result.pulses);
    const task: IngestTask = {
      kind: "ingest",
      runId: run.id,
      chunkIndex,
      chunks: run.chunks.length,
      spec: {
        replicates: run.spec.replicates,
        endTimeMinutes: run.spec.endTimeMinutes,
        gridStepMinutes: run.spec.gridStepMinutes,
      },
      replicates: result.replicates.map((r: IngestTask["replicates"][number]) => ({
        replicate: r.replicate,
        events: r.events,
        capped: r.capped,
        outputMean: r.outputMean,
        outputVar: r.outputVar,
      })),
      pulses,
      gridSum: result.gridSum,
      gridSumSq: result.gridSumSq,
      gridCount: result.gridCount,
    };
    const buffers = new Set<ArrayBuffer>(
      [pulses.numbers, pulses.widths, task.gridSum, task.gridSumSq, task.gridCount].map((a) => a.buffer as ArrayBuffer),
    );
    finaliser
      .run(task, { transferList: [...buffers] })
      .catch((e: Error) =>
        log(`run ${run.id}: chunk ${chunkIndex} not reduced ahead (${e.message}); finalisation reads it back`),
      );
  }

  /**
   * With the run's first chunk: the finalising thread computes the spec's part of the finalisation (threshold,
   * ODE overlay, the behaviour labels' ensembles) while the replicates compute. Speed only: the finalisation
   * does it all itself when this did not happen.
   */
  function prepareAhead(run: ActiveRun) {
    run.prepareSent = true;
    finaliser
      .run({ kind: "prepare", runId: run.id, chunks: run.chunks.length, spec: run.spec } satisfies PrepareTask)
      .catch((e: Error) => log(`run ${run.id}: finalisation not prepared ahead (${e.message})`));
  }

  /** Frees what the finalising thread holds for a run that will not finalise. */
  function dropReduction(runId: string) {
    if (closed) return;
    finaliser.run({ kind: "drop", runId } satisfies DropTask).catch(() => {});
  }

  function markFailed(runId: string, reason: string) {
    db.update(schema.runs)
      .set({ status: "failed", statusReason: reason, finishedAt: new Date() })
      .where(eq(schema.runs.id, runId))
      .run();
    events.emit("ended", { runId, status: "failed" });
    notify(runId, "failed");
  }

  function fail(run: ActiveRun, reason: string) {
    run.stopped = true;
    active.delete(run.id);
    log(`run ${run.id} failed: ${reason}`);
    dropReduction(run.id);
    markFailed(run.id, reason);
    checkIdle();
  }

  async function finalise(run: ActiveRun) {
    if (finalising.has(run.id)) return;
    finalising.add(run.id);
    try {
      // Reduction, ODE, summary and hash run in a worker thread: the event loop only writes the result.
      const r: FinaliseResult = await finaliseQueue.submit(run.labId, run);
      if (r.odeNote) log(`run ${run.id}: no ODE overlay (${r.odeNote})`);
      const spec = run.spec;
      const status = r.capped ? "capped" : "finished";
      const stored = storeFinalised(db, sqlite, run.id, r, spec);
      active.delete(run.id);
      if (!stored) return;
      events.emit("progress", { ...progressOf(run), status });
      events.emit("ended", { runId: run.id, status });
      notify(run.id, status);
    } catch (e) {
      active.delete(run.id);
      if (!closed) markFailed(run.id, `Summarising the run failed: ${(e as Error).message}`);
    } finally {
      finalising.delete(run.id);
      pump();
      checkIdle();
    }
  }

  function progressOf(run: ActiveRun): RunProgress {
    const elapsed = (Date.now() - run.sessionStart) / 1000;
    const rate = run.sessionReplicates > 0 && elapsed > 0 ? run.sessionReplicates / elapsed : null;
    return {
      runId: run.id,
      status: "running",
      replicatesDone: run.replicatesDone,
      replicates: run.replicates,
      eventsPerSecond: run.sessionEvents > 0 && elapsed > 0 ? run.sessionEvents / elapsed : null,
      secondsLeft: rate ? (run.replicates - run.replicatesDone) / rate : null,
    };
  }

  return {
    events,
    stats() {
      let queued = 0;
      let running = 0;
      for (const r of active.values()) {
        if (r.replicatesDone > 0 || r.inFlight > 0) running++;
        else queued++;
      }
      return {
        queuedRuns: queued,
        runningRuns: running,
        busyThreads: Math.min(inFlight, capacity()),
        dispatch: dispatcher.stats(),
      };
    },
    kick,
    cancel(runId) {
      const run = active.get(runId);
      if (run) {
        run.stopped = true;
        active.delete(runId);
        dropReduction(runId);
      }
      const res = db
        .update(schema.runs)
        .set({ status: "cancelled", statusReason: "Cancelled.", finishedAt: new Date() })
        .where(and(eq(schema.runs.id, runId), inArray(schema.runs.status, ["queued", "running"])))
        .run();
      if (res.changes > 0) events.emit("ended", { runId, status: "cancelled" });
      pump();
      checkIdle();
      return res.changes > 0;
    },
    progress(runId) {
      const run = active.get(runId);
      return run ? progressOf(run) : null;
    },
    idle() {
      return new Promise<void>((resolve) => {
        idleWaiters.push(resolve);
        checkIdle();
      });
    },
    async close() {
      closed = true;
      for (const r of active.values()) r.stopped = true;
      active.clear();
      const deadline = Date.now() + 5000;
      while ((finalising.size > 0 || notifying.size > 0) && Date.now() < deadline) {
        await Promise.race([Promise.allSettled([...notifying]), new Promise((r) => setTimeout(r, 50))]);
      }
      await Promise.all([dispatcher.close(), finaliser.destroy()]);
      checkIdle();
    },
  };
}

export { END_STATES };
