import { test } from "node:test";
import assert from "node:assert/strict";
import { XMLParser, XMLValidator } from "fast-xml-parser";
import { chartFileName, chartSvg } from "@/components/charts/svg-writer";
import type { ChartSpec } from "@/components/charts/chart-spec";
import { compareFilterSpec, filterCurveSpec, programPreviewSpec, stepRows } from "@/components/charts/specs";
import { lightPalette as LIGHT } from "@/components/theme/tokens";
import type { Comparison, RunSummary } from "@/shared/schemas/analysis";
import { wilson } from "@/sim/stats/wilson-interval";

const spec: ChartSpec = {
  title: "Filter curve <test> & co",
  description: "Three durations.",
  xLabel: "Input pulse duration (min, log scale)",
  yLabel: "Pass probability",
  rows: [
    { x: 1, p: 0.1, lo: 0.05, hi: 0.2 },
    { x: 10, p: null, lo: null, hi: null },
    { x: 100, p: 0.9, lo: 0.8, hi: 0.95 },
    { x: 50, p: 0.7, lo: 0.6, hi: 0.8 },
  ].sort((a, b) => a.x - b.x),
  layers: [
    { type: "band", lower: "lo", upper: "hi", color: "#0A6552", opacity: 0.2 },
    { type: "line", key: "p", color: "#0A6552", dashed: true },
    { type: "errorBars", lower: "lo", upper: "hi", color: "#0A6552" },
    { type: "points", key: "p", color: "#0A6552" },
  ],
  legend: [
    { label: "Pass fraction", color: "#0A6552" },
    { label: "Monotone estimate", color: "#0A6552", dashed: true },
  ],
  yDomain: [0, 1],
  logX: true,
  notes: ["No value at 10 min: not tried."],
};

const parse = (svg: string) => new XMLParser({ ignoreAttributes: false, attributeNamePrefix: "" }).parse(svg);
const texts = (svg: string) => [...svg.matchAll(/<text[^>]*>([^<]*)<\/text>/g)].map((m) => m[1]);

test("well-formed SVG with title, axis labels, legend, notes and the run's name and seed", () => {
  const { svg, width, height } = chartSvg(spec, { source: { name: "Tank sensor, hold", seed: "tank-7" } });
  assert.equal(XMLValidator.validate(svg), true);
  const doc = parse(svg);
  assert.equal(doc.svg.width, String(width));
  assert.equal(doc.svg.height, String(height));
  const t = texts(svg);
  assert.ok(t.includes("Filter curve &lt;test&gt; &amp; co"), "title, escaped");
  assert.ok(t.includes(spec.xLabel));
  assert.ok(t.includes(spec.yLabel));
  assert.ok(t.includes("Pass fraction") && t.includes("Monotone estimate"));
  assert.ok(t.includes("No value at 10 min: not tried."));
  assert.ok(t.some((s) => s.includes("Tank sensor, hold") && s.includes("seed tank-7")));
});

test("log axis ticks are 1, 2, 5, 10, ... and y ticks nice", () => {
  const t = texts(chartSvg(spec).svg);
  for (const label of ["1", "2", "5", "10", "20", "50", "100"]) assert.ok(t.includes(label), `x tick ${label}`);
  for (const label of ["0", "0.2", "0.4", "0.6", "0.8"]) assert.ok(t.includes(label), `y tick ${label}`);
  assert.ok(!t.includes("3.16") && !t.includes("31.6"));
});

test("a null value breaks lines and bands: no segment across it", () => {
  const { svg } = chartSvg(spec);
  const dashed = svg.match(/<path d="([^"]+)"[^>]*stroke-dasharray/);
  assert.ok(dashed);
  // 1 -> gap at 10 -> 50 -> 100: two subpaths.
  assert.equal(dashed[1].split("M").length - 1, 2);
  const bands = [...svg.matchAll(/<path d="([^"]+)" fill="#0A6552" fill-opacity="0.2"/g)];
  // The band before the gap has one row only (not drawn); after the gap one polygon.
  assert.equal(bands.length, 1);
  // Error bars and points at the three rows with data only.
  assert.equal((svg.match(/<circle /g) ?? []).length, 3);
});

test("positions come from the chart's own scales: 10 is the middle of a 1-100 log axis", () => {
  const s: ChartSpec = {
    ...spec,
    rows: [
      { x: 1, p: 0 },
      { x: 10, p: 0.5 },
      { x: 100, p: 1 },
    ],
    layers: [{ type: "points", key: "p", color: "#000" }],
    notes: [],
  };
  const { svg } = chartSvg(s, { width: 760 });
  const cx = [...svg.matchAll(/<circle cx="([\d.]+)" cy="([\d.]+)"/g)].map((m) => [Number(m[1]), Number(m[2])]);
  assert.equal(cx.length, 3);
  assert.ok(Math.abs(cx[1][0] - (cx[0][0] + cx[2][0]) / 2) < 0.02);
  assert.ok(Math.abs(cx[1][1] - (cx[0][1] + cx[2][1]) / 2) < 0.02);
  assert.ok(cx[0][1] > cx[2][1], "higher values are drawn higher up");
});

test("step rows hold the level until the next switch (no ramp from 0 to the first pulse)", () => {
  const rows = stepRows(
    [
      { t: 30, level: 1 },
      { t: 35, level: 0 },
    ],
    100,
  );
  assert.deepEqual(rows, [
    { x: 0, level: 0 },
    { x: 30, level: 1 },
    { x: 35, level: 0 },
    { x: 100, level: 0 },
  ]);
  const preview = programPreviewSpec(
    {
      switchTimes: [30, 35],
      levels: [1, 0],
      pulses: [{ on: 30, off: 35, level: 1 }],
      endTimeMinutes: 100,
      note: null,
    } as never,
    LIGHT,
  );
  assert.ok(preview.layers.every((l) => l.type !== "line" || l.curve === "stepAfter"));
  const { svg } = chartSvg(preview);
  const line = svg.match(/<path d="([^"]+)" fill="none"/);
  assert.ok(line && /H[\d.]+V/.test(line[1]), "drawn with horizontal then vertical moves");
  assert.doesNotMatch(line![1], /L/);
});

test("file names are slugs of the title and run name", () => {
  assert.equal(chartFileName(spec, { name: "Tank sensor, hold" }), "filter-curve-test-co_tank-sensor-hold");
});

const entry = (duration: number, passed: number, pulses: number) => ({
  duration,
  pulses,
  passed,
  passProbability: passed / pulses,
  ci: wilson(passed, pulses),
});

test("filter curve: points with Wilson intervals, no line through them, the monotone segment broken across a gap", () => {
  const summary = {
    byDuration: [entry(2, 1, 100), entry(5, 3, 100), entry(60, 95, 100), entry(80, 99, 100)],
    passCurveD50: { kind: "not-estimable", between: [5, 60], reason: "no durations between 5 and 60 min" },
    logistic: {
      converged: true,
      intercept: -10,
      slopePerLogMinute: 3,
      goodnessOfFit: { chiSquare: 1200, df: 2, pValue: 1e-12, poorFit: true },
    },
  } as unknown as RunSummary;
  const s = filterCurveSpec(summary, LIGHT);
  assert.ok(!s.layers.some((l) => l.type === "line" && l.key === "pass"), "no line through the points");
  assert.ok(s.layers.some((l) => l.type === "errorBars"));
  const mono = s.rows.filter((r) => r.x > 5 && r.x < 60).map((r) => r.mono);
  assert.ok(mono.length > 0 && mono.every((m) => m === null), "no monotone segment across 5-60 min");
  assert.ok(s.notes!.some((n) => /fits poorly/.test(n) && /p < 0.001/.test(n)));
  assert.ok(s.notes!.some((n) => /No d50: no durations between 5 and 60 min/.test(n)));
  assert.match(s.description, /2 min: 1% \(95% CI /);
  // The Wilson interval of 1 of 100 (Wilson 1927 score interval) is drawn as the error bar.
  const row = s.rows.find((r) => r.x === 2)!;
  assert.deepEqual([row.lo, row.hi], wilson(1, 100));
});

test("compare filter curves: a Wilson band per run, broken where a run did not try a duration", () => {
  const cmp = {
    runs: [
      { id: "a", name: "Hold" },
      { id: "b", name: "Direct" },
    ],
    filterCurves: [
      {
        duration: 1,
        runs: [
          { ...entry(1, 2, 50), fitted: null },
          { ...entry(1, 20, 50), fitted: null },
        ],
      },
      { duration: 10, runs: [{ ...entry(10, 30, 50), fitted: null }, null] },
      {
        duration: 40,
        runs: [
          { ...entry(40, 49, 50), fitted: null },
          { ...entry(40, 50, 50), fitted: null },
        ],
      },
    ],
  } as unknown as Comparison;
  const s = compareFilterSpec(cmp, LIGHT);
  assert.equal(s.layers.filter((l) => l.type === "band").length, 2);
  assert.equal(s.rows[1].p1, null);
  assert.equal(s.rows[1].lo1, null);
  assert.ok(s.notes!.some((n) => /Direct did not try 10 min/.test(n)));
});
