/**
 * One number format across the app (docs/metrics.md, "How numbers are written"):
 * every figure a screen shows goes through shared/number-format.ts. This test
 * reads every source file under app/ and components/ and fails on a number
 * formatted by hand: toFixed / toPrecision / toExponential, toLocaleString on a
 * number, a percent or unit glued onto formatNumber(...) (use formatProbability
 * or formatQuantity), a value times 100 written as a percent, or a bare
 * String(count) in a table cell or stat card. The few places that format
 * numbers that are not figures (chart coordinates, dates) are listed below with
 * the reason.
 */
import { test } from "node:test";
import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import { join, relative, resolve } from "node:path";
import { sourceFiles } from "@/tests/helpers/source-files";

const ROOT = resolve(__dirname, "../..");
const files = [...sourceFiles(join(ROOT, "app")), ...sourceFiles(join(ROOT, "components"))];

/** file -> rule names allowed there, with the reason. */
const ALLOWED: Record<string, { rules: string[]; why: string }> = {
  "components/charts/ticks.ts": { rules: ["toPrecision"], why: "snaps tick positions to 12 digits (not shown)" },
  "components/charts/svg-writer.ts": {
    rules: ["times100"],
    why: "rounds SVG coordinates to 2 decimals; its labels come from the spec (number-format)",
  },
  "components/charts/specs.ts": {
    rules: ["times100"],
    why: "groups pulse durations rounded to 0.01 min for the input chart's description (written with formatQuantity)",
  },
  "components/forms/circuit-editor.tsx": {
    rules: ["bareString"],
    why: "the text of an editable number field is the user's own number, not a figure",
  },
  "components/ui/progress-bar.tsx": {
    rules: ["times100", "percentSuffix"],
    why: "a bar width in CSS percent and aria-valuenow (an integer percent, as ARIA asks)",
  },
};

/** A date's own toLocaleString (dates are not figures): "new Date(x).toLocaleString(", or a name ending in Date / At. */
const DATE_LOCALE = /(new Date\([^)]*\)|\b\w*(Date|At)|\bdate)\.toLocale(Date|Time)?String\(/;

const RULES: { name: string; re: RegExp; skip?: (line: string) => boolean; hint: string }[] = [
  { name: "toFixed", re: /\.toFixed\(/, hint: "formatNumber / formatQuantity" },
  { name: "toPrecision", re: /\.toPrecision\(/, hint: "formatNumber(v, sig)" },
  { name: "toExponential", re: /\.toExponential\(/, hint: "formatScientific" },
  {
    name: "toLocaleString",
    re: /\.toLocaleString\(/,
    skip: (l) => DATE_LOCALE.test(l),
    hint: "formatCount / formatNumber",
  },
  {
    name: "unitAfterFormatNumber",
    re: /formatNumber\((?:[^()]|\([^()]*\))*\)\}\s?(min|minutes|s|h|molecules|%|×|kB|MB)\b/,
    hint: "formatQuantity(v, unit) / formatProbability / formatFactor",
  },
  {
    name: "unitAfterFormatNumber",
    re: /formatNumber\((?:[^()]|\([^()]*\))*\)\}\s?(%|×)/,
    hint: "formatProbability / formatFactor",
  },
  { name: "times100", re: /\*\s*100\b/, hint: "formatProbability(p)" },
  { name: "percentSuffix", re: /\}%/, hint: "formatProbability(p)" },
  { name: "eNotation", re: /["'`][^"'`]*\de-\d/, hint: "formatScientific" },
  {
    name: "bareString",
    re: /(render: \(\w+\) => String\(|value=\{String\(|detail=\{String\()/,
    hint: "formatCount(n) / formatNumber(v)",
  },
];

test("the scan reads the screens", () => {
  assert.ok(files.length > 80, `only ${files.length} files under app/ and components/`);
  assert.ok(
    files.some((f) => readFileSync(f, "utf8").includes("@/shared/number-format")),
    "no screen imports shared/number-format",
  );
});

test("no screen formats a number by hand: every figure goes through shared/number-format.ts", () => {
  const offences: string[] = [];
  for (const file of files) {
    const name = relative(ROOT, file);
    const allowed = ALLOWED[name]?.rules ?? [];
    readFileSync(file, "utf8")
      .split("\n")
      .forEach((line, i) => {
        if (/^\s*(\/\/|\*|\/\*)/.test(line)) return; // comments
        for (const r of RULES) {
          if (allowed.includes(r.name) || !r.re.test(line) || r.skip?.(line)) continue;
          offences.push(`${name}:${i + 1} ${r.name} (use ${r.hint}): ${line.trim().slice(0, 120)}`);
        }
      });
  }
  assert.deepEqual(offences, []);
});

test("the rules catch what they are meant to catch", () => {
  const hit = (line: string) => RULES.filter((r) => r.re.test(line) && !r.skip?.(line)).map((r) => r.name);
  assert.deepEqual(hit("return `${(s / 3600).toFixed(1)} h`;"), ["toFixed"]);
  assert.deepEqual(hit("value={n.toLocaleString('en')}"), ["toLocaleString"]);
  assert.deepEqual(hit("{new Date(v.createdAt).toLocaleString('en-GB')}"), []);
  assert.deepEqual(hit("{startedAt.toLocaleString('en-GB')}"), []);
  assert.deepEqual(hit("{p.replicatesDone.toLocaleString('en')} of"), ["toLocaleString"]);
  assert.ok(hit("`false pass ${formatNumber(h.rate * 100)}%`").includes("times100"));
  assert.ok(hit("`d50 ${formatNumber(h.d50)} min`").includes("unitAfterFormatNumber"));
  assert.deepEqual(hit("`d50 ${formatQuantity(h.d50, 'min')}`"), []);
  assert.deepEqual(hit("render: (r) => String(r.points) },"), ["bareString"]);
  assert.deepEqual(hit("const x = '4.78e-4%'"), ["eNotation"]);
});
