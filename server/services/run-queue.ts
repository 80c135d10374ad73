/**
 * The run queue (placeholder until the runs work lands): nothing is computed.
 */
export interface RunQueueStats {
  queuedRuns: number;
  runningRuns: number;
  busyThreads: number;
}
export interface RunQueue {
  stats(): RunQueueStats;
  /** Look for queued or interrupted runs in the database and start them. */
  kick(): void;
  close(): Promise<void>;
}

export function createIdleQueue(): RunQueue {
  return { stats: () => ({ queuedRuns: 0, runningRuns: 0, busyThreads: 0 }), kick: () => {}, close: async () => {} };
}
