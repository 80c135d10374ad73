/**
 * Linger's engine: pure TypeScript, no I/O, no clock, no framework. Used by the
 * server's worker pool, the CLI and the tests. See docs/engine.md.
 */
export { ENGINE_VERSION } from "@/sim/engine/version";
export {
  validateCircuit,
  semanticErrors,
  type ValidationError,
  type ValidationResult,
} from "@/sim/circuit/validate-circuit";
export {
  listParameters,
  setParameter,
  getParameter,
  hasParameter,
  parseParameterRef,
  type ParameterInfo,
} from "@/sim/circuit/parameters";
export { templates, type TemplateKey, type CircuitTemplate } from "@/sim/circuit/templates";
export { compileModel, reactionRate, type CompiledModel } from "@/sim/circuit/compile-model";
export { compileProgram, type CompiledProgram, type CompiledPulse } from "@/sim/inputs/compile-program";
export { resolveThreshold, outputRemovalRate, type ResolvedThreshold } from "@/sim/engine/resolve-threshold";
export { gridTimes, runSpecErrors, runSetup } from "@/sim/engine/run-setup";
export {
  chunkLayout,
  reduceChunks,
  createGridReducer,
  CHUNK_SIZE,
  type ChunkLayout,
  type GridPartial,
} from "@/sim/engine/chunks";
export { chunkParts, mergeChunkParts, partsPerChunk, concatPackedPulses } from "@/sim/engine/chunk-parts";
export {
  simulateChunk,
  prepareRun,
  type ChunkResult,
  type ReplicateSummary,
  type RecordedEvents,
  type SimulateChunkOptions,
} from "@/sim/engine/simulate-chunk";
export { solveOde, odeSteadyState, type OdeSolution, type OdeSolveOptions } from "@/sim/ode/solve-ode";
export { OdeBudget, OdeBudgetError, withOdeBudget, DEFAULT_ODE_STEPS } from "@/sim/ode/ode-budget";
export { estimateEvents } from "@/sim/engine/estimate-events";
export {
  PulseTracker,
  pulseStatsFromSampledTrace,
  type TrackedPulse,
  type TrackerThreshold,
} from "@/sim/metrics/pulse-tracker";
export { AleaStream, replicateSeed } from "@/sim/random/alea-stream";
