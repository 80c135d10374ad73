/**
 * Writes docs/examples/demo-traces.csv: the synthetic demo trace set (made by
 * Linger from hidden parameters plus noise; see server/demo/traces.ts).
 * Run: npx tsx scripts/make-demo-traces.ts   (the output is committed)
 */
import { writeFileSync } from "node:fs";
import { join, resolve } from "node:path";
import { demoTracesCsv, DEMO_TRACES_FILE } from "@/server/demo/traces";

const out = join(resolve(__dirname, ".."), "docs", "examples", DEMO_TRACES_FILE);
const text =
  "# SYNTHETIC demo traces made by Linger from hidden parameters plus measurement noise (not measurements)\n" +
  demoTracesCsv();
writeFileSync(out, text);
console.log(`wrote ${out} (${text.length} bytes)`);
