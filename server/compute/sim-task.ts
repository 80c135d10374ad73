/** The task a simulation worker receives (shared by the pool, the server queue and the CLI). */
import type { RunSpec } from "@/shared/schemas/run-spec";

export interface SimTask {
  spec: RunSpec;
  replicateStart: number;
  count: number;
  options?: { trajectoryReplicates?: number; keepAllGrid?: boolean; gridExactBound?: number };
  /** Wall-time cap for this chunk, milliseconds; the chunk comes back with aborted = true past it. */
  wallTimeLimitMs?: number;
  /** Only compile and cache the spec (and hold the thread for holdMs), returning an empty result. */
  warmUp?: { holdMs?: number; replicates?: number };
  /** Bench only: return the chunk's thread, start and end (epoch ms) and the thread's CPU time (`trace`). */
  trace?: boolean;
}
