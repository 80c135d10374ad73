/**
 * npm test: every suite, one closing line. On two cores it keeps both busy from the start:
 *   1. at once: node's test runner over the non-browser files (tests/**\/*.test.ts outside tests/e2e,
 *      two at a time) and, beside it, the web build (built when missing or stale) and the seeded demo
 *      database the browser tests copy (tests/helpers/demo-database.ts, made once per source tree);
 *   2. when both are ready: a second node runner over tests/e2e (the browser tests);
 *   3. when the first runner ends: jest (jest-expo) over tests/components;
 * then prints "N passed, N failed" summed over all suites, and exits non-zero on any failure or when
 * nothing passed. Each runner takes its files slowest first by tests/test-durations.json (a file not
 * in it goes first; without it, path order); `--save-durations` rewrites it from this run's times.
 * `--only unit|api|e2e|components` narrows it (unit = tests/sim, api = the other non-browser files).
 */
import { spawn } from "node:child_process";
import { existsSync, mkdirSync, readdirSync, readFileSync, rmSync, statSync, writeFileSync } from "node:fs";
import { join, relative, resolve } from "node:path";
import type { Readable, Writable } from "node:stream";

const ROOT = resolve(__dirname, "..");
const args = process.argv.slice(2);
const only = args.includes("--only") ? args[args.indexOf("--only") + 1] : undefined;
const saveDurations = args.includes("--save-durations");
const tmp = join(ROOT, "tmp");
const DURATIONS_FILE = join(ROOT, "tests", "test-durations.json");
mkdirSync(tmp, { recursive: true });

if (only && !["unit", "api", "e2e", "components"].includes(only)) {
  console.error(`--only takes unit, api, e2e or components, not ${only}`);
  process.exit(2);
}

function findTests(dir: string, out: string[] = []): string[] {
  if (!existsSync(dir)) return out;
  for (const name of readdirSync(dir).sort()) {
    const p = join(dir, name);
    if (statSync(p).isDirectory()) findTests(p, out);
    else if (name.endsWith(".test.ts")) out.push(relative(ROOT, p));
  }
  return out;
}

/** Seconds per test file from the last `--save-durations` run, or null when there is none. */
function readDurations(): Record<string, number> | null {
  if (!existsSync(DURATIONS_FILE)) return null;
  try {
    return JSON.parse(readFileSync(DURATIONS_FILE, "utf8"));
  } catch {
    return null;
  }
}

/** Slowest first, so no long file starts last; a file without a recorded time counts as slowest. */
function slowestFirst(files: string[], durations: Record<string, number> | null): string[] {
  if (!durations) return files;
  const t = (f: string) => durations[f] ?? Infinity;
  return [...files].sort((a, b) => t(b) - t(a) || a.localeCompare(b));
}

/** Copies a child's output to ours a whole line at a time, each line after the runner's tag. */
function forwardLines(from: Readable | null, to: Writable, tag: string) {
  if (!from) return;
  let rest = "";
  from.setEncoding("utf8");
  from.on("data", (chunk: string) => {
    const lines = (rest + chunk).split("\n");
    rest = lines.pop()!;
    for (const line of lines) to.write(`${tag}${line}\n`);
  });
  from.on("end", () => {
    if (rest) to.write(`${tag}${rest}\n`);
  });
}

function run(cmd: string, argv: string[], tag: string, env: NodeJS.ProcessEnv): Promise<number | string> {
  return new Promise((done) => {
    const child = spawn(cmd, argv, { cwd: ROOT, env, stdio: ["ignore", "pipe", "pipe"] });
    forwardLines(child.stdout, process.stdout, tag);
    forwardLines(child.stderr, process.stderr, tag);
    child.on("error", (e) => done(e.message));
    child.on("close", (code, signal) => done(code ?? signal ?? "no exit code"));
  });
}

let passed = 0;
let failed = 0;
const problems: string[] = [];
const measured: Record<string, number> = {};
const timeline: string[] = [];
const t0 = Date.now();
const since = (t: number) => `${Math.round((Date.now() - t) / 1000)} s`;

/** One node test runner over the files; adds its counts to the totals. */
async function nodeRunner(name: string, files: string[], concurrency: number): Promise<void> {
  if (!files.length) return;
  const started = Date.now();
  const tap = join(tmp, `node-tests-${name}.tap`);
  const durations = join(tmp, `node-tests-${name}.durations.json`);
  rmSync(tap, { force: true });
  rmSync(durations, { force: true });
  const status = await run(
    process.execPath,
    [
      "--import",
      "tsx",
      "--test",
      // Two files at a time per runner: the browser, server-process and Redis files spend much of their time
      // waiting. Tests must not depend on having the machine to themselves (no wall-clock assertions; budgets
      // generous).
      `--test-concurrency=${concurrency}`,
      "--test-reporter=spec",
      "--test-reporter-destination=stdout",
      "--test-reporter=tap",
      `--test-reporter-destination=${tap}`,
      `--test-reporter=${join(ROOT, "scripts", "lib", "durations-reporter.mjs")}`,
      `--test-reporter-destination=${durations}`,
      ...files,
    ],
    `${name} | `,
    { ...process.env, LINGER_TEST: "1" },
  );
  const text = existsSync(tap) ? readFileSync(tap, "utf8") : "";
  const p = Number(/^# pass (\d+)/m.exec(text)?.[1] ?? 0);
  const f = Number(/^# fail (\d+)/m.exec(text)?.[1] ?? 0);
  const c = Number(/^# cancelled (\d+)/m.exec(text)?.[1] ?? 0);
  passed += p;
  failed += f + c;
  if (status !== 0 && f + c === 0) {
    failed += 1;
    problems.push(`node test runner (${name}) exited with ${status}`);
  }
  if (existsSync(durations)) Object.assign(measured, JSON.parse(readFileSync(durations, "utf8")));
  timeline.push(`${name} ${files.length} files ${since(started)} (ended at ${since(t0)})`);
}

async function jest(): Promise<void> {
  const out = join(tmp, "jest.json");
  rmSync(out, { force: true });
  const started = Date.now();
  const status = await run(
    process.execPath,
    [join(ROOT, "node_modules", "jest", "bin", "jest.js"), "--ci", "--json", `--outputFile=${out}`],
    "jest | ",
    { ...process.env, EXPO_NO_TELEMETRY: "1" },
  );
  if (existsSync(out)) {
    const j = JSON.parse(readFileSync(out, "utf8"));
    passed += j.numPassedTests ?? 0;
    failed += (j.numFailedTests ?? 0) + (j.numRuntimeErrorTestSuites ?? 0);
  }
  if (status !== 0 && !existsSync(out)) {
    failed += 1;
    problems.push(`jest exited with ${status}`);
  }
  timeline.push(`jest ${since(started)} (ended at ${since(t0)})`);
}

/** The web build and the seeded demo database, made side by side; false (and a problem noted) if either fails. */
async function browserPrerequisites(): Promise<boolean> {
  const timed = async (what: string, make: () => Promise<unknown>) => {
    const started = Date.now();
    await make();
    timeline.push(`${what} ${since(started)} (ended at ${since(t0)})`);
  };
  const results = await Promise.allSettled([
    timed("web build", async () => {
      const buildScript = join(ROOT, "scripts", "build-web.ts");
      if (existsSync(buildScript)) await (await import(buildScript)).ensureWebBuild();
    }),
    timed("demo database", async () => {
      const { ensureDemoDatabase } = await import("@/tests/helpers/demo-database");
      await ensureDemoDatabase({ log: (line: string) => console.log(line) });
    }),
  ]);
  for (const r of results) if (r.status === "rejected") problems.push(`browser tests not run: ${r.reason}`);
  return results.every((r) => r.status === "fulfilled");
}

async function main() {
  const durations = readDurations();
  const all = findTests(join(ROOT, "tests"));
  const e2e = only === undefined || only === "e2e" ? all.filter((f) => f.startsWith("tests/e2e/")) : [];
  const rest = all.filter((f) => {
    if (f.startsWith("tests/e2e/")) return false;
    if (only === undefined) return true;
    if (only === "unit") return f.startsWith("tests/sim/");
    if (only === "api") return !f.startsWith("tests/sim/");
    return false;
  });
  const hasComponents = existsSync(join(ROOT, "jest.config.js")) && existsSync(join(ROOT, "tests", "components"));
  const wantJest = hasComponents && (only === undefined || only === "components");

  const browserTests = (async () => {
    if (!e2e.length) return;
    if (await browserPrerequisites()) await nodeRunner("e2e", slowestFirst(e2e, durations), 2);
    else failed += 1;
  })();
  const otherTests = (async () => {
    await nodeRunner("node", slowestFirst(rest, durations), 2);
    if (wantJest) await jest();
  })();
  await Promise.all([browserTests, otherTests]);

  if (saveDurations) {
    // Times of files not run this time (--only) are kept; files that no longer exist are dropped.
    const merged: Record<string, number> = {};
    const known = { ...(durations ?? {}), ...measured };
    for (const f of Object.keys(known).sort()) if (all.includes(f)) merged[f] = Math.round(known[f] * 10) / 10;
    writeFileSync(DURATIONS_FILE, JSON.stringify(merged, null, 2) + "\n");
    console.log(`wrote ${relative(ROOT, DURATIONS_FILE)} (${Object.keys(measured).length} files timed)`);
  }
  console.log(`timeline: ${timeline.join("; ")}; all ${since(t0)}`);
  for (const p of problems) console.log(`problem: ${p}`);
  console.log(`${passed} passed, ${failed} failed`);
  process.exit(failed > 0 || passed === 0 ? 1 : 0);
}

main().catch((e) => {
  console.error(e);
  console.log(`${passed} passed, ${failed + 1} failed`);
  process.exit(1);
});
