/**
 * What every engine entry point derives from a run spec, computed once per
 * spec and cached (a small in-memory map; pure, no I/O): the parsed spec, the
 * compiled model at the spec's system size, the driven signal, the shared
 * input program, the output grid and the extrinsic-variation slots.
 */
import { RunSpecSchema, RUN_LIMITS, type RunSpec } from "@/shared/schemas/run-spec";
import { compileModel, type CompiledModel } from "@/sim/circuit/compile-model";
import { semanticErrors, type ValidationError } from "@/sim/circuit/validate-circuit";
import { hasParameter, parseParameterRef } from "@/sim/circuit/parameters";
import { compileProgram, type CompiledProgram } from "@/sim/inputs/compile-program";

export interface VariedParameter {
  ref: string;
  cv: number;
  /** Parameter slot, or -1 for init(X). */
  slot: number;
  /** Species index for init(X), else -1. */
  species: number;
  kind: "rate" | "leak" | "K" | "n" | "init" | "param";
}

export interface RunSetup {
  key: string;
  spec: RunSpec;
  model: CompiledModel;
  inputSignal: number;
  /** The compiled program shared by all replicates (null when drawn per replicate). */
  sharedProgram: CompiledProgram | null;
  grid: Float64Array;
  varied: VariedParameter[];
  /** Level of the driven signal while a pulse is on (the first pulse's level, else the signal's onLevel). */
  onLevel: number;
}

/** Semantic checks of a run spec beyond zod (circuit, driven signal, parameters, grid size). */
export function runSpecErrors(spec: RunSpec): ValidationError[] {
  const errors: ValidationError[] = semanticErrors(spec.circuit).map((e) => ({
    path: `circuit.${e.path}`,
    message: e.message,
  }));
  if ((spec.program === undefined) !== (spec.inputSignal === undefined))
    errors.push({
      path: spec.program === undefined ? "program" : "inputSignal",
      message: "program and inputSignal go together: give both, or neither for a run without input pulses",
    });
  else if (spec.inputSignal !== undefined && !spec.circuit.signals.some((s) => s.name === spec.inputSignal))
    errors.push({ path: "inputSignal", message: `input signal "${spec.inputSignal}" is not a signal of the circuit` });
  spec.extrinsic.forEach((v, i) => {
    if (!hasParameter(spec.circuit, v.parameter))
      errors.push({
        path: `extrinsic[${i}].parameter`,
        message: `extrinsic[${i}]: unknown parameter "${v.parameter}"`,
      });
  });
  if (spec.systemSize !== 1 && spec.circuit.reactions.some((r) => r.rate.kind === "expression"))
    errors.push({
      path: "systemSize",
      message: "the circuit has expression rates, which are written in molecule counts: system size must be 1",
    });
  const n = Math.floor(spec.endTimeMinutes / spec.gridStepMinutes + 1e-9) + 1;
  if (n > RUN_LIMITS.maxGridPoints)
    errors.push({
      path: "gridStepMinutes",
      message: `grid step gives ${n} points; at most ${RUN_LIMITS.maxGridPoints} (use a larger step or a shorter run)`,
    });
  return errors;
}

/** Grid times 0, step, 2*step, ... <= end time (minutes). */
export function gridTimes(spec: Pick<RunSpec, "endTimeMinutes" | "gridStepMinutes">): Float64Array {
  const n = Math.floor(spec.endTimeMinutes / spec.gridStepMinutes + 1e-9) + 1;
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) out[i] = Math.min(i * spec.gridStepMinutes, spec.endTimeMinutes);
  return out;
}

const cache = new Map<string, RunSetup>();
const CACHE_MAX = 16;

export function runSetup(specInput: RunSpec): RunSetup {
  const key = JSON.stringify(specInput);
  const hit = cache.get(key);
  if (hit) return hit;
  const spec = RunSpecSchema.parse(specInput);
  const errors = runSpecErrors(spec);
  if (errors.length > 0) throw new Error(`invalid run spec: ${errors.map((e) => e.message).join("; ")}`);
  const model = compileModel(spec.circuit, spec.systemSize);
  const inputSignal = spec.inputSignal === undefined ? -1 : model.signalNames.indexOf(spec.inputSignal);
  const signal = spec.circuit.signals[inputSignal] ?? { offLevel: 0, onLevel: 1 };
  const perReplicate = spec.program?.kind === "random" && spec.program.perReplicate;
  const sharedProgram = perReplicate ? null : compileProgram(spec.program, spec.endTimeMinutes, undefined, signal);
  const varied: VariedParameter[] = spec.extrinsic.map((v) => {
    const p = parseParameterRef(v.parameter);
    if (p.kind === "init")
      return { ref: v.parameter, cv: v.cv, slot: -1, species: model.speciesNames.indexOf(p.a), kind: p.kind };
    return { ref: v.parameter, cv: v.cv, slot: model.slots.get(v.parameter)!.slot, species: -1, kind: p.kind };
  });
  const firstLevel = sharedProgram?.pulses[0]?.level;
  const onLevel =
    firstLevel ??
    (spec.program && "level" in spec.program && spec.program.level !== undefined ? spec.program.level : undefined) ??
    signal.onLevel;
  const setup: RunSetup = { key, spec, model, inputSignal, sharedProgram, grid: gridTimes(spec), varied, onLevel };
  if (cache.size >= CACHE_MAX) cache.delete(cache.keys().next().value!);
  cache.set(key, setup);
  return setup;
}
