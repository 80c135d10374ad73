/**
 * CPU time and memory of a process and of its threads, from Linux's /proc (proc(5)): what the benchmarks report
 * beside wall time, since CPU seconds move less than seconds when other jobs share the machine. Every reader
 * answers null (or NaN) where /proc is missing.
 */
import { execFileSync } from "node:child_process";
import { readFileSync, readdirSync } from "node:fs";
import { THREAD_NAMES } from "@/server/compute/thread-priority";

let ticks: number | undefined;
/** Clock ticks per second of utime/stime (getconf CLK_TCK; 100 on Linux). */
export function clockTicks(): number {
  if (ticks === undefined) {
    try {
      ticks = Number(execFileSync("getconf", ["CLK_TCK"], { encoding: "utf8" }).trim()) || 100;
    } catch {
      ticks = 100;
    }
  }
  return ticks;
}

/** A stat(5) line's command name and its user + system CPU seconds. */
function parseStat(stat: string): { name: string; seconds: number } {
  // The command name is in parentheses and may hold spaces; utime and stime are fields 14 and 15, counted
  // from field 3, the first after it.
  const fields = stat.slice(stat.lastIndexOf(")") + 2).split(" ");
  return {
    name: stat.slice(stat.indexOf("(") + 1, stat.lastIndexOf(")")),
    seconds: (Number(fields[11]) + Number(fields[12])) / clockTicks(),
  };
}

/** User + system CPU of a whole process (every thread), seconds; null elsewhere. */
export function processCpuSeconds(pid: number | undefined): number | null {
  try {
    return parseStat(readFileSync(`/proc/${pid}/stat`, "utf8")).seconds;
  } catch {
    return null;
  }
}

/** CPU ms of one thread of a process (its main thread by default) or of the whole process; NaN elsewhere. */
export function threadCpuMs(pid: number, tid: number | "process" = pid): number {
  try {
    const path = tid === "process" ? `/proc/${pid}/stat` : `/proc/${pid}/task/${tid}/stat`;
    return parseStat(readFileSync(path, "utf8")).seconds * 1000;
  } catch {
    return NaN;
  }
}

/** Every live thread of a process: its id, name and CPU seconds so far; null elsewhere. */
export function threadTimes(pid: number): Map<number, { name: string; seconds: number }> | null {
  try {
    const out = new Map<number, { name: string; seconds: number }>();
    for (const tid of readdirSync(`/proc/${pid}/task`)) {
      try {
        out.set(Number(tid), parseStat(readFileSync(`/proc/${pid}/task/${tid}/stat`, "utf8")));
      } catch {
        // the thread ended between the listing and the read
      }
    }
    return out;
  } catch {
    return null;
  }
}

/**
 * Where a process's CPU went between two threadTimes snapshots, in seconds: its main (event loop) thread, the
 * simulation, finalising and compute threads (named by server/compute/thread-priority.ts), and the rest, V8's
 * garbage-collector and compiler threads and libuv's. A thread that ended between the snapshots is missing.
 */
export interface CpuByThread {
  main: number;
  simulation: number;
  finalising: number;
  compute: number;
  helpers: number;
}

export function cpuByThread(
  pid: number,
  before: Map<number, { name: string; seconds: number }> | null,
  after: Map<number, { name: string; seconds: number }> | null,
): CpuByThread | null {
  if (!before || !after) return null;
  const out: CpuByThread = { main: 0, simulation: 0, finalising: 0, compute: 0, helpers: 0 };
  for (const [tid, t] of after) {
    const spent = t.seconds - (before.get(tid)?.seconds ?? 0);
    if (tid === pid) out.main += spent;
    else if (t.name === THREAD_NAMES.sim) out.simulation += spent;
    else if (t.name === THREAD_NAMES.finalise) out.finalising += spent;
    else if (t.name === THREAD_NAMES.compute) out.compute += spent;
    else out.helpers += spent;
  }
  return out;
}

/** One line: "main 1.23 s, simulation 13.50 s, finalising 0.98 s, helpers 0.40 s" (compute only when used). */
export function formatCpuByThread(c: CpuByThread): string {
  const parts = [
    `main ${c.main.toFixed(2)} s`,
    `simulation ${c.simulation.toFixed(2)} s`,
    `finalising ${c.finalising.toFixed(2)} s`,
    ...(c.compute > 0 ? [`compute ${c.compute.toFixed(2)} s`] : []),
    `V8/libuv helpers ${c.helpers.toFixed(2)} s`,
  ];
  return parts.join(", ");
}

/** Peak resident set of a process (VmHWM), MB; null elsewhere. */
export function peakRssMb(pid: number | undefined): number | null {
  try {
    const m = /VmHWM:\s+(\d+) kB/.exec(readFileSync(`/proc/${pid}/status`, "utf8"));
    return m ? Number(m[1]) / 1024 : null;
  } catch {
    return null;
  }
}
