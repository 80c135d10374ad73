/**
 * The run exports follow one rule and match their data dictionary
 * (datapackage.json, Frictionless Data Package / Table Schema): each CSV parsed
 * with papaparse has exactly the listed columns, snake_case with the unit in
 * the name, booleans true/false, one observation per row, no packed cells;
 * output pulse widths are their own long table.
 */
import { test, describe } from "node:test";
import assert from "node:assert/strict";
import type { PulseStat } from "@/shared/schemas/run-spec";
import {
  byDurationCsv,
  outputPulsesCsv,
  pulseStatsCsv,
  replicateStatsCsv,
  runDataPackage,
  runSettingsBlock,
  summarizeRun,
  summaryCsv,
  HEADLINE_METRICS,
} from "@/sim/analysis";
import { RunSpecSchema } from "@/shared/schemas/run-spec";
import { resolveThreshold, templates } from "@/sim";
import { checkCsvAgainstResource } from "@/tests/helpers/check-export";

const threshold = { theta: 20, downTheta: 16, hysteresis: 0.2, windowMinutes: 30, outputLifetimeMinutes: 10 };

/** 6 replicates x 3 durations; long pulses make two output pulses, one replicate's first pulse is excluded. */
function records(): PulseStat[] {
  const out: PulseStat[] = [];
  for (let r = 0; r < 6; r++)
    [2, 10, 40].forEach((d, i) => {
      const on = 50 + 200 * i;
      const pass = d >= 10 || r === 0;
      out.push({
        replicate: r,
        pulseIndex: i,
        on,
        off: on + d,
        durationBin: d,
        excluded: r === 5 && i === 0,
        passed: pass,
        delay: pass ? 3 + r : null,
        offDelay: pass ? 2 : null,
        widths: d === 40 ? [30 + r, 4] : pass ? [d] : [],
        peak: pass ? 40 : 5,
        timeToPeak: d / 2,
        fwhm: pass ? d : null,
        baseline: 1,
      });
    });
  return out;
}
const replicates = Array.from({ length: 6 }, (_, r) => ({
  replicate: r,
  events: 500 + r,
  capped: r === 2,
  outputMean: r === 4 ? NaN : 12,
  outputVar: r === 4 ? NaN : 15,
}));

describe("run exports and their dictionary", () => {
  const spec = RunSpecSchema.parse({
    circuit: templates.simple.circuit,
    inputSignal: templates.simple.inputSignal,
    program: { kind: "periodic", start: 50, onDuration: 60, offDuration: 140 },
    endTimeMinutes: 600,
    gridStepMinutes: 2,
    replicates: 6,
    seed: "exports",
    method: "tauLeap",
  });
  const settings = runSettingsBlock(spec, resolveThreshold(spec));
  const pulses = records();
  const summary = summarizeRun({ pulses, replicates, threshold, noiseDurationMinutes: 5, settings });
  const pkg = runDataPackage({ title: "Tank sensor: ladder #3", filePrefix: "Tank-sensor-ladder-3", settings });
  const resource = (name: string) => pkg.resources.find((r) => r.name === name)!;

  test("a tabular data package naming the downloads; settings and the method label at the top", () => {
    assert.equal(pkg.profile, "tabular-data-package");
    assert.match(pkg.name, /^[a-z0-9._-]+$/);
    assert.deepEqual(
      pkg.resources.map((r) => r.path),
      ["pulses", "output-pulses", "replicates", "aggregates", "headline"].map((f) => `Tank-sensor-ladder-3-${f}.csv`),
    );
    assert.equal(pkg.method!.accuracy, "approximate");
    assert.match(pkg.method!.label, /^Approximate: tau-leaping/);
    assert.equal(pkg.settings!.seed, "exports");
  });

  test("pulses.csv: one row per (replicate, input pulse), no widths cell", () => {
    const rows = checkCsvAgainstResource(pulseStatsCsv(pulses), resource("pulses"), { minRows: 18 });
    assert.equal(rows.length, 18);
    assert.ok(!("widths" in rows[0]));
    const ex = rows.find((r) => r.replicate === "5" && r.pulse_index === "0")!;
    assert.equal(ex.excluded, "true");
    assert.equal(rows.find((r) => r.replicate === "1" && r.pulse_index === "0")!.delay_min, "", "censored = empty");
  });

  test("output-pulses.csv: one row per output pulse, keyed to its input pulse", () => {
    const rows = checkCsvAgainstResource(outputPulsesCsv(pulses), resource("output-pulses"));
    assert.equal(
      rows.length,
      pulses.reduce((n, p) => n + p.widths.length, 0),
    );
    const keys = new Set(pulses.map((p) => `${p.replicate}|${p.pulseIndex}`));
    for (const r of rows) assert.ok(keys.has(`${r.replicate}|${r.pulse_index}`));
    assert.deepEqual(
      rows.filter((r) => r.replicate === "3" && r.pulse_index === "2").map((r) => [r.output_pulse_index, r.width_min]),
      [
        ["0", "33"],
        ["1", "4"],
      ],
    );
  });

  test("replicates.csv, aggregates.csv and headline.csv load as their dictionary says", () => {
    const reps = checkCsvAgainstResource(replicateStatsCsv(pulses, replicates), resource("replicates"), { minRows: 6 });
    assert.equal(reps[2].capped, "true");
    assert.equal(reps[4].output_mean_molecules, "", "unknown = empty");
    const agg = checkCsvAgainstResource(byDurationCsv(summary), resource("aggregates"), { minRows: 3 });
    assert.deepEqual(
      agg.map((r) => r.median_delay_status),
      ["not-reached", "estimate", "estimate"],
    );
    const head = checkCsvAgainstResource(summaryCsv(summary), resource("headline"));
    assert.deepEqual(
      head.map((r) => r.metric),
      HEADLINE_METRICS.map((m) => m.metric),
    );
    assert.deepEqual(
      resource("headline").metrics!.map((m) => m.name),
      head.map((r) => r.metric),
    );
    // units in the unit column agree with the metric names' suffixes
    for (const r of head) if (r.metric.endsWith("_min")) assert.equal(r.unit, "min", r.metric);
    // settings are not rows of the headline table
    assert.ok(!head.some((r) => /threshold|hysteresis|window|method/.test(r.metric)));
  });
});
