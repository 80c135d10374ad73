/**
 * npm test: every suite, one closing line.
 *   1. the web build (built when missing or stale),
 *   2. node's test runner over tests/**\/*.test.ts (unit, engine, API, browser),
 *   3. jest (jest-expo) over tests/components,
 * then prints "N passed, N failed" summed over all suites, and exits non-zero on
 * any failure. `--only unit|api|e2e|components` narrows it (unit = tests/sim).
 */
import { spawnSync } from "node:child_process";
import { existsSync, mkdirSync, readdirSync, readFileSync, rmSync, statSync } from "node:fs";
import { join, relative, resolve } from "node:path";

const ROOT = resolve(__dirname, "..");
const args = process.argv.slice(2);
const only = args.includes("--only") ? args[args.indexOf("--only") + 1] : undefined;
const tmp = join(ROOT, "tmp");
mkdirSync(tmp, { recursive: true });

function findTests(dir: string, out: string[] = []): string[] {
  if (!existsSync(dir)) return out;
  for (const name of readdirSync(dir).sort()) {
    const p = join(dir, name);
    if (statSync(p).isDirectory()) findTests(p, out);
    else if (name.endsWith(".test.ts")) out.push(relative(ROOT, p));
  }
  return out;
}

let passed = 0;
let failed = 0;
let problems: string[] = [];

async function main() {
  const wantE2e = !only || only === "e2e";
  if (wantE2e) {
    const buildScript = join(ROOT, "scripts", "build-web.ts");
    if (existsSync(buildScript)) {
      const mod = await import(buildScript);
      await mod.ensureWebBuild();
    }
  }

  const nodeTests = findTests(join(ROOT, "tests")).filter((f) => {
    const isE2e = f.startsWith("tests/e2e/");
    if (!only) return true;
    if (only === "e2e") return isE2e;
    if (only === "unit") return f.startsWith("tests/sim/");
    if (only === "api") return !isE2e && !f.startsWith("tests/sim/");
    return false;
  });
  if (nodeTests.length && only !== "components") {
    const tap = join(tmp, "node-tests.tap");
    rmSync(tap, { force: true });
    const r = spawnSync(
      process.execPath,
      [
        "--import",
        "tsx",
        "--test",
        // Two files at a time (node's default is one less than the cores: 1 here): the browser, server-process and
        // Redis files spend much of their time waiting, so the suite takes about a third less on 2 cores. Tests
        // must not depend on having the machine to themselves (no wall-clock assertions; budgets generous).
        "--test-concurrency=2",
        "--test-reporter=spec",
        "--test-reporter-destination=stdout",
        "--test-reporter=tap",
        `--test-reporter-destination=${tap}`,
        ...nodeTests,
      ],
      { cwd: ROOT, stdio: "inherit", env: { ...process.env, LINGER_TEST: "1" } },
    );
    const text = existsSync(tap) ? readFileSync(tap, "utf8") : "";
    const p = Number(/^# pass (\d+)/m.exec(text)?.[1] ?? 0);
    const f = Number(/^# fail (\d+)/m.exec(text)?.[1] ?? 0);
    const c = Number(/^# cancelled (\d+)/m.exec(text)?.[1] ?? 0);
    passed += p;
    failed += f + c;
    if (r.status !== 0 && f + c === 0) {
      failed += 1;
      problems.push(`node test runner exited with ${r.status ?? r.signal}`);
    }
  }

  const hasComponents = existsSync(join(ROOT, "jest.config.js")) && existsSync(join(ROOT, "tests", "components"));
  if (hasComponents && (!only || only === "components")) {
    const out = join(tmp, "jest.json");
    rmSync(out, { force: true });
    const r = spawnSync(
      process.execPath,
      [join(ROOT, "node_modules", "jest", "bin", "jest.js"), "--ci", "--json", `--outputFile=${out}`],
      {
        cwd: ROOT,
        stdio: "inherit",
        env: { ...process.env, EXPO_NO_TELEMETRY: "1" },
      },
    );
    if (existsSync(out)) {
      const j = JSON.parse(readFileSync(out, "utf8"));
      passed += j.numPassedTests ?? 0;
      failed += (j.numFailedTests ?? 0) + (j.numRuntimeErrorTestSuites ?? 0);
    }
    if (r.status !== 0 && !existsSync(out)) {
      failed += 1;
      problems.push(`jest exited with ${r.status ?? r.signal}`);
    }
  }

  for (const p of problems) console.log(`problem: ${p}`);
  console.log(`${passed} passed, ${failed} failed`);
  process.exit(failed > 0 || passed === 0 ? 1 : 0);
}

main().catch((e) => {
  console.error(e);
  console.log(`${passed} passed, ${failed + 1} failed`);
  process.exit(1);
});
