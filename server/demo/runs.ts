/**
 * Demo runs: "Tank sensor, hold" and "Tank sensor, direct" on "Duration
 * ladder", queued in the background on first start (idempotent by demo key),
 * so a new user finds finished runs to look at and compare; and a small demo
 * sweep of the hold factor's half-max on the reporter, with the threshold and
 * window of the synthetic demo traces, so the trace matching has something to
 * match against. Importing this module registers the seeders (after the
 * circuits and programs seeder).
 */
import { and, eq } from "drizzle-orm";
import type { AppContext } from "@/server/context";
import { schema } from "@/db/client";
import { registerDemoSeeder } from "./seed";
import { DEMO_CIRCUIT_KEYS, DEMO_PROGRAM_KEYS, demoCircuitId, demoProgramId } from "./circuits";
import { buildSpec, checkThresholdNow, insertRun, resolveInputs } from "@/server/services/runs.service";
import { launchSweep } from "@/server/services/sweeps.service";
import { DEMO_THRESHOLD_MOLECULES } from "./traces";

export const DEMO_RUNS = [
  { demoKey: "run-tank-hold-ladder", name: "Tank sensor, hold on Duration ladder", circuit: DEMO_CIRCUIT_KEYS.hold },
  {
    demoKey: "run-tank-direct-ladder",
    name: "Tank sensor, direct on Duration ladder",
    circuit: DEMO_CIRCUIT_KEYS.direct,
  },
] as const;

const DEMO_SETTINGS = { endTimeMinutes: 1100, gridStepMinutes: 1, replicates: 500, seed: "tank-demo-2026" };

export function seedDemoRuns(ctx: AppContext, lab: { id: string; ownerId: string }) {
  const programId = demoProgramId(ctx, lab.id, DEMO_PROGRAM_KEYS.durationLadder);
  if (!programId) return;
  let queued = false;
  for (const d of DEMO_RUNS) {
    const exists = ctx.db
      .select({ id: schema.runs.id })
      .from(schema.runs)
      .where(and(eq(schema.runs.labId, lab.id), eq(schema.runs.demoKey, d.demoKey)))
      .get();
    if (exists) continue;
    const circuitId = demoCircuitId(ctx, lab.id, d.circuit);
    if (!circuitId) continue;
    const inputs = resolveInputs(ctx, lab.id, { circuitId, programId });
    // The synthetic demo traces' threshold and window, so matching them against these runs compares like with like.
    const threshold = { value: DEMO_THRESHOLD_MOLECULES, windowMinutes: 30, hysteresis: 0.2, noiseDurationMinutes: 10 };
    const spec = buildSpec(inputs, {
      ...DEMO_SETTINGS,
      systemSize: 1,
      start: "given",
      burnInMinutes: 500,
      threshold,
      extrinsic: [],
      eventCapPerReplicate: 10_000_000,
      recordEventsFor: 0,
      method: "direct",
    });
    checkThresholdNow(spec);
    insertRun(ctx, {
      labId: lab.id,
      name: d.name,
      notes: "Demo run (invented fermentation-tank scenario), computed in the background at first start.",
      spec,
      inputs,
      userId: lab.ownerId,
      demoKey: d.demoKey,
    });
    queued = true;
  }
  if (queued) ctx.queue.kick();
}

export const DEMO_SWEEP_NAME = "Hold strength scan (demo)";

/** The demo sweep: K(makeZ,hldB) of "Tank sensor, hold" over 40-400 molecules (log grid, 9 points). Keyed by name (sweeps have no demo key column). */
export async function seedDemoSweep(ctx: AppContext, lab: { id: string; ownerId: string }) {
  const exists = ctx.db
    .select({ id: schema.sweeps.id })
    .from(schema.sweeps)
    .where(and(eq(schema.sweeps.labId, lab.id), eq(schema.sweeps.name, DEMO_SWEEP_NAME)))
    .get();
  if (exists) return;
  const circuitId = demoCircuitId(ctx, lab.id, DEMO_CIRCUIT_KEYS.hold);
  const programId = demoProgramId(ctx, lab.id, DEMO_PROGRAM_KEYS.durationLadder);
  if (!circuitId || !programId) return;
  await launchSweep(ctx, lab.id, lab.ownerId, {
    name: DEMO_SWEEP_NAME,
    base: {
      circuitId,
      programId,
      settings: {
        ...DEMO_SETTINGS,
        replicates: 200,
        seed: "tank-demo-sweep",
        systemSize: 1,
        start: "given",
        burnInMinutes: 500,
        threshold: { value: DEMO_THRESHOLD_MOLECULES, windowMinutes: 30, hysteresis: 0.2, noiseDurationMinutes: 10 },
        extrinsic: [{ parameter: "rate(makeZ)", cv: 0.25 }],
        eventCapPerReplicate: 10_000_000,
        recordEventsFor: 0,
        method: "direct",
      },
    },
    axes: [{ parameter: "K(makeZ,hldB)", grid: { from: 40, to: 400, count: 9, scale: "log" } }],
  });
}

registerDemoSeeder("demo-runs", seedDemoRuns);
registerDemoSeeder("demo-sweep", seedDemoSweep);
