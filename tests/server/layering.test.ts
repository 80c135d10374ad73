/**
 * The import structure stays layered: services and the compute pipeline never import
 * routes or middleware, shared/ imports only shared/, and no module of server/, sim/,
 * shared/ or db/ imports itself through a circle at run time. Imports are read with TypeScript's
 * pre-processor, so a new file is checked without touching this test.
 */
import { test } from "node:test";
import assert from "node:assert/strict";
import { existsSync, readFileSync, statSync } from "node:fs";
import { dirname, join, relative, resolve } from "node:path";
import ts from "typescript";
import { sourceFiles } from "@/tests/helpers/source-files";

const ROOT = resolve(__dirname, "../..");
const TOPS = ["server", "sim", "shared", "db"];

/** The repo file an import names, or null for a package. */
function resolveImport(from: string, spec: string): string | null {
  const base = spec.startsWith("@/")
    ? resolve(ROOT, spec.slice(2))
    : spec.startsWith(".")
      ? resolve(dirname(from), spec)
      : null;
  if (!base) return null;
  for (const cand of [base, `${base}.ts`, `${base}.tsx`, join(base, "index.ts")])
    if (existsSync(cand) && statSync(cand).isFile()) return cand;
  return null;
}

/** Imports that exist at run time: `import type` and `export type ... from` are left out (they vanish when compiled). */
function runtimeImports(file: string): string[] {
  const src = ts.createSourceFile(file, readFileSync(file, "utf8"), ts.ScriptTarget.Latest, false);
  const out: string[] = [];
  const walk = (node: ts.Node) => {
    if (ts.isImportDeclaration(node) && !node.importClause?.isTypeOnly && ts.isStringLiteral(node.moduleSpecifier))
      out.push(node.moduleSpecifier.text);
    else if (
      ts.isExportDeclaration(node) &&
      !node.isTypeOnly &&
      node.moduleSpecifier &&
      ts.isStringLiteral(node.moduleSpecifier)
    )
      out.push(node.moduleSpecifier.text);
    else if (ts.isCallExpression(node) && node.expression.kind === ts.SyntaxKind.ImportKeyword) {
      const a = node.arguments[0];
      if (a && ts.isStringLiteral(a)) out.push(a.text);
    }
    ts.forEachChild(node, walk);
  };
  walk(src);
  return out;
}

const files = TOPS.flatMap((t) => sourceFiles(join(ROOT, t)));
/** Every local import, type-only ones included (for the layering rule). */
const graph = new Map<string, string[]>();
/** Run-time local imports only (for circles). */
const runtime = new Map<string, string[]>();
for (const f of files) {
  const info = ts.preProcessFile(readFileSync(f, "utf8"), true, true);
  const local = (specs: string[]) => specs.map((s) => resolveImport(f, s)).filter((x): x is string => x !== null);
  graph.set(f, local(info.importedFiles.map((r) => r.fileName)));
  runtime.set(f, local(runtimeImports(f)));
}
const rel = (f: string) => relative(ROOT, f);

test("the import graph was read", () => {
  const edges = [...graph.values()].reduce((a, b) => a + b.length, 0);
  assert.ok(files.length > 100 && edges > 300, `${files.length} files, ${edges} local imports`);
});

test("services and the compute pipeline import no routes or middleware; shared/ imports only shared/", () => {
  const offences: string[] = [];
  for (const [f, deps] of graph) {
    const from = rel(f);
    for (const d of deps.map(rel)) {
      if (/^server\/(services|compute)\//.test(from) && /^server\/(routes|middleware)\//.test(d))
        offences.push(`${from} -> ${d}`);
      if (from.startsWith("shared/") && !d.startsWith("shared/")) offences.push(`${from} -> ${d}`);
    }
  }
  assert.deepEqual(offences, []);
});

test("no import circles at run time (type-only imports aside)", () => {
  const state = new Map<string, "open" | "done">();
  const circles: string[] = [];
  const stack: string[] = [];
  const visit = (f: string) => {
    state.set(f, "open");
    stack.push(f);
    for (const d of runtime.get(f) ?? []) {
      if (!runtime.has(d)) continue;
      if (state.get(d) === "open") circles.push([...stack.slice(stack.indexOf(d)), d].map(rel).join(" -> "));
      else if (!state.has(d)) visit(d);
    }
    stack.pop();
    state.set(f, "done");
  };
  for (const f of runtime.keys()) if (!state.has(f)) visit(f);
  assert.deepEqual(circles, []);
});
