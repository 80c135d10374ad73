/**
 * The benchmark's reference kernels (scripts/bench/) simulate the benchmark
 * circuit with the same generator states, arithmetic and event definition as
 * Linger's engine, so a ratio of events/s compares like with like: their event
 * counts must equal the engine's, replicate set by replicate set.
 */
import { test } from "node:test";
import assert from "node:assert/strict";
import { execFileSync } from "node:child_process";
import { loadSpecFile } from "@/server/cli/load-spec";
import { DEFAULT_BENCH_SPEC } from "@/scripts/bench-engine";
import { createReference } from "@/scripts/bench/reference";
import { simulateChunk } from "@/sim";

const spec = loadSpecFile(DEFAULT_BENCH_SPEC, { replicates: 8 });
const lingerEvents = simulateChunk(spec, 0, 8).events;

const haveCc = (() => {
  try {
    execFileSync("cc", ["--version"], { stdio: "ignore" });
    return true;
  } catch {
    return false;
  }
})();

test("JS reference kernel: same event count as the engine", () => {
  const ref = createReference(spec, { forceJs: true });
  try {
    assert.equal(ref.kind, "JS reference kernel");
    assert.equal(ref.run().events, lingerEvents);
  } finally {
    ref.dispose();
  }
});

test("C reference kernel (cc -O2): same event count as the engine", { skip: !haveCc && "no cc" }, () => {
  const ref = createReference(spec);
  try {
    assert.equal(ref.kind, "C (cc -O2)");
    assert.equal(ref.run().events, lingerEvents);
  } finally {
    ref.dispose();
  }
});
