/**
 * The reference the engine benchmark is measured against in the same run:
 * direct-benchmark.c compiled with `cc -O2` when a C compiler is present,
 * otherwise its JS twin. Both simulate the benchmark circuit from the same
 * per-replicate generator states Linger's engine starts from, so their event
 * counts should match Linger's (printed as a check).
 */
import { execFileSync, spawn, spawnSync } from "node:child_process";
import { mkdtempSync, rmSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { AleaStream, replicateSeed } from "@/sim";
import type { RunSpec } from "@/shared/schemas/run-spec";
import { directBenchmarkJs } from "./direct-benchmark-js";

export interface ReferenceResult {
  kind: "C (cc -O2)" | "JS reference kernel";
  events: number;
  seconds: number;
  eventsPerSecond: number;
}

export interface Reference {
  kind: ReferenceResult["kind"];
  run(): ReferenceResult;
  /**
   * `copies` C processes at once, each the whole benchmark: events summed over the slowest one's seconds
   * (what two cores give with no shared state at all). Null for the JS twin (one thread only).
   */
  runConcurrent(copies: number): Promise<ReferenceResult | null>;
  dispose(): void;
}

function inputs(spec: RunSpec) {
  const program = spec.program;
  if (program?.kind !== "pulses") throw new Error("the reference kernel needs a pulses program");
  const sw: number[] = [];
  for (const p of program.pulses) sw.push(p.start, p.start + p.duration);
  const states = new Float64Array(4 * spec.replicates);
  for (let rep = 0; rep < spec.replicates; rep++)
    new AleaStream(replicateSeed(spec.seed, rep)).saveTo(states.subarray(4 * rep));
  return { sw: Float64Array.from(sw), states };
}

/** Builds the reference for the benchmark spec (compiling the C source when `cc` works). */
export function createReference(spec: RunSpec, opts: { forceJs?: boolean } = {}): Reference {
  const { sw, states } = inputs(spec);
  const tEnd = spec.endTimeMinutes;
  const step = spec.gridStepMinutes;
  const dir = mkdtempSync(path.join(os.tmpdir(), "linger-bench-"));
  const exe = path.join(dir, "direct-benchmark");
  let haveC = false;
  if (!opts.forceJs) {
    try {
      execFileSync("cc", ["-O2", "-o", exe, path.resolve(__dirname, "direct-benchmark.c"), "-lm"], { stdio: "ignore" });
      haveC = true;
    } catch {
      haveC = false;
    }
  }
  const stdin = `${spec.replicates} ${sw.length} ${tEnd} ${step}\n${[...sw].join(" ")}\n${[...states].join(" ")}\n`;
  return {
    kind: haveC ? "C (cc -O2)" : "JS reference kernel",
    run() {
      if (haveC) {
        const out = spawnSync(exe, [], { input: stdin, encoding: "utf8" });
        if (out.status !== 0) throw new Error(`reference kernel failed: ${out.stderr}`);
        const [ev, sec] = out.stdout.trim().split(/\s+/).map(Number);
        return { kind: "C (cc -O2)", events: ev, seconds: sec, eventsPerSecond: ev / sec };
      }
      const t0 = performance.now();
      const { events } = directBenchmarkJs(states, sw, tEnd, step);
      const seconds = (performance.now() - t0) / 1000;
      return { kind: "JS reference kernel", events, seconds, eventsPerSecond: events / seconds };
    },
    async runConcurrent(copies) {
      if (!haveC) return null;
      const one = () =>
        new Promise<{ events: number; seconds: number }>((resolve, reject) => {
          const child = spawn(exe, [], { stdio: ["pipe", "pipe", "pipe"] });
          let out = "";
          child.stdout.on("data", (d) => (out += d));
          child.on("error", reject);
          // "close", not "exit": exit can come before stdout has been read to its end (a repetition read NaN)
          child.on("close", (code) => {
            if (code !== 0) return reject(new Error(`reference kernel exited ${code}`));
            const [events, seconds] = out.trim().split(/\s+/).map(Number);
            resolve({ events, seconds });
          });
          child.stdin.end(stdin);
        });
      const all = await Promise.all(Array.from({ length: copies }, one));
      const events = all.reduce((s, r) => s + r.events, 0);
      const seconds = Math.max(...all.map((r) => r.seconds));
      return { kind: "C (cc -O2)", events, seconds, eventsPerSecond: events / seconds };
    },
    dispose() {
      rmSync(dir, { recursive: true, force: true });
    },
  };
}
