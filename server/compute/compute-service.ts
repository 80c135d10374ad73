/**
 * Request-time computations off the event loop: a piscina thread running
 * ./compute-worker.ts behind a per-lab round-robin queue (./fair-queue.ts), so
 * a viewer looping stiff estimates delays neither /api/health nor another
 * lab's request by more than the task in hand. Each task has a budget for the
 * whole call (LINGER_COMPUTE_WALL_SECONDS of computing, a fixed number of ODE
 * steps); past it the answer is a 422 naming the fastest reaction. One lab may
 * have a few tasks waiting; more answer 429.
 *
 * The thread is shared by every app of the process (tests build many) and is
 * started on first use; idle, it does not keep the process alive.
 */
import path from "node:path";
import { Piscina } from "piscina";
import type { RunSpec } from "@/shared/schemas/run-spec";
import type { RunSummary } from "@/shared/schemas/analysis";
import type { RegimeVerdict } from "@/sim/regimes";
import { HttpError, tooMany } from "@/server/http-error";
import type { ComputeAnswer, ComputeJob, ComputeTask } from "./compute-worker";
import { createFairQueue, type FairQueue } from "./fair-queue";

/** ODE steps one request may take (all of its solves together). */
export const COMPUTE_MAX_STEPS = 2_000_000;
/** Points of a regime map per compute task: each part is one turn of the per-lab queue, under its own budget. */
export const REGIME_MAP_POINTS_PER_TASK = 20;
/** Tasks one lab may have waiting for the compute thread. */
export const COMPUTE_MAX_WAITING_PER_LAB = 8;

export interface ComputeService {
  /** Resolves every spec's threshold (400 when one cannot be set, 422 past the budget). */
  checkThresholds(labId: string, specs: RunSpec[]): Promise<void>;
  estimateEvents(labId: string, spec: RunSpec): Promise<number>;
  matchedControl(labId: string, spec: RunSpec): Promise<RunSpec>;
  acceleration(
    labId: string,
    job: { circuitSpec: RunSpec; circuitSummary: RunSummary; controlSpec: RunSpec; controlSummary: RunSummary },
  ): Promise<unknown>;
  /** Mean-field label of each spec, in parts of REGIME_MAP_POINTS_PER_TASK points (422 when a part runs out of budget). */
  regimeMap(labId: string, specs: RunSpec[]): Promise<RegimeVerdict[]>;
  /** Observes task starts (tests: order of service). */
  onStart?: (labId: string, job: ComputeJob) => void;
}

let shared: Piscina | null = null;

function sharedPool(): Piscina {
  shared ??= new Piscina({
    filename: path.resolve(__dirname, "compute-worker.ts"),
    execArgv: ["--import", "tsx"],
    minThreads: 0,
    maxThreads: 1,
    idleTimeout: 10 * 60_000,
  });
  return shared;
}

/** Stops the shared thread (server shutdown). */
export async function closeComputePool(): Promise<void> {
  const p = shared;
  shared = null;
  if (p) await p.destroy();
}

export function createComputeService(opts: { wallSeconds: number; maxSteps?: number }): ComputeService {
  const service: ComputeService = {} as ComputeService;
  const queue: FairQueue<ComputeJob, ComputeAnswer> = createFairQueue(
    (job) =>
      sharedPool().run({
        job,
        wallMs: opts.wallSeconds * 1000,
        maxSteps: opts.maxSteps ?? COMPUTE_MAX_STEPS,
      } satisfies ComputeTask),
    { concurrency: 1, onStart: (key, job) => service.onStart?.(key, job) },
  );
  async function run(labId: string, job: ComputeJob): Promise<unknown> {
    if (queue.waiting(labId) >= COMPUTE_MAX_WAITING_PER_LAB)
      throw tooMany(
        `This lab already has ${COMPUTE_MAX_WAITING_PER_LAB} computations waiting (estimates, launches); wait for them to finish.`,
      );
    const a = await queue.submit(labId, job);
    if (a.ok) return a.value;
    throw new HttpError(
      a.status,
      a.code,
      a.message,
      a.path
        ? [{ path: a.path, message: a.message }]
        : a.status === 422
          ? [{ path: "circuit", message: a.message }]
          : undefined,
    );
  }
  Object.assign(service, {
    async checkThresholds(labId: string, specs: RunSpec[]) {
      await run(labId, { kind: "threshold", specs });
    },
    estimateEvents: async (labId: string, spec: RunSpec) => (await run(labId, { kind: "estimate", spec })) as number,
    matchedControl: async (labId: string, spec: RunSpec) => (await run(labId, { kind: "control", spec })) as RunSpec,
    async regimeMap(labId: string, specs: RunSpec[]) {
      const out: RegimeVerdict[] = [];
      for (let i = 0; i < specs.length; i += REGIME_MAP_POINTS_PER_TASK) {
        const part = specs.slice(i, i + REGIME_MAP_POINTS_PER_TASK);
        out.push(...((await run(labId, { kind: "regimeMap", specs: part })) as RegimeVerdict[]));
      }
      return out;
    },
    acceleration: (labId: string, job: Omit<Extract<ComputeJob, { kind: "acceleration" }>, "kind">) =>
      run(labId, { kind: "acceleration", ...job }),
  });
  return service;
}
