/**
 * sim/ is the pure engine and analysis: it imports nothing outside sim/ and shared/
 * (plus a short list of pure npm packages), touches no file, network or thread, and
 * reads no clock and no global random source. Every import of every file is read with
 * TypeScript's own pre-processor (static, dynamic and require forms alike), so a new
 * file is checked without touching this test.
 */
import { test } from "node:test";
import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import { dirname, join, relative, resolve, sep } from "node:path";
import ts from "typescript";
import { sourceFiles } from "@/tests/helpers/source-files";

const ROOT = resolve(__dirname, "../..");
const SIM = join(ROOT, "sim");

/** npm packages sim/ may use: parsers and numerics with no I/O of their own. */
const PURE_PACKAGES = new Set(["papaparse", "seedrandom", "simple-statistics", "fast-xml-parser", "mathjs", "zod"]);

/** Where an import lands: a folder of the repo for local paths, the package name otherwise. */
function target(file: string, spec: string): { local: string } | { pkg: string } {
  if (spec.startsWith("@/")) return { local: resolve(ROOT, spec.slice(2)) };
  if (spec.startsWith(".")) return { local: resolve(dirname(file), spec) };
  const parts = spec.split("/");
  return { pkg: spec.startsWith("@") ? parts.slice(0, 2).join("/") : parts[0] };
}

const files = sourceFiles(SIM);

test("sim/ has source files to check", () => {
  assert.ok(files.length > 50, `only ${files.length} files found under sim/`);
});

test("sim/ imports only sim/, shared/ and pure packages", () => {
  const offences: string[] = [];
  let imports = 0;
  for (const file of files) {
    const info = ts.preProcessFile(readFileSync(file, "utf8"), true, true);
    for (const ref of info.importedFiles) {
      imports++;
      const where = target(file, ref.fileName);
      const name = relative(ROOT, file);
      if ("pkg" in where) {
        if (!PURE_PACKAGES.has(where.pkg)) offences.push(`${name} imports package ${ref.fileName}`);
      } else {
        const top = relative(ROOT, where.local).split(sep)[0];
        if (top !== "sim" && top !== "shared") offences.push(`${name} imports ${ref.fileName} (in ${top}/)`);
      }
    }
  }
  assert.ok(imports > 100, `only ${imports} imports seen: the scan is not reading the files`);
  assert.deepEqual(offences, []);
});

test("sim/ reads no clock, no global random source and no process state", () => {
  const forbidden = [
    /\bDate\.now\s*\(/,
    /\bnew Date\s*\(/,
    /\bMath\.random\s*\(/,
    /\bperformance\.now\s*\(/,
    /\bprocess\./,
  ];
  const offences: string[] = [];
  for (const file of files) {
    const lines = readFileSync(file, "utf8").split("\n");
    lines.forEach((line, i) => {
      const code = line.replace(/\/\/.*$/, "").replace(/^\s*\*.*$/, "");
      for (const re of forbidden) if (re.test(code)) offences.push(`${relative(ROOT, file)}:${i + 1}: ${line.trim()}`);
    });
  }
  assert.deepEqual(offences, []);
});

test("the check itself catches an import from the server", () => {
  const info = ts.preProcessFile(
    'import { pool } from "@/server/compute/pool";\nconst fs = await import("node:fs");',
    true,
    true,
  );
  const seen = info.importedFiles.map((r) => target(join(SIM, "x.ts"), r.fileName));
  assert.deepEqual(seen, [{ local: join(ROOT, "server/compute/pool") }, { pkg: "node:fs" }]);
});
