/**
 * The contributor guide, the README and docs/ name source files by their path
 * from the repository's top (`server/routes/lifecycle-routes.ts`); a file moved or
 * renamed without its mention leaves a reader looking for nothing. Every such path
 * must exist.
 */
import { test } from "node:test";
import assert from "node:assert/strict";
import { existsSync, readdirSync, readFileSync } from "node:fs";
import { join, resolve } from "node:path";

const ROOT = resolve(__dirname, "..", "..");
const TOP = ["app", "components", "server", "sim", "db", "drizzle", "shared", "tests", "scripts", "docs", "patches"];
// A path starts at one of the top-level folders (not inside a longer word or path) and ends in a file extension.
const PATH = new RegExp(
  `(?<![\\w./-])(?:${TOP.join("|")})/[\\w./()\\[\\]-]+?\\.(?:tsx?|md|json|js|sql|patch)(?![\\w])`,
  "g",
);

function documents(): string[] {
  const docs = readdirSync(join(ROOT, "docs"))
    .filter((f) => f.endsWith(".md"))
    .map((f) => join("docs", f));
  return ["README.md", "DEVELOPERS.md", ...docs];
}

function missingPaths(text: string): string[] {
  return [...new Set(text.match(PATH) ?? [])].filter((p) => !existsSync(join(ROOT, p)));
}

test("the path matcher finds top-level paths and skips names inside other paths", () => {
  const found = "see `server/routes/lifecycle-routes.ts`, tests/nowhere/gone.test.ts and x/server/not-this.ts".match(
    PATH,
  );
  assert.deepEqual(found, ["server/routes/lifecycle-routes.ts", "tests/nowhere/gone.test.ts"]);
  assert.deepEqual(missingPaths("tests/nowhere/gone.test.ts"), ["tests/nowhere/gone.test.ts"]);
});

test("every file path named in the README, DEVELOPERS.md and docs/ exists", () => {
  const missing: string[] = [];
  let named = 0;
  for (const doc of documents()) {
    const text = readFileSync(join(ROOT, doc), "utf8");
    named += (text.match(PATH) ?? []).length;
    for (const p of missingPaths(text)) missing.push(`${doc}: ${p}`);
  }
  assert.ok(named > 50, `only ${named} paths found: the matcher is broken`);
  assert.deepEqual(missing, []);
});
