/**
 * Proof that the fast kernel's inline logarithm (sim/engine/kernel-log.ts) is
 * bit-identical to Math.log on its whole domain: for every integer m in
 * [1, 2^32] it evaluates the emitted source at u = (2^32 - m) * 2^-32 (every
 * value the kernel's Alea output can take) and compares it with
 * Math.log(1 - u), the expression of the reference kernel. Prints the number
 * of arguments checked and the number of mismatches (with the first few).
 *
 *   npx tsx scripts/verify-kernel-log.ts [--threads N] [--from M --to M]
 *
 * Two results count as identical when they are equal and, if zero, have the
 * same sign; neither side can be NaN for a positive argument (a NaN would
 * count as a mismatch). Runs in worker threads (default: every core); about
 * a minute on an idle 2-core machine.
 */
import { Worker } from "node:worker_threads";
import os from "node:os";
import { KERNEL_LOG_LOCALS, kernelLogCode } from "@/sim/engine/kernel-log";

const TWO32 = 4294967296;

function arg(name: string, fallback: number): number {
  const i = process.argv.indexOf(name);
  if (i < 0) return fallback;
  const v = Number(process.argv[i + 1]);
  if (!Number.isInteger(v)) throw new Error(`${name} needs an integer`);
  return v;
}

// the worker runs plain JavaScript: the emitted source in a loop over its range of m
const workerCode = `
const { parentPort, workerData } = require("node:worker_threads");
const { from, to, src } = workerData;
const check = new Function("from", "to", "report", src);
const r = check(from, to, (done) => parentPort.postMessage({ progress: done }));
parentPort.postMessage({ done: true, checked: r.checked, mismatches: r.mismatches, examples: r.examples });
`;

/** Loop body: every m in [from, to], the kernel's code against Math.log, with progress every 2^26 arguments. */
function checkSource(): string {
  return `"use strict";
var r = 0.0, u = 0.0, e = 0.0, ${KERNEL_LOG_LOCALS};
var checked = 0, mismatches = 0, examples = [];
for (var m = from; m <= to; m++) {
  u = (${TWO32} - m) * 2.3283064365386963e-10;
  ${kernelLogCode("u", "r")}
  e = Math.log(1 - u);
  checked++;
  if (!(r === e && (r !== 0 || 1 / r === 1 / e))) {
    mismatches++;
    if (examples.length < 10) examples.push({ m: m, got: r, expected: e });
  }
  if ((checked & 67108863) === 0) report(checked);
}
return { checked: checked, mismatches: mismatches, examples: examples };`;
}

async function main() {
  const threads = arg("--threads", os.availableParallelism());
  const from = arg("--from", 1);
  const to = arg("--to", TWO32);
  if (from < 1 || to > TWO32 || from > to) throw new Error("need 1 <= from <= to <= 2^32");
  const total = to - from + 1;
  const src = checkSource();
  const t0 = performance.now();
  const progress = new Array<number>(threads).fill(0);
  let lastPrint = 0;
  const parts = Array.from({ length: threads }, (_, w) => {
    const a = from + Math.floor((total * w) / threads);
    const b = from + Math.floor((total * (w + 1)) / threads) - 1;
    return new Promise<{ checked: number; mismatches: number; examples: unknown[] }>((resolve, reject) => {
      const worker = new Worker(workerCode, { eval: true, workerData: { from: a, to: b, src } });
      worker.on("message", (msg) => {
        if (msg.done) resolve(msg);
        else {
          progress[w] = msg.progress;
          const done = progress.reduce((s, x) => s + x, 0);
          if (performance.now() - lastPrint > 5000) {
            lastPrint = performance.now();
            console.log(`${((100 * done) / total).toFixed(1)}% after ${((lastPrint - t0) / 1000).toFixed(0)} s`);
          }
        }
      });
      worker.on("error", reject);
      worker.on("exit", (code) => code !== 0 && reject(new Error(`worker exited with ${code}`)));
    });
  });
  const results = await Promise.all(parts);
  const checked = results.reduce((s, r) => s + r.checked, 0);
  const mismatches = results.reduce((s, r) => s + r.mismatches, 0);
  const examples = results.flatMap((r) => r.examples).slice(0, 10);
  console.log(
    JSON.stringify(
      {
        node: process.version,
        v8: process.versions.v8,
        arch: process.arch,
        from,
        to,
        checked,
        complete: checked === total,
        mismatches,
        examples,
        seconds: Math.round((performance.now() - t0) / 100) / 10,
        threads,
      },
      null,
      2,
    ),
  );
  if (mismatches > 0 || checked !== total) process.exitCode = 1;
}

main().catch((e) => {
  console.error(e);
  process.exitCode = 1;
});
