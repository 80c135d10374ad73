/**
 * Synthetic single-cell traces, made by Linger's own engine from hidden
 * parameters, for demos and for the recovery test. Always labelled synthetic.
 *
 * Recipe (deterministic for a given seed):
 * 1. simulate `cells` replicates of the run spec (the engine's exact SSA, with
 *    its cell-to-cell parameter variation), keeping every replicate's grid;
 * 2. sample each cell on the frame grid (the spec's grid step) from its own
 *    first to its last frame (optionally staggered starts and ends);
 * 3. measure: background + unitsPerMolecule x count + Gaussian noise with
 *    standard deviation noiseSdUnits + noiseCv x (unitsPerMolecule x count);
 * 4. drop frames at random with probability missingFraction (missing frames).
 * Noise streams: seedrandom.alea(`${seed}/measure/${cell}`) via AleaStream.
 */
import type { RunSpec } from "@/shared/schemas/run-spec";
import type { TracePulse } from "@/shared/schemas/api-traces";
import { simulateChunk } from "@/sim/engine/simulate-chunk";
import { runSetup, gridTimes } from "@/sim/engine/run-setup";
import { compileProgram } from "@/sim/inputs/compile-program";
import { AleaStream } from "@/sim/random/alea-stream";
import { sampleNormal } from "@/sim/random/distributions";
import type { RawCell } from "./preprocess";

export interface MeasurementModel {
  /** Trace units at zero molecules. */
  background: number;
  unitsPerMolecule: number;
  /** Additive noise sd, trace units. */
  noiseSdUnits: number;
  /** Multiplicative noise: extra sd per trace unit of signal. */
  noiseCv: number;
  /** Chance that a frame is missing. */
  missingFraction: number;
  /** Up to this many minutes cut at random from the start and the end of each cell (0 = none). */
  staggerMinutes: number;
}

export interface SyntheticTraceSet {
  /** Times in minutes, values in trace units; missing frames absent. */
  cells: RawCell[];
  /** The input schedule (minutes). */
  schedule: TracePulse[];
  /** Input level at each frame time (0 or the pulse level), for a schedule column. */
  frameTimes: Float64Array;
  inputLevels: Float64Array;
  synthetic: true;
}

/** The pulses a run spec's program makes over its end time (minutes). */
export function scheduleOf(spec: RunSpec): TracePulse[] {
  const setup = runSetup(spec);
  if (spec.program?.kind === "random" && spec.program.perReplicate)
    throw new RangeError("synthetic traces need one schedule shared by every cell (perReplicate off)");
  const compiled = compileProgram(spec.program, spec.endTimeMinutes, undefined, {
    offLevel: 0,
    onLevel: setup.onLevel,
  });
  return compiled.pulses.map((p) => ({ on: p.on, off: p.off, durationBin: p.durationBin }));
}

export function makeSyntheticTraces(spec: RunSpec, measure: MeasurementModel, seed: string): SyntheticTraceSet {
  const chunk = simulateChunk(spec, 0, spec.replicates, { keepAllGrid: true, trajectoryReplicates: 0 });
  const setup = runSetup(spec);
  const grid = gridTimes(spec);
  const ng = grid.length;
  const out = setup.model.outputIndex;
  const schedule = scheduleOf(spec);
  const inputLevels = new Float64Array(ng);
  for (let g = 0; g < ng; g++) inputLevels[g] = schedule.some((p) => grid[g] >= p.on && grid[g] < p.off) ? 1 : 0;

  const cells: RawCell[] = chunk.trajectories.map((tr) => {
    const u = new AleaStream(`${seed}/measure/${tr.replicate}`);
    const next = () => u.next();
    const cut0 = measure.staggerMinutes > 0 ? next() * measure.staggerMinutes : 0;
    const cut1 = measure.staggerMinutes > 0 ? next() * measure.staggerMinutes : 0;
    const t0 = grid[0] + cut0;
    const t1 = grid[ng - 1] - cut1;
    const times: number[] = [];
    const values: number[] = [];
    for (let g = 0; g < ng; g++) {
      // draw every random number for every frame, so a cell's noise does not depend on its cut
      const z = sampleNormal(next);
      const miss = next() < measure.missingFraction;
      if (grid[g] < t0 || grid[g] > t1 || miss) continue;
      const count = tr.values[out * ng + g];
      if (!Number.isFinite(count)) continue;
      const signal = measure.unitsPerMolecule * count;
      times.push(grid[g]);
      values.push(measure.background + signal + z * (measure.noiseSdUnits + measure.noiseCv * signal));
    }
    return {
      cell: `cell-${String(tr.replicate + 1).padStart(3, "0")}`,
      times: Float64Array.from(times),
      values: Float64Array.from(values),
    };
  });
  return { cells, schedule, frameTimes: grid, inputLevels, synthetic: true };
}

/** Long-layout CSV (cell,time,value,input) of a synthetic set; time in minutes, values to 2 decimals. */
export function syntheticCsv(set: SyntheticTraceSet, header = "cell,time,value,input"): string {
  const level = new Map<number, number>();
  set.frameTimes.forEach((t, g) => level.set(t, set.inputLevels[g]));
  const lines = [header];
  for (const c of set.cells) {
    for (let i = 0; i < c.times.length; i++) {
      const t = c.times[i];
      lines.push(`${c.cell},${+t.toFixed(4)},${c.values[i].toFixed(2)},${level.get(t) ?? 0}`);
    }
  }
  return lines.join("\n") + "\n";
}
