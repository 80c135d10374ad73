import { test, describe } from "node:test";
import assert from "node:assert/strict";
import Papa from "papaparse";
import type { PulseStat } from "@/shared/schemas/run-spec";
import { RunSummarySchema, ComparisonSchema } from "@/shared/schemas/analysis";
import {
  summarizeRun,
  compareRuns,
  delaysOf,
  widthsOf,
  windowEnds,
  pulseStatsCsv,
  replicateStatsCsv,
  byDurationCsv,
  summaryCsv,
  wilson,
} from "@/sim/analysis";
import { kaplanMeier, kmQuantile } from "@/sim/stats";
import { assertCloseTo } from "@/tests/helpers/close-to";

const threshold = { theta: 20, downTheta: 16, hysteresis: 0.2, windowMinutes: 30, outputLifetimeMinutes: 10 };

/** Hand-built pulse records: durations 1..40 min, 20 replicates, pass rule fixed per (replicate, duration). */
function records(shift = 0): PulseStat[] {
  const out: PulseStat[] = [];
  for (let r = 0; r < 20; r++) {
    [1, 2, 5, 10, 20, 40].forEach((d, i) => {
      const on = i * 200;
      const pass = d >= 10 || (d === 5 && r % 2 === 0) || (d === 2 && r % 7 === 0);
      out.push({
        replicate: r,
        pulseIndex: i,
        on,
        off: on + d,
        durationBin: d,
        excluded: r === 3 && i === 2,
        passed: pass,
        delay: pass ? 4 + (r % 5) + shift : null,
        offDelay: pass ? 1 : null,
        widths: pass ? [d + shift] : [],
        peak: pass ? 50 : 10,
        timeToPeak: d,
        fwhm: pass ? d : null,
        baseline: 2,
      });
    });
  }
  return out;
}
const replicates = Array.from({ length: 20 }, (_, r) => ({
  replicate: r,
  events: 1000 + r,
  capped: r === 0,
  outputMean: 40 + (r % 2),
  outputVar: 60,
}));

describe("summarizeRun", () => {
  const pulses = records();
  const s = summarizeRun({ pulses, replicates, threshold, noiseDurationMinutes: 10 });

  test("the result parses with the shared schema and the CLI fields are present", () => {
    RunSummarySchema.parse(s);
    for (const key of ["byDuration", "d50", "d50Note", "falsePassRate", "threshold"]) assert.ok(key in s, key);
    assert.deepEqual(
      s.byDuration.map((e) => e.duration),
      [1, 2, 5, 10, 20, 40],
    );
  });

  test("byDuration counts evaluable pairs, Wilson intervals, excluded apart", () => {
    const five = s.byDuration.find((e) => e.duration === 5)!;
    // replicate 3's 5-min pulse is excluded; of the other 19, the even replicates pass (10)
    assert.equal(five.pulses, 19);
    assert.equal(five.excluded, 1);
    assert.equal(five.passed, 10);
    assertCloseTo(five.passProbability!, 10 / 19, { abs: 1e-15 });
    assert.deepEqual(five.ci, wilson(10, 19));
    assert.equal(s.counts.excluded, 1);
    assert.equal(s.counts.evaluable, 119);
  });

  test("median delay respects censoring: equals a direct Kaplan-Meier on the same observations", () => {
    const ends = windowEnds(pulses, threshold.windowMinutes);
    const five = pulses
      .map((p, i) => ({ p, end: ends[i] }))
      .filter(({ p }) => p.durationBin === 5 && !p.excluded)
      .map(({ p, end }) => (p.delay !== null ? { time: p.delay, event: true } : { time: end - p.on, event: false }));
    assert.equal(s.byDuration.find((e) => e.duration === 5)!.medianDelay, kmQuantile(kaplanMeier(five), 0.5));
    // 10-min pulses all pass with delays 4..8 (4 of each): median 6
    assert.equal(s.byDuration.find((e) => e.duration === 10)!.medianDelay, 6);
    // 1-min pulses never pass: median not reached
    assert.equal(s.byDuration[0].medianDelay, null);
    // censoring times: window closes at off + 30 (next pulse 200 min later)
    assert.equal(ends[0], pulses[0].off + 30);
  });

  test("false-pass rate pools durations below the noise duration; d50 from the monotone pass curve", () => {
    // durations 1, 2, 5 < 10: (0 + 3 + 10) of (20 + 20 + 19)
    assertCloseTo(s.falsePassRate!, 13 / 59, { abs: 1e-15 });
    assert.deepEqual(s.falsePass!.ci, wilson(13, 59));
    // monotone curve 0/20, 3/20, 10/19, 1 (already monotone): log interpolation between 2 and 5 min
    const t = (0.5 - 3 / 20) / (10 / 19 - 3 / 20);
    assertCloseTo(s.d50!, Math.exp(Math.log(2) + t * Math.log(5 / 2)), { rel: 1e-12 });
    assert.equal(s.passCurveD50.kind, "estimate");
    // Wilson 95%: 3/20 is surely below 50%, 20/20 surely above, 10/19 neither: interval [2, 10] min
    assert.deepEqual(s.d50Ci, [2, 10]);
    assert.equal(s.d50Note, null);
    const none = summarizeRun({
      pulses: pulses.filter((p) => p.durationBin >= 10),
      replicates,
      threshold,
      noiseDurationMinutes: 10,
    });
    assert.equal(none.falsePassRate, null);
    assert.equal(none.falsePass, null);
    assert.equal(none.d50, null);
    assert.equal(none.passCurveD50.kind, "not-bracketed");
    assert.match(none.d50Note!, /Already 100% passed at the shortest tried duration, 10 min/);
  });

  test("delay cost, noise (law of total variance), notes", () => {
    assert.equal(s.delayCost!.minDurationMinutes, 30);
    assert.deepEqual(s.delayCost!.durations, [40]);
    assert.equal(s.delayCost!.medianDelay, 6);
    // means alternate 40 / 41 -> mean 40.5, between-variance 0.25; within 60
    assertCloseTo(s.noise.meanOutput!, 40.5, { abs: 1e-12 });
    assertCloseTo(s.noise.variance!, 60.25, { abs: 1e-12 });
    assertCloseTo(s.noise.fano!, 60.25 / 40.5, { abs: 1e-12 });
    assert.equal(s.counts.cappedReplicates, 1);
    assert.ok(s.notes.some((n) => /event cap/.test(n)));
    assert.equal(s.pulseGeneration.fwhmNotMeasurable, s.counts.evaluable - s.counts.passed);
  });

  test("deterministic: same input, same bytes", () => {
    const again = summarizeRun({ pulses: records(), replicates, threshold, noiseDurationMinutes: 10 });
    assert.equal(JSON.stringify(again), JSON.stringify(s));
  });
});

describe("compareRuns", () => {
  const a = records();
  const b = records(20); // same pass pattern, delays and widths 20 min longer
  const sa = summarizeRun({ pulses: a, replicates, threshold, noiseDurationMinutes: 10 });
  const sb = summarizeRun({ pulses: b, replicates, threshold, noiseDurationMinutes: 10 });
  const cmp = compareRuns([
    { id: "a", name: "Hold", summary: sa, delays: delaysOf(a), widths: widthsOf(a) },
    { id: "b", name: "Slow hold", summary: sb, delays: delaysOf(b), widths: widthsOf(b) },
    { id: "c", name: "Hold again", summary: sa, delays: delaysOf(a), widths: widthsOf(a) },
  ]);

  test("schema, pairs, Holm within families", () => {
    ComparisonSchema.parse(cmp);
    assert.equal(cmp.pairs.length, 3);
    assert.deepEqual(
      cmp.pairs.map((p) => [p.a, p.b]),
      [
        ["a", "b"],
        ["a", "c"],
        ["b", "c"],
      ],
    );
    for (const p of cmp.pairs) assert.ok(p.delays.ks!.pHolm >= p.delays.ks!.pValue);
  });

  test("a shifted run differs beyond noise, an identical run is within noise", () => {
    const ab = cmp.pairs[0];
    const ac = cmp.pairs[1];
    assert.equal(ab.delays.withinNoise, false);
    assert.ok(ab.delays.mannWhitney!.rankBiserial < 0, "b responds later");
    assert.equal(ab.widths.withinNoise, false);
    assert.equal(ac.delays.withinNoise, true);
    assert.equal(ac.delays.ks!.d, 0);
    assert.ok(ac.flags.some((f) => /differ by no more than noise/.test(f)));
    assert.ok(ab.flags.some((f) => /Slow hold tends to be later/.test(f)));
    // pass patterns are identical: within noise at every duration
    assert.ok(ab.passDifferences.every((d) => d.withinNoise && d.difference === 0));
  });

  test("filter curves side by side and shared histogram bins", () => {
    assert.deepEqual(cmp.durations, [1, 2, 5, 10, 20, 40]);
    assert.equal(cmp.filterCurves[2].runs[0]!.passed, 10);
    assert.equal(cmp.distributions.delays.runs[0].counts.length, cmp.distributions.delays.edges.length - 1);
    const censoredA = delaysOf(a).filter((d) => d === null).length;
    assert.equal(cmp.distributions.delays.runs[0].censored, censoredA);
    assert.throws(() => compareRuns([cmp as never]));
  });
});

describe("CSV exports", () => {
  const pulses = records();
  const s = summarizeRun({ pulses, replicates, threshold, noiseDurationMinutes: 10 });
  test("parse back with the same rows and empty cells for nulls", () => {
    const per = Papa.parse<Record<string, string>>(pulseStatsCsv(pulses), { header: true, skipEmptyLines: true }).data;
    assert.equal(per.length, pulses.length);
    assert.equal(per[0].delay_min, "");
    const reps = Papa.parse<Record<string, string>>(replicateStatsCsv(pulses, replicates), {
      header: true,
      skipEmptyLines: true,
    }).data;
    assert.equal(reps.length, 20);
    assert.equal(Number(reps[3].excluded_pulses), 1);
    const agg = Papa.parse<Record<string, string>>(byDurationCsv(s), { header: true, skipEmptyLines: true }).data;
    assert.deepEqual(
      agg.map((r) => Number(r.duration_min)),
      [1, 2, 5, 10, 20, 40],
    );
    assert.equal(Number(agg[2].passed), 10);
    const head = Papa.parse<string[]>(summaryCsv(s), { skipEmptyLines: true }).data;
    assert.deepEqual(head[0], ["metric", "value", "unit"]);
    assert.ok(head.some((r) => r[0] === "false_pass_rate" && Math.abs(Number(r[1]) - 13 / 59) < 1e-12));
  });
});

test("replicates without output moments are remarked on, except for measured traces", () => {
  const noMoments = replicates.map((r) => ({ ...r, capped: false, outputMean: NaN, outputVar: NaN }));
  const simulated = summarizeRun({ pulses: records(), replicates: noMoments, threshold, noiseDurationMinutes: 10 });
  assert.ok(simulated.notes.some((n) => /no steady-state output moments/.test(n)));
  assert.equal(simulated.noise.fano, null);
  const traces = summarizeRun({
    pulses: records(),
    replicates: noMoments,
    threshold,
    noiseDurationMinutes: 10,
    measuredTraces: true,
  });
  assert.ok(!traces.notes.some((n) => /output moments/.test(n)));
});
