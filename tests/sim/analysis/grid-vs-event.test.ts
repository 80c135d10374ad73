/**
 * Grid-based and event-based pulse figures agree as the grid gets finer
 * (docs/metrics.md, "Event path or grid"). The engine detects crossings online
 * on the exact event path; here the same recorded paths are sampled on grids of
 * 1, 0.1 and 0.01 min and measured with pulseStatsFromSampledTrace.
 *
 * Circuit: a noisy low-copy output (about 12 copies when on, lifetime 10 min)
 * driven by 5-min pulses, threshold 6 molecules, so roughly 40% of pulses pass
 * through brief excursions above threshold that a coarse grid can step over.
 */
import { test, describe } from "node:test";
import assert from "node:assert/strict";
import { simulateChunk, runSetup } from "@/sim";
import { pulseStatsFromSampledTrace } from "@/sim/metrics/pulse-tracker";
import { RunSpecSchema } from "@/shared/schemas/run-spec";

const spec = RunSpecSchema.parse({
  circuit: {
    name: "Low-copy reporter",
    species: [{ name: "rptC", initialCount: 0 }],
    signals: [{ name: "Q", offLevel: 0, onLevel: 1 }],
    reactions: [
      {
        name: "driveZ",
        products: [{ species: "rptC", count: 1 }],
        rate: { kind: "constant", ratePerMinute: 1.2 },
        scaledBy: "Q",
      },
      { name: "decayZ", reactants: [{ species: "rptC", count: 1 }], rate: { kind: "massAction", ratePerMinute: 0.1 } },
    ],
    outputSpecies: "rptC",
  },
  program: { kind: "periodic", start: 10, onDuration: 5, offDuration: 60, count: 200 },
  inputSignal: "Q",
  endTimeMinutes: 13100,
  gridStepMinutes: 10,
  replicates: 5,
  seed: "grid-vs-event",
  recordEventsFor: 5,
  threshold: { value: 6, windowMinutes: 30 },
});

describe("grid-based against event-based pulse figures", () => {
  test("pass and delay converge to the event-path figures as the grid step shrinks (fixed seed)", () => {
    const res = simulateChunk(spec, 0, 5);
    const setup = runSetup(spec);
    const out = setup.model.outputIndex;
    const change = setup.model.reactions.map((r) => r.delta.find((d) => d.species === out)?.change ?? 0);
    const pulses = setup.sharedProgram!.pulses;
    const threshold = { theta: 6, downTheta: 6 * 0.8, windowMinutes: 30 };
    const recorded = res.recordedEvents!;
    assert.equal(recorded.length, 5);
    assert.ok(recorded.every((r) => !r.truncated));

    const rows: {
      h: number;
      total: number;
      passEvent: number;
      passGrid: number;
      disagree: number;
      delayWithinH: number;
      bothPassed: number;
    }[] = [];
    for (const h of [1, 0.1, 0.01]) {
      const row = { h, total: 0, passEvent: 0, passGrid: 0, disagree: 0, delayWithinH: 0, bothPassed: 0 };
      for (const rec of recorded) {
        // the exact step path sampled at grid times: the state after every event at or before t
        const n = Math.round(spec.endTimeMinutes / h) + 1;
        const times = new Float64Array(n);
        const values = new Float64Array(n);
        let x = rec.initial[out];
        let k = 0;
        for (let i = 0; i < n; i++) {
          const t = i * h;
          while (k < rec.times.length && rec.times[k] <= t) x += change[rec.reactions[k++]];
          times[i] = t;
          values[i] = x;
        }
        const grid = pulseStatsFromSampledTrace(times, values, pulses, threshold, rec.replicate);
        const event = res.pulses.filter((p) => p.replicate === rec.replicate);
        assert.equal(grid.length, event.length);
        event.forEach((e, i) => {
          const g = grid[i];
          if (e.excluded || g.excluded) return;
          row.total++;
          if (e.passed) row.passEvent++;
          if (g.passed) row.passGrid++;
          if (e.passed !== g.passed) row.disagree++;
          if (e.passed && g.passed) {
            row.bothPassed++;
            // the interpolated crossing lies in the grid interval that contains the jump
            if (Math.abs(g.delay! - e.delay!) <= h + 1e-9) row.delayWithinH++;
          }
        });
      }
      rows.push(row);
    }
    for (const r of rows) {
      // a sampled step path only takes values the path took: the grid can miss a pass, never invent one
      assert.ok(r.passGrid <= r.passEvent, `h = ${r.h}: grid ${r.passGrid} > event ${r.passEvent}`);
    }
    const [coarse, mid, fine] = rows;
    assert.ok(coarse.total >= 900, `evaluable pulses ${coarse.total}`);
    // the point of event-path detection: a 1-min grid misses passes in this circuit
    assert.ok(coarse.disagree > 0, "a 1-min grid missed no pass");
    assert.ok(
      coarse.disagree >= mid.disagree && mid.disagree >= fine.disagree,
      `disagreements ${rows.map((r) => r.disagree)}`,
    );
    // at 0.01 min an excursion shorter than the step (mean dwell above threshold is ~1/(1.2 + 0.6) min) is rare
    assert.ok(fine.disagree <= 0.005 * fine.total, `fine grid disagrees on ${fine.disagree} of ${fine.total}`);
    assert.ok(
      fine.delayWithinH >= 0.99 * fine.bothPassed,
      `delays within h: ${fine.delayWithinH} of ${fine.bothPassed}`,
    );
  });
});
