/**
 * The summary and the per-replicate figures from pulse records held as columns
 * (sim/analysis/pulse-table.ts, what the server's finalising thread keeps) equal,
 * byte for byte, the record-based code they replaced (kept frozen in
 * tests/helpers/summary-by-records.ts), on runs with every kind of pulse record:
 * responded and censored, no response, passed with the OFF delay censored,
 * several pulses per replicate, replicates with no pulse at all, excluded pulses,
 * widths from none to several, durations differing by round-off only, and
 * records in any order; and so does the summary fed a few replicates at a time
 * (createRunSummaryBuilder, what the finalising thread does with each chunk).
 */
import { test } from "node:test";
import assert from "node:assert/strict";
import { simulateChunk, templates } from "@/sim";
import { createRunSummaryBuilder, summarizeRun, type SummarizeRunInput } from "@/sim/analysis/summarize-run";
import { createPulseTableBuilder, pulseTable } from "@/sim/analysis/pulse-table";
import { replicateFigures } from "@/sim/regimes/replicate-figures";
import { resolveThreshold } from "@/sim/engine/resolve-threshold";
import { packPulseStats } from "@/sim/engine/pulse-columns";
import { pulseAsStored } from "@/server/compute/run-store";
import { RunSpecSchema, type PulseStat, type RunSpec } from "@/shared/schemas/run-spec";
import { replicateFiguresByRecords, summarizeRunByRecords } from "@/tests/helpers/summary-by-records";

function spec(program: unknown, over: Record<string, unknown> = {}): RunSpec {
  const t = templates["c1ffl-and"];
  return RunSpecSchema.parse({
    circuit: t.circuit,
    program,
    inputSignal: t.inputSignal,
    endTimeMinutes: 400,
    gridStepMinutes: 5,
    replicates: 120,
    seed: "pulse-table",
    ...over,
  });
}

function simulated(s: RunSpec) {
  const r = simulateChunk(s, 0, s.replicates, { trajectoryReplicates: 0 });
  const pulses = r.pulses.map(pulseAsStored);
  pulses.sort((a, b) => a.replicate - b.replicate || a.pulseIndex - b.pulseIndex);
  const replicates = r.replicates.map((x) => ({ ...x }));
  return { pulses, replicates, threshold: resolveThreshold(s) };
}

/** Every way of passing the same records, against the frozen record-based code. */
function assertSameEverywhere(input: SummarizeRunInput & { pulses: PulseStat[] }, longMinutes: number | null) {
  const reference = summarizeRunByRecords(input);
  const fromRecords = summarizeRun(input);
  const table = pulseTable(input.pulses);
  const fromTable = summarizeRun({ ...input, pulses: table });
  // grown a few records at a time, as the finalising thread does with chunks
  const b = createPulseTableBuilder();
  for (let i = 0; i < input.pulses.length; i += 7) b.append(packPulseStats(input.pulses.slice(i, i + 7)));
  const fromChunks = summarizeRun({ ...input, pulses: b.table() });
  // the builder fed whole replicates at a time: one, seven and a varying number of replicates per chunk
  const cuts = [0];
  for (let i = 1; i < table.length; i++) if (input.pulses[i].replicate !== input.pulses[i - 1].replicate) cuts.push(i);
  cuts.push(table.length);
  const built = [1, 7, 0].map((every) => {
    const summary = createRunSummaryBuilder({
      windowMinutes: input.threshold.windowMinutes,
      endTimeMinutes: input.endTimeMinutes ?? Infinity,
    });
    for (let k = 0, step = 1; k < cuts.length - 1; k += step) {
      step = every || 1 + (k % 5);
      summary.add(table, cuts[k], cuts[Math.min(k + step, cuts.length - 1)]);
    }
    return summary.finish(input);
  });
  for (const s of [fromRecords, fromTable, fromChunks, ...built]) {
    assert.deepStrictEqual(s, reference); // Object.is on numbers: -0 and 0 differ
    assert.equal(JSON.stringify(s), JSON.stringify(reference));
  }
  const figures = replicateFiguresByRecords(input.pulses, { longMinutes });
  assert.deepStrictEqual(replicateFigures(input.pulses, { longMinutes }), figures);
  assert.deepStrictEqual(replicateFigures(table, { longMinutes }), figures);
  assert.deepStrictEqual(replicateFigures(input.pulses, { longMinutes, maxReplicates: 5 }), {
    ...replicateFiguresByRecords(input.pulses, { longMinutes, maxReplicates: 5 }),
  });
  return reference;
}

test("column-based summary equals the record-based one", async (t) => {
  await t.test("random trains per replicate: some replicates with no pulse, several with many", () => {
    const s = spec(
      {
        kind: "random",
        start: 30,
        meanInterval: 150,
        durations: { dist: "exponential", mean: 12 },
        perReplicate: true,
      },
      { seed: "pulse-table-random" },
    );
    const { pulses, replicates, threshold } = simulated(s);
    const perReplicate = new Map<number, number>();
    for (const p of pulses) perReplicate.set(p.replicate, (perReplicate.get(p.replicate) ?? 0) + 1);
    assert.ok(perReplicate.size < replicates.length, "some replicate had no pulse");
    assert.ok(
      [...perReplicate.values()].some((n) => n >= 3),
      "some replicate had several pulses",
    );
    assert.ok(
      pulses.some((p) => p.delay === null && !p.excluded),
      "some pulse had no response",
    );
    assert.ok(
      pulses.some((p) => p.delay !== null),
      "some pulse responded",
    );
    const summary = assertSameEverywhere(
      { pulses, replicates, threshold, noiseDurationMinutes: 10, endTimeMinutes: s.endTimeMinutes },
      30,
    );
    assert.ok(summary.byDuration.length > 5);
    // the records in another order take the other way to each pulse's next pulse: still the same bytes
    const shuffled = pulses.slice().reverse();
    assertSameEverywhere(
      { pulses: shuffled, replicates, threshold, noiseDurationMinutes: 10, endTimeMinutes: s.endTimeMinutes },
      30,
    );
  });

  await t.test("a ladder cut by the end of the path: windows closed by the end, OFF delays censored", () => {
    const s = spec(
      { kind: "ladder", start: 20, durations: [2, 5, 15.8, 40, 90], repeats: 2, gap: 30 },
      { endTimeMinutes: 420, seed: "pulse-table-ladder" },
    );
    const { pulses, replicates, threshold } = simulated(s);
    assert.ok(
      pulses.some((p) => p.passed && p.offDelay === null),
      "some OFF delay censored",
    );
    assert.ok(pulses.some((p) => p.widths.length === 0) && pulses.some((p) => p.widths.length >= 1));
    assertSameEverywhere(
      { pulses, replicates, threshold, noiseDurationMinutes: 10, endTimeMinutes: s.endTimeMinutes },
      40,
    );
  });

  await t.test("records of every kind, edited by hand from simulated ones", () => {
    const s = spec({ kind: "ladder", start: 20, durations: [5, 60], repeats: 2, gap: 80 });
    const { pulses, replicates, threshold } = simulated(s);
    const edited = pulses.map((p, i): PulseStat => {
      switch (i % 6) {
        case 0:
          return { ...p, excluded: true };
        case 1:
          // a duration differing from another by round-off only
          return { ...p, durationBin: p.durationBin === 5 ? 4.999999999999998 : p.durationBin };
        case 2:
          return { ...p, fwhm: null, widths: i % 12 === 2 ? [0, -0, 1.5] : [1.5, 0.25, 3] };
        case 3:
          return { ...p, delay: null, passed: false, offDelay: null, widths: [] };
        case 4:
          return { ...p, delay: p.delay === null ? null : Math.round(p.delay) }; // ties in delay times
        default:
          return p;
      }
    });
    assertSameEverywhere({ pulses: edited, replicates, threshold, noiseDurationMinutes: 10 }, null);
    // and with no pulse at all
    assertSameEverywhere({ pulses: [], replicates, threshold, noiseDurationMinutes: 10 }, null);
  });
});

test("the summary fed a chunk at a time fails as summarizeRun does, and only once", () => {
  const s = spec({ kind: "ladder", start: 20, durations: [5, 60], repeats: 2, gap: 80 });
  const { pulses, replicates, threshold } = simulated(s);
  const input = { replicates, threshold, noiseDurationMinutes: 10, endTimeMinutes: s.endTimeMinutes };
  const built = (records: PulseStat[]) => {
    const b = createRunSummaryBuilder({ windowMinutes: threshold.windowMinutes, endTimeMinutes: s.endTimeMinutes });
    const t = pulseTable(records);
    const half = records.findIndex((p) => p.replicate >= replicates.length / 2);
    b.add(t, 0, half);
    b.add(t, half, t.length);
    return b.finish(input);
  };
  // a peak that is not a number (only an engine bug would make one) and a delay that is not finite
  const badPeak = pulses.map((p, i) => (i === 3 ? { ...p, excluded: false, peak: NaN } : p));
  assert.throws(() => summarizeRun({ ...input, pulses: badPeak }), /sample contains NaN/);
  assert.throws(() => built(badPeak), /sample contains NaN/);
  const badDelay = pulses.map((p, i) => (i === 3 ? { ...p, excluded: false, delay: Infinity } : p));
  assert.throws(() => summarizeRun({ ...input, pulses: badDelay }), /times must be finite/);
  assert.throws(() => built(badDelay), /times must be finite/);
  // finished once, for the window and end time it was made for
  const b = createRunSummaryBuilder({ windowMinutes: threshold.windowMinutes, endTimeMinutes: s.endTimeMinutes });
  b.add(pulseTable(pulses));
  assert.throws(() => b.finish({ ...input, endTimeMinutes: s.endTimeMinutes + 1 }), /another window or end time/);
  const b2 = createRunSummaryBuilder({ windowMinutes: threshold.windowMinutes, endTimeMinutes: s.endTimeMinutes });
  b2.add(pulseTable(pulses));
  assert.deepStrictEqual(b2.finish(input), summarizeRun({ ...input, pulses }));
  assert.throws(() => b2.finish(input), /already finished/);
  assert.throws(() => b2.add(pulseTable(pulses)), /already finished/);
});
