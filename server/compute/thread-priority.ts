/**
 * Lowers the calling worker thread's scheduling priority (its Linux nice value, this thread alone), so that
 * with every core simulating, the HTTP thread still gets a core first whenever it has a request to answer.
 * Linux names the calling thread's id under /proc/thread-self, and setpriority(2) given a thread id applies
 * to that thread only. On other systems, on the main thread, or when the system refuses, nothing changes.
 * LINGER_WORKER_NICE (1-19, default 10; 0 leaves the priority alone) sets the value.
 */
import { readlinkSync, writeFileSync } from "node:fs";
import { setPriority } from "node:os";
import { isMainThread } from "node:worker_threads";

export const DEFAULT_WORKER_NICE = 10;

/** The thread id whose priority was lowered, or null when nothing changed. */
export function lowerThreadPriority(env: Record<string, string | undefined> = process.env): number | null {
  const nice = env.LINGER_WORKER_NICE === undefined ? DEFAULT_WORKER_NICE : Number(env.LINGER_WORKER_NICE);
  if (isMainThread || !Number.isInteger(nice) || nice < 1 || nice > 19) return null;
  try {
    const tid = Number(readlinkSync("/proc/thread-self").split("/").pop());
    if (!Number.isInteger(tid) || tid <= 0 || tid === process.pid) return null;
    setPriority(tid, nice);
    return tid;
  } catch {
    return null;
  }
}

/**
 * Names the calling worker thread (Linux: /proc/thread-self/comm, at most 15 bytes), so `top -H`, `ps -L` and the
 * benchmark's CPU breakdown (scripts/bench-e2e.ts) tell the simulation, finalising and compute threads apart from
 * V8's and libuv's helpers (every Node thread is otherwise "node"). The main thread keeps the process's name.
 * Elsewhere, or when refused, nothing changes.
 */
export function nameThisThread(name: string): boolean {
  if (isMainThread) return false;
  try {
    writeFileSync("/proc/thread-self/comm", name.slice(0, 15));
    return true;
  } catch {
    return false;
  }
}

/** Thread names set by nameThisThread (scripts/bench-e2e.ts groups CPU time by them). */
export const THREAD_NAMES = { sim: "linger-sim", finalise: "linger-finalise", compute: "linger-compute" } as const;
