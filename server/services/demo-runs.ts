/**
 * Demo runs: "Tank sensor, hold" and "Tank sensor, direct" on "Duration
 * ladder", queued in the background on first start (idempotent by demo key),
 * so a new user finds finished runs to look at and compare. Importing this
 * module registers the seeder (after the circuits and programs seeder).
 */
import { and, eq } from "drizzle-orm";
import type { AppContext } from "../context";
import { schema } from "../../db/client";
import { registerDemoSeeder } from "./demo-seed";
import { DEMO_CIRCUIT_KEYS, DEMO_PROGRAM_KEYS, demoCircuitId, demoProgramId } from "./demo-circuits";
import { buildSpec, insertRun, resolveInputs } from "./runs.service";

export const DEMO_RUNS = [
  { demoKey: "run-tank-hold-ladder", name: "Tank sensor, hold on Duration ladder", circuit: DEMO_CIRCUIT_KEYS.hold },
  { demoKey: "run-tank-direct-ladder", name: "Tank sensor, direct on Duration ladder", circuit: DEMO_CIRCUIT_KEYS.direct },
] as const;

const DEMO_SETTINGS = { endTimeMinutes: 1100, gridStepMinutes: 1, replicates: 500, seed: "tank-demo-2026" };

export function seedDemoRuns(ctx: AppContext, lab: { id: string; ownerId: string }) {
  const programId = demoProgramId(ctx, lab.id, DEMO_PROGRAM_KEYS.durationLadder);
  if (!programId) return;
  let queued = false;
  for (const d of DEMO_RUNS) {
    const exists = ctx.db.select({ id: schema.runs.id }).from(schema.runs).where(and(eq(schema.runs.labId, lab.id), eq(schema.runs.demoKey, d.demoKey))).get();
    if (exists) continue;
    const circuitId = demoCircuitId(ctx, lab.id, d.circuit);
    if (!circuitId) continue;
    const inputs = resolveInputs(ctx, lab.id, { circuitId, programId });
    const spec = buildSpec(inputs, { ...DEMO_SETTINGS, systemSize: 1, start: "given", burnInMinutes: 500, threshold: { hysteresis: 0.2, noiseDurationMinutes: 10 }, extrinsic: [], eventCapPerReplicate: 10_000_000, recordEventsFor: 0, method: "direct" });
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

registerDemoSeeder("demo-runs", seedDemoRuns);
