/**
 * The synthetic demo trace set "Synthetic tank cells (demo)" (the invented
 * fermentation-tank scenario, for demos only): about 40 cells made by Linger itself from hidden parameters of the
 * "Tank sensor, hold" circuit under the "Duration ladder" program, plus
 * cell-to-cell variation, measurement noise, a background, a fluorescence scale
 * factor, missing frames and staggered starts. Labelled synthetic everywhere.
 *
 * The same recipe writes docs/examples/demo-traces.csv (scripts/make-demo-traces.ts),
 * the file the browser test uploads. Deterministic: fixed seeds.
 */
import { and, eq } from "drizzle-orm";
import type { AppContext } from "@/server/context";
import { schema } from "@/db/client";
import { registerDemoSeeder } from "./seed";
import { demoPrograms, DEMO_PROGRAM_KEYS } from "./circuits";
import { buildTraceSet, saveTraceSet } from "@/server/services/traces.service";
import { templates } from "@/sim/circuit/templates";
import { setParameter } from "@/sim/circuit/parameters";
import { compileProgram } from "@/sim/inputs/compile-program";
import { makeSyntheticTraces, syntheticCsv, type MeasurementModel } from "@/sim/traces/synthetic";
import { RunSpecSchema, type RunSpec } from "@/shared/schemas/run-spec";
import { TraceUploadOptionsSchema, type TraceUploadOptionsInput } from "@/shared/schemas/api-traces";

export const DEMO_TRACES_KEY = "synthetic-tank-cells";
export const DEMO_TRACES_NAME = "Synthetic tank cells (demo)";
export const DEMO_TRACES_FILE = "demo-traces.csv";
export const DEMO_TRACE_CELLS = 40;
/** The threshold the demo settings use (molecules); set the same value on runs you match against. */
export const DEMO_THRESHOLD_MOLECULES = 50;

/** Hidden parameters (the "truth" a match should find): template values except the hold factor's half-max on the reporter. */
const HIDDEN = { "K(makeZ,hldB)": 130 } as const;

export const DEMO_MEASUREMENT: MeasurementModel = {
  background: 120,
  unitsPerMolecule: 2.5,
  noiseSdUnits: 10,
  noiseCv: 0.05,
  missingFraction: 0.02,
  staggerMinutes: 75,
};

export function demoTraceSpec(): RunSpec {
  let circuit = templates["c1ffl-and"].circuit;
  for (const [ref, v] of Object.entries(HIDDEN)) circuit = setParameter(circuit, ref, v);
  const program = demoPrograms().find((p) => p.demoKey === DEMO_PROGRAM_KEYS.durationLadder)!.body;
  const pulses = compileProgram(program, 1e6).pulses;
  const end = Math.ceil((pulses[pulses.length - 1].off + 90) / 10) * 10;
  return RunSpecSchema.parse({
    circuit,
    program,
    inputSignal: "Q",
    endTimeMinutes: end,
    gridStepMinutes: 1,
    replicates: DEMO_TRACE_CELLS,
    seed: "tank-demo-traces",
    threshold: { value: DEMO_THRESHOLD_MOLECULES, windowMinutes: 30 },
    extrinsic: [{ parameter: "rate(makeZ)", cv: 0.25 }],
  });
}

/** The demo file: long layout, cell,time,value,input; time in minutes. */
export function demoTracesCsv(): string {
  const set = makeSyntheticTraces(demoTraceSpec(), DEMO_MEASUREMENT, "tank-demo-measurement");
  return syntheticCsv(set);
}

/** Upload options for the demo file (also what the browser test and docs use). */
export const DEMO_UPLOAD_OPTIONS: TraceUploadOptionsInput = {
  name: DEMO_TRACES_NAME,
  layout: "long",
  timeUnit: "min",
  schedule: { source: "column", column: "input" },
  settings: {
    background: { mode: "preInput" },
    scale: { mode: "entered", unitsPerMolecule: DEMO_MEASUREMENT.unitsPerMolecule },
    smoothing: { mode: "movingAverage", widthFrames: 3 },
    thresholdMolecules: DEMO_THRESHOLD_MOLECULES,
    hysteresis: 0.2,
    windowMinutes: 30,
  },
};

export function seedDemoTraces(ctx: AppContext, lab: { id: string; ownerId: string }): void {
  const have = ctx.db
    .select({ id: schema.traceSets.id })
    .from(schema.traceSets)
    .where(and(eq(schema.traceSets.labId, lab.id), eq(schema.traceSets.demoKey, DEMO_TRACES_KEY)))
    .get();
  if (have) return;
  const options = TraceUploadOptionsSchema.parse(DEMO_UPLOAD_OPTIONS);
  const built = buildTraceSet(ctx, lab.id, { fileName: DEMO_TRACES_FILE, text: demoTracesCsv(), options });
  saveTraceSet(
    ctx,
    lab.id,
    lab.ownerId,
    { ...built, name: DEMO_TRACES_NAME, timeUnit: options.timeUnit, settings: options.settings },
    { synthetic: true, demoKey: DEMO_TRACES_KEY },
  );
}

registerDemoSeeder("traces", seedDemoTraces);
