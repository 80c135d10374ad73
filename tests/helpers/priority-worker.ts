/** Worker-thread side of tests/server/compute/thread-priority.test.ts (a piscina task, as the simulation's). */
import { getPriority } from "node:os";
import { lowerThreadPriority } from "@/server/compute/thread-priority";

export default function priorityTask(env: { LINGER_WORKER_NICE?: string }): {
  tid: number | null;
  priority: number | null;
} {
  const tid = lowerThreadPriority(env);
  return { tid, priority: tid === null ? null : getPriority(tid) };
}
