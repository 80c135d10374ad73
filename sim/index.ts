/**
 * Linger's engine: pure TypeScript, no I/O, no clock, no framework. Used by the
 * server's worker pool, the CLI and the tests. See docs/engine.md.
 */
export { ENGINE_VERSION } from "./engine/version";
export { validateCircuit, semanticErrors, type ValidationError, type ValidationResult } from "./circuit/validate-circuit";
export { listParameters, setParameter, getParameter, hasParameter, parseParameterRef, type ParameterInfo } from "./circuit/parameters";
export { templates, type TemplateKey, type CircuitTemplate } from "./circuit/templates";
export { compileModel, reactionRate, type CompiledModel } from "./circuit/compile-model";
export { compileProgram, type CompiledProgram, type CompiledPulse } from "./inputs/compile-program";
export { resolveThreshold, outputRemovalRate, type ResolvedThreshold } from "./engine/resolve-threshold";
export { gridTimes, runSpecErrors, runSetup } from "./engine/run-setup";
export { chunkLayout, reduceChunks, CHUNK_SIZE, type ChunkLayout, type GridPartial } from "./engine/chunks";
export {
  simulateChunk,
  prepareRun,
  type ChunkResult,
  type ReplicateSummary,
  type RecordedEvents,
  type SimulateChunkOptions,
} from "./engine/simulate-chunk";
export { solveOde, odeSteadyState, type OdeSolution, type OdeSolveOptions } from "./ode/solve-ode";
export { estimateEvents } from "./engine/estimate-events";
export { PulseTracker, pulseStatsFromSampledTrace, type TrackedPulse, type TrackerThreshold } from "./metrics/pulse-tracker";
export { AleaStream, replicateSeed } from "./random/alea-stream";
