/**
 * Finalisation fairness: runs wait for the single finalising thread
 * round-robin across labs, so a backlog of slow finalisations in lab A (ODE
 * overlays of a fast repressor ring) does not hold lab B's tiny run behind all
 * of it. Ordering is asserted, not wall-clock time.
 */
import { test } from "node:test";
import assert from "node:assert/strict";
import { makeTestContext } from "@/tests/helpers/test-app";
import { createRunQueue } from "@/server/compute/run-queue";
import { createSimPool } from "@/server/compute/pool";
import { createLab } from "@/server/services/labs.service";
import { insertRun } from "@/server/services/runs.service";
import { RunSpecSchema } from "@/shared/schemas/run-spec";
import { templates } from "@/sim";
import { ringCircuit } from "@/tests/helpers/stiff-circuits";

test("lab B's run is finalised before the last of lab A's queued slow finalisations (first-come-first-served would put it last)", async () => {
  const started: string[] = [];
  const t = await makeTestContext({
    queue: (ctx) =>
      createRunQueue({
        db: ctx.db,
        sqlite: ctx.sqlite,
        pool: createSimPool({ threads: 1 }),
        chunkWallMs: 600_000,
        onFinaliseStart: (runId) => started.push(runId),
        log: () => {},
      }),
  });
  try {
    const labA = t.demoLab!;
    const labB = createLab(t.ctx, labA.ownerId, "Second lab").id;
    // slow to finalise (mean-field overlay of a fast ring), quick to simulate (one replicate at system size 0.1)
    // the ring runs while S is on (makeP scaled by S): it settles at once with S off, oscillates with S on
    const drivenRing = {
      ...ringCircuit,
      reactions: ringCircuit.reactions.map((r) => (r.name === "makeP" ? { ...r, scaledBy: "S" } : r)),
    };
    const slow = RunSpecSchema.parse({
      circuit: drivenRing,
      systemSize: 0.1,
      program: { kind: "pulses", pulses: [{ start: 0, duration: 1e6 }] },
      inputSignal: "S",
      endTimeMinutes: 100,
      gridStepMinutes: 10,
      replicates: 1,
      seed: "fair-a",
      threshold: { value: 5, windowMinutes: 1 },
    });
    const tpl = templates.simple;
    const tiny = RunSpecSchema.parse({
      circuit: tpl.circuit,
      inputSignal: tpl.inputSignal,
      program: { kind: "pulses", pulses: [{ start: 5, duration: 10 }] },
      endTimeMinutes: 30,
      gridStepMinutes: 1,
      replicates: 1,
      seed: "fair-b",
      threshold: { value: 5, windowMinutes: 10 },
    });
    const a = [1, 2, 3].map((i) =>
      insertRun(t.ctx, {
        labId: labA.id,
        name: `slow ${i}`,
        spec: { ...slow, seed: `fair-a${i}` },
        userId: labA.ownerId,
      }),
    );
    const b = insertRun(t.ctx, { labId: labB, name: "tiny", spec: tiny, userId: labA.ownerId });
    t.ctx.queue.kick();
    await t.ctx.queue.idle();
    assert.equal(started.length, 4, `finalisations started: ${started.join(", ")}`);
    assert.equal(started[0], a[0], "the first slow run's chunk lands first and takes the idle thread");
    assert.ok(
      started.indexOf(b) < started.indexOf(a[2]),
      `order ${started.map((id) => (id === b ? "B" : `A${a.indexOf(id) + 1}`)).join(", ")}`,
    );
  } finally {
    await t.close();
  }
});
