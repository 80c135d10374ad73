/**
 * A small stochastic ensemble for the behaviour classifier: replicates of a
 * compiled circuit simulated with the exact direct method (the run engine's
 * generated kernel, unchanged) with the signals held at fixed levels, each
 * from its own start state and its own seed, sampled on a regular grid.
 *
 * Example: simulateEnsemble({ model, signals: model.signalOff, starts: [model.init],
 *   seeds: ["s/regime/off/0"], windowMinutes: 100, sampleMinutes: 0.1 }).
 */
import type { CompiledModel } from "@/sim/circuit/compile-model";
import { generateKernel, KernelContext, KERNEL_CAPPED, type Kernel } from "@/sim/engine/generate-kernel";
import { AleaStream } from "@/sim/random/alea-stream";

export interface EnsembleInput {
  model: CompiledModel;
  /** Parameter vector with K^n slots derived (the model's base parameters when absent). */
  params?: Float64Array;
  /** Signal levels, held for the whole window. */
  signals: Float64Array;
  /** One start state per replicate (molecules). */
  starts: Float64Array[];
  /** One seed string per replicate. */
  seeds: string[];
  windowMinutes: number;
  sampleMinutes: number;
  /** Reaction firings allowed per replicate (default 2,000,000). */
  eventCapPerReplicate?: number;
}

export interface Ensemble {
  /** Sample times, minutes from the start (0 included). */
  times: Float64Array;
  /** Per replicate: [species][sample] counts. */
  samples: Float64Array[];
  /** Per replicate: the state at the end of the window. */
  finalStates: Float64Array[];
  /** Some replicate stopped at the event cap (its samples after the stop are NaN). */
  capped: boolean;
  events: number;
}

const kernels = new WeakMap<CompiledModel, Map<string, Kernel>>();

function kernelFor(model: CompiledModel, p: Float64Array): Kernel {
  // slots whose value differs from the base are read from the vector, not specialised
  const varied = new Set<number>();
  for (let i = 0; i < p.length; i++) if (p[i] !== model.baseParams[i]) varied.add(i);
  const key = [...varied].join(",");
  let byKey = kernels.get(model);
  if (!byKey) kernels.set(model, (byKey = new Map()));
  let k = byKey.get(key);
  if (!k) {
    k = generateKernel(model, { inputSignal: -1, variedSlots: varied });
    byKey.set(key, k);
  }
  return k;
}

export function simulateEnsemble(input: EnsembleInput): Ensemble {
  const { model, starts, seeds } = input;
  if (starts.length !== seeds.length) throw new Error("one start state per seed is needed");
  const p = input.params ?? model.baseParams;
  const kernel = kernelFor(model, p);
  const nS = model.nSpecies;
  const ng = Math.floor(input.windowMinutes / input.sampleMinutes + 1e-9) + 1;
  const times = Float64Array.from({ length: ng }, (_, g) => g * input.sampleMinutes);
  const tEnd = times[ng - 1];
  const ctx = new KernelContext();
  const rs = new Float64Array(4);
  const sig = new Float64Array(model.nSignals);
  const empty = new Float64Array(0);
  const samples: Float64Array[] = [];
  const finalStates: Float64Array[] = [];
  let capped = false;
  let events = 0;
  for (let r = 0; r < starts.length; r++) {
    const x = Float64Array.from(starts[r], (v) => Math.max(0, Math.round(v)));
    const buf = new Float64Array(nS * ng).fill(NaN);
    new AleaStream(seeds[r]).saveTo(rs);
    sig.set(input.signals);
    ctx.t = 0;
    ctx.tEnd = tEnd;
    ctx.switchTimes = empty;
    ctx.switchLevels = empty;
    ctx.switchIndex = 0;
    ctx.gridTimes = times;
    ctx.gridIndex = 0;
    ctx.gridBuf = buf;
    ctx.tracker = null;
    ctx.recorder = null;
    ctx.events = 0;
    ctx.eventCap = input.eventCapPerReplicate ?? 2_000_000;
    ctx.status = 0;
    kernel(x, p, sig, rs, ctx);
    if (ctx.status === KERNEL_CAPPED) {
      capped = true;
      // the kernel writes the grid up to the stop; later samples stay NaN
      for (let i = 0; i < nS; i++) buf.fill(NaN, i * ng + ctx.gridIndex, (i + 1) * ng);
    }
    events += ctx.events;
    samples.push(buf);
    finalStates.push(x);
  }
  return { times, samples, finalStates, capped, events };
}
