/**
 * Helpers for tests that compute real runs: the real piscina pool and run
 * queue, small specs built from the engine's templates, and waiting for a run.
 */
import assert from "node:assert/strict";
import type { Agent } from "supertest";
import type { AppContext } from "@/server/context";
import { createRunQueue, type RunQueue } from "@/server/compute/run-queue";
import { createSimPool } from "@/server/compute/pool";
import { createRedisDispatcher } from "@/server/compute/redis-dispatch";
import { onRunEnded } from "@/server/compute/run-events";
import { templates } from "@/sim";
import type { InputProgramInput } from "@/shared/schemas/input-program";
import { RunSpecSchema, type RunSpec } from "@/shared/schemas/run-spec";

/** A queue factory for makeTestContext({ queue }) with a real worker pool. */
export function realQueue(threads = 1, opts: { chunkWallMs?: number } = {}) {
  return (ctx: AppContext): RunQueue =>
    createRunQueue({
      db: ctx.db,
      sqlite: ctx.sqlite,
      pool: createSimPool({ threads }),
      chunkWallMs: opts.chunkWallMs ?? 600_000,
      onRunEnded: (id, status) => onRunEnded(ctx, id, status),
      log: () => {},
    });
}

/** A queue factory whose chunks go through Redis to worker processes (distributed mode), checking Redis often. */
export function redisQueue(url: string, opts: { window?: number; log?: (m: string) => void } = {}) {
  return (ctx: AppContext): RunQueue =>
    createRunQueue({
      db: ctx.db,
      sqlite: ctx.sqlite,
      dispatcher: createRedisDispatcher({
        url,
        window: opts.window,
        reconcileMs: 300,
        statsMs: 200,
        log: opts.log ?? (() => {}),
      }),
      chunkWallMs: 600_000,
      onRunEnded: (id, status) => onRunEnded(ctx, id, status),
      log: opts.log ?? (() => {}),
    });
}

/** A short duration ladder: 5 and 60 min pulses, recovery gaps of 150 min. */
export const shortLadder: InputProgramInput = { kind: "ladder", start: 20, durations: [5, 60], repeats: 1, gap: 150 };

/** A stored-run spec for chunk tests: the coherent AND template on the short ladder, 450 min, 1 min grid. */
export function shortLadderSpec(replicates: number, seed: string): RunSpec {
  const t = templates["c1ffl-and"];
  return RunSpecSchema.parse({
    circuit: t.circuit,
    program: shortLadder,
    inputSignal: t.inputSignal,
    endTimeMinutes: 450,
    gridStepMinutes: 1,
    replicates,
    seed,
  });
}

export function launchBody(
  opts: {
    template?: keyof typeof templates;
    replicates?: number;
    seed?: string;
    endTimeMinutes?: number;
    name?: string;
  } = {},
) {
  const t = templates[opts.template ?? "c1ffl-and"];
  return {
    name: opts.name ?? `test run ${opts.template ?? "c1ffl-and"}`,
    circuit: t.circuit,
    program: shortLadder,
    inputSignal: t.inputSignal,
    settings: {
      endTimeMinutes: opts.endTimeMinutes ?? 450,
      gridStepMinutes: 1,
      replicates: opts.replicates ?? 200,
      seed: opts.seed ?? "test-seed-1",
    },
  };
}

/** A sweep's base: launchBody's circuit, program, input signal and settings (no name). */
export function sweepBase(opts: Parameters<typeof launchBody>[0] = {}) {
  const { circuit, program, inputSignal, settings } = launchBody(opts);
  return { circuit, program, inputSignal, settings };
}

export async function waitForRun(agent: Agent, id: string, timeoutMs = 120_000): Promise<any> {
  const t0 = Date.now();
  for (;;) {
    const r = await agent.get(`/api/runs/${id}`);
    assert.equal(r.status, 200, JSON.stringify(r.body));
    if (!["queued", "running"].includes(r.body.status)) return r.body;
    if (Date.now() - t0 > timeoutMs) throw new Error(`run ${id} still ${r.body.status} after ${timeoutMs} ms`);
    await new Promise((res) => setTimeout(res, 100));
  }
}
