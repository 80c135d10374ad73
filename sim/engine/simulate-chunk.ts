/**
 * Simulates replicates [replicateStart, replicateStart + count) of a run with
 * the exact direct method (./generate-kernel.ts), or approximate tau-leaping
 * when spec.method = "tauLeap" (./tau-leap.ts).
 *
 * Per replicate, in this order, from the replicate's own stream
 * seedrandom.alea(`${seed}/${replicate}`):
 *   1. the input program, when it is random and drawn per replicate;
 *   2. the extrinsic factors, in spec.extrinsic order: a lognormal factor with
 *      mean 1 and the given CV multiplying the parameter (leak capped at 1,
 *      Hill n at 10, init rounded to a whole count);
 *   3. the burn-in (start = offSteadyState: input off for burnInMinutes from the
 *      given counts), then the run from t = 0 to the end time.
 * Results therefore depend only on (spec, replicate index), never on chunking.
 *
 * Grid values: the state at each grid time (every species). Pulse figures:
 * PulseTracker fed on the exact event path. outputMean / outputVar: mean and
 * population variance of the output over the grid points at or after the first
 * pulse's on time (all grid points when there is no pulse), for CV and Fano
 * figures. A replicate stopped at the event cap has NaN grid values after the
 * stop, is left out of the grid sums there (gridCount), and its open pulse
 * windows are closed at the stop time.
 *
 * Events (sim/engine/event-runner.ts) do not fire during a burn-in; their
 * conditions start from the state at t = 0 (a condition already true then
 * does not fire).
 *
 * A replicate whose expression rate turns negative or not finite (or whose
 * expression reaction would drive a count negative) stops, and the chunk
 * throws an error naming the replicate, reaction, value and time: such a run
 * has no valid results, so none are returned.
 */
import type { RunSpec, PulseStat } from "@/shared/schemas/run-spec";
import { runSetup, type RunSetup } from "./run-setup";
import {
  generateKernel,
  kernelFailureMessage,
  KernelContext,
  KERNEL_ABORTED,
  KERNEL_CAPPED,
  KERNEL_FAILED,
  type Kernel,
} from "./generate-kernel";
import { EventRecorder } from "./event-recorder";
import { AleaStream, replicateSeed } from "@/sim/random/alea-stream";
import { sampleLognormalFactor } from "@/sim/random/distributions";
import { compileProgram, type CompiledProgram } from "@/sim/inputs/compile-program";
import { PulseTracker } from "@/sim/metrics/pulse-tracker";
import { resolveThreshold } from "./resolve-threshold";
import { applyRules, clockProbeAt, deriveParams } from "@/sim/circuit/compile-model";
import { ENGINE_VERSION } from "./version";
import { tauLeapRun } from "./tau-leap";
import { EventRunner } from "./event-runner";

export interface SimulateChunkOptions {
  /** Keep full grid trajectories for replicate indices below this (default 20). */
  trajectoryReplicates?: number;
  /** Keep every replicate's grid trajectory (the CLI's per-replicate CSV). */
  keepAllGrid?: boolean;
  /** Called every 65,536 events; return false to abort (the wall-time cap lives in the worker). */
  checkpoint?: () => boolean;
  /**
   * The direct-method kernel: "fast" (default) or "reference", the kernel as it
   * stood before issue 16's speed work, kept to check the fast one against
   * (identical results for the same seeds; generate-kernel.ts).
   */
  kernel?: "fast" | "reference";
  /**
   * Report `gridExact`: whether every grid value summed was a non-negative whole number and every grid sum
   * and sum of squares is at most this bound, so every addition was exact and the sums are the same in any
   * grouping (how a chunk run in parts merges exactly: sim/engine/chunk-parts.ts).
   */
  gridExactBound?: number;
}

export interface ReplicateSummary {
  replicate: number;
  /** Reaction firings, burn-in included. */
  events: number;
  /** Stopped at the event cap ("stopped at cap", not finished). */
  capped: boolean;
  /** Simulated time reached (the end time unless capped or aborted). */
  endTime: number;
  outputMean: number;
  outputVar: number;
  factors: Record<string, number>;
}

export interface RecordedEvents {
  replicate: number;
  /** State at t = 0 (after any burn-in). */
  initial: Float64Array;
  times: Float64Array;
  reactions: Int32Array;
  truncated: boolean;
}

export interface ChunkResult {
  replicateStart: number;
  count: number;
  events: number;
  engineVersion: string;
  method: "direct" | "tauLeap";
  replicates: ReplicateSummary[];
  /** Replicate-major, pulse order. */
  pulses: PulseStat[];
  /** [species][grid] sums over the chunk's replicates (valid values only), in replicate order. */
  gridSum: Float64Array;
  gridSumSq: Float64Array;
  /** Number of replicates with a valid value per grid point. */
  gridCount: Float64Array;
  trajectories: { replicate: number; values: Float64Array }[];
  recordedEvents?: RecordedEvents[];
  aborted?: boolean;
  /** With options.gridExactBound: the grid sums are exact (see there). */
  gridExact?: boolean;
}

const kernels = { fast: new WeakMap<RunSetup, Kernel>(), reference: new WeakMap<RunSetup, Kernel>() };

function kernelFor(setup: RunSetup, variant: "fast" | "reference" = "fast"): Kernel {
  let k = kernels[variant].get(setup);
  if (!k) {
    const variedSlots = new Set<number>(setup.varied.filter((v) => v.slot >= 0).map((v) => v.slot));
    k = generateKernel(setup.model, { inputSignal: setup.inputSignal, variedSlots, variant });
    kernels[variant].set(setup, k);
  }
  return k;
}

/** Compiles (and caches) everything a chunk needs; the worker calls it to warm its cache. */
export function prepareRun(spec: RunSpec): RunSetup {
  const setup = runSetup(spec);
  if (setup.spec.method === "direct") kernelFor(setup);
  resolveThreshold(spec);
  return setup;
}

export function simulateChunk(
  specInput: RunSpec,
  replicateStart: number,
  count: number,
  options: SimulateChunkOptions = {},
): ChunkResult {
  const setup = prepareRun(specInput);
  const { spec, model, grid } = setup;
  const thr = resolveThreshold(specInput);
  const direct = spec.method === "direct";
  const kernel = direct ? kernelFor(setup, options.kernel) : null;
  const nS = model.nSpecies;
  const ng = grid.length;
  const out = model.outputIndex;
  const trajectoryBelow = options.trajectoryReplicates ?? 20;
  const signal = spec.circuit.signals[setup.inputSignal];

  const gridSum = new Float64Array(nS * ng);
  const gridSumSq = new Float64Array(nS * ng);
  const gridCount = new Float64Array(ng);
  const gridBuf = new Float64Array(nS * ng);
  const exactBound = options.gridExactBound;
  const checkExact = exactBound !== undefined;
  let gridWhole = true;
  const x = new Float64Array(nS);
  const p = new Float64Array(model.nParams);
  const sig = new Float64Array(model.nSignals);
  const rs = new Float64Array(4);
  const moments = new Float64Array(2);
  const ctx = new KernelContext();
  ctx.checkpoint = options.checkpoint ?? null;
  const empty = new Float64Array(0);
  const burnInProbe = Float64Array.of(clockProbeAt(model, 0));
  const runner = model.events.length > 0 ? new EventRunner(model, x, p, sig, true) : null;
  if (runner) {
    ctx.trig = runner.trig;
    ctx.stopFire = model.stopFire;
    ctx.onEvents = (t, stop) => runner.fire(t, stop);
  }
  const run = (rep: number) => {
    try {
      if (kernel) kernel(x, p, sig, rs, ctx);
      else tauLeapRun(model, x, p, sig, rs, ctx, setup.inputSignal);
    } catch (e) {
      throw new Error(`replicate ${rep}: ${(e as Error).message}`);
    }
    if (ctx.status === KERNEL_FAILED) throw new Error(`replicate ${rep}: ${kernelFailureMessage(model, ctx)}`);
  };
  const sharedTracker = setup.sharedProgram ? new PulseTracker(setup.sharedProgram.pulses, thr, "step") : null;

  const replicates: ReplicateSummary[] = [];
  const pulses: PulseStat[] = [];
  const trajectories: { replicate: number; values: Float64Array }[] = [];
  const recorded: RecordedEvents[] = [];
  let totalEvents = 0;
  let aborted = false;

  for (let rep = replicateStart; rep < replicateStart + count; rep++) {
    const stream = new AleaStream(replicateSeed(spec.seed, rep));
    const u = () => stream.next();
    let program: CompiledProgram;
    let tracker: PulseTracker;
    if (setup.sharedProgram && sharedTracker) {
      program = setup.sharedProgram;
      tracker = sharedTracker;
    } else {
      program = compileProgram(spec.program, spec.endTimeMinutes, u, signal);
      tracker = new PulseTracker(program.pulses, thr, "step");
    }
    p.set(model.baseParams);
    x.set(model.init);
    const factors: Record<string, number> = {};
    for (const v of setup.varied) {
      const f = sampleLognormalFactor(u, v.cv);
      factors[v.ref] = f;
      if (v.kind === "init") x[v.species] = Math.round(x[v.species] * f);
      else if (v.kind === "leak") p[v.slot] = Math.min(1, p[v.slot] * f);
      else if (v.kind === "n") p[v.slot] = Math.min(10, p[v.slot] * f);
      else p[v.slot] *= f;
    }
    deriveParams(model, p);
    sig.set(model.signalOff);
    if (model.rules.length > 0)
      try {
        applyRules(model, x, p, sig, true);
      } catch (e) {
        throw new Error(`replicate ${rep}: ${(e as Error).message}`);
      }
    stream.saveTo(rs);

    ctx.events = 0;
    ctx.eventCap = spec.eventCapPerReplicate;
    ctx.status = 0;
    let status = 0;
    if (spec.start === "offSteadyState" && spec.burnInMinutes > 0) {
      ctx.t = 0;
      ctx.tEnd = spec.burnInMinutes;
      ctx.switchTimes = empty;
      ctx.switchLevels = empty;
      ctx.switchIndex = 0;
      ctx.gridTimes = empty;
      ctx.gridIndex = 0;
      ctx.gridBuf = null;
      ctx.tracker = null;
      ctx.recorder = null;
      ctx.stopTimes = empty;
      ctx.stopProbe = burnInProbe;
      if (runner) {
        runner.enabled = false;
        runner.init();
      }
      run(rep);
      status = ctx.status;
      sig.set(model.signalOff);
    }
    const recorder = rep < spec.recordEventsFor ? new EventRecorder() : null;
    const initial = recorder ? x.slice() : null;
    ctx.t = 0;
    ctx.tEnd = spec.endTimeMinutes;
    ctx.switchTimes = program.switchTimes;
    ctx.switchLevels = program.levels;
    ctx.switchIndex = 0;
    ctx.gridTimes = grid;
    ctx.gridIndex = 0;
    ctx.gridBuf = gridBuf;
    ctx.tracker = tracker;
    ctx.recorder = recorder;
    ctx.stopTimes = model.clockStops;
    ctx.stopProbe = model.clockProbe;
    if (runner) {
      runner.enabled = true;
      runner.init();
    }
    tracker.reset(rep, 0, x[out]);
    if (status === 0) {
      run(rep);
      status = ctx.status;
    }
    const gEnd = status === 0 ? ng : ctx.gridIndex;
    for (let i = 0; i < nS; i++) gridBuf.fill(NaN, i * ng + gEnd, (i + 1) * ng);
    const stats = tracker.finish(ctx.t);
    for (const s of stats) pulses.push(s);

    // grid sums and output statistics
    addGrid(gridBuf, gridSum, gridSumSq, gridCount, nS, ng, gEnd);
    if (checkExact && gridWhole) gridWhole = gridIsWhole(gridBuf, nS, ng, gEnd);
    const statsFrom = program.pulses.length > 0 ? program.pulses[0].on : 0;
    outputMoments(gridBuf, grid, out * ng, gEnd, statsFrom, moments);
    const mean = moments[0];
    const variance = moments[1];
    if (options.keepAllGrid || rep < trajectoryBelow) trajectories.push({ replicate: rep, values: gridBuf.slice() });
    if (recorder && initial) recorded.push({ replicate: rep, initial, ...recorder.snapshot() });
    totalEvents += ctx.events;
    replicates.push({
      replicate: rep,
      events: ctx.events,
      capped: status === KERNEL_CAPPED,
      endTime: ctx.t,
      outputMean: mean,
      outputVar: variance,
      factors,
    });
    if (status === KERNEL_ABORTED) {
      aborted = true;
      break;
    }
  }
  const result: ChunkResult = {
    replicateStart,
    count,
    events: totalEvents,
    engineVersion: ENGINE_VERSION,
    method: spec.method,
    replicates,
    pulses,
    gridSum,
    gridSumSq,
    gridCount,
    trajectories,
  };
  if (recorded.length > 0) result.recordedEvents = recorded;
  if (aborted) result.aborted = true;
  if (checkExact) {
    let exact = gridWhole;
    for (let i = 0; exact && i < gridSumSq.length; i++)
      if (!(gridSum[i] <= exactBound && gridSumSq[i] <= exactBound)) exact = false;
    result.gridExact = exact;
  }
  return result;
}

/**
 * Adds one replicate's grid values (the first gEnd points of each species) to the chunk's sums. Kept apart
 * from simulateChunk's long body so V8 optimises it on its own: inside the body, which runs once per chunk
 * and is optimised on the stack, the loop boxed every value it read (a heap number per grid value).
 */
function addGrid(
  buf: Float64Array,
  sum: Float64Array,
  sumSq: Float64Array,
  count: Float64Array,
  nS: number,
  ng: number,
  gEnd: number,
): void {
  for (let i = 0; i < nS; i++) {
    const o = i * ng;
    for (let g = 0; g < gEnd; g++) {
      const v = buf[o + g];
      sum[o + g] += v;
      sumSq[o + g] += v * v;
    }
  }
  for (let g = 0; g < gEnd; g++) count[g] += 1;
}

/** Whether every grid value of the replicate is a non-negative whole number. */
function gridIsWhole(buf: Float64Array, nS: number, ng: number, gEnd: number): boolean {
  for (let i = 0; i < nS; i++) {
    const o = i * ng;
    for (let g = 0; g < gEnd; g++) {
      const v = buf[o + g];
      if (!(v >= 0 && Math.floor(v) === v)) return false;
    }
  }
  return true;
}

/**
 * Mean and population variance of the output over the grid points at or after `from` (all points before
 * gEnd when from is 0) into out[0], out[1]; NaN for none.
 */
function outputMoments(
  buf: Float64Array,
  grid: Float64Array,
  offset: number,
  gEnd: number,
  from: number,
  out: Float64Array,
): void {
  let n = 0;
  let sum = 0;
  let sumSq = 0;
  for (let g = 0; g < gEnd; g++) {
    if (grid[g] < from) continue;
    const v = buf[offset + g];
    n++;
    sum += v;
    sumSq += v * v;
  }
  const mean = n > 0 ? sum / n : NaN;
  out[0] = mean;
  out[1] = n > 0 ? Math.max(0, sumSq / n - mean * mean) : NaN;
}
