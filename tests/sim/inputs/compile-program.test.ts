/** Input programs compile to sorted, merged pulses and switch times (definitions in sim/inputs/compile-program.ts). */
import { test, describe } from "node:test";
import assert from "node:assert/strict";
import { compileProgram } from "@/sim";
import { InputProgramSchema } from "@/shared/schemas/input-program";
import { AleaStream } from "@/sim/random/alea-stream";

const P = (x: unknown) => InputProgramSchema.parse(x);

describe("compileProgram", () => {
  test("explicit pulses are sorted, overlapping ones merged, switch times listed before the end", () => {
    const c = compileProgram(
      P({
        kind: "pulses",
        pulses: [
          { start: 50, duration: 10 },
          { start: 10, duration: 5 },
          { start: 12, duration: 10 },
        ],
      }),
      55,
    );
    assert.deepEqual(
      c.pulses.map((p) => [p.on, p.off, p.durationBin]),
      [
        [10, 22, 12],
        [50, 60, 10],
      ],
    );
    assert.deepEqual([...c.switchTimes], [10, 22, 50]);
    assert.deepEqual([...c.levels], [1, 0, 1]);
  });

  test("periodic train stops at count or the end time", () => {
    const c = compileProgram(P({ kind: "periodic", start: 5, onDuration: 2, offDuration: 8 }), 40);
    assert.deepEqual(
      c.pulses.map((p) => p.on),
      [5, 15, 25, 35],
    );
    const d = compileProgram(P({ kind: "periodic", start: 5, onDuration: 2, offDuration: 8, count: 2, level: 3 }), 400);
    assert.deepEqual(
      d.pulses.map((p) => [p.on, p.level]),
      [
        [5, 3],
        [15, 3],
      ],
    );
  });

  test("duration ladder repeats each duration k times with the recovery gap", () => {
    const c = compileProgram(P({ kind: "ladder", start: 0, durations: [1, 5], repeats: 2, gap: 10 }), 1000);
    assert.deepEqual(
      c.pulses.map((p) => [p.on, p.off]),
      [
        [0, 1],
        [11, 12],
        [22, 27],
        [37, 42],
      ],
    );
  });

  test("random train: seeded (same seed, same train), Poisson arrivals, binned durations, extra pulses", () => {
    const prog = P({
      kind: "random",
      start: 0,
      meanInterval: 45,
      durations: { dist: "uniform", min: 2, max: 5 },
      seed: "feed",
      extraPulses: [{ start: 5000, duration: 60 }],
    });
    const a = compileProgram(prog, 100_000);
    const b = compileProgram(prog, 100_000);
    assert.deepEqual(a, b);
    const random = a.pulses.filter((p) => p.off - p.on < 10);
    // about 100000/45 ~ 2200 arrivals (some merged); 4 SD of a Poisson count is ~190
    assert.ok(Math.abs(random.length - 100_000 / 45) < 250, `count ${random.length}`);
    for (const p of random) {
      assert.ok(p.durationBin === Math.floor(p.off - p.on) + 0.5 || p.off - p.on > 5, "bin centre of a 1-minute bin");
    }
    assert.ok(
      a.pulses.some((p) => p.on === 5000 && p.durationBin === 60),
      "extra pulse kept exactly",
    );
    const other = compileProgram(P({ ...prog, seed: "other" }), 100_000);
    assert.notDeepEqual(other.pulses.slice(0, 3), a.pulses.slice(0, 3));
  });

  test("gamma durations have the requested mean (Marsaglia & Tsang 2000 sampler; mean within 4 SE)", () => {
    const prog = P({
      kind: "random",
      start: 0,
      meanInterval: 100,
      durations: { dist: "gamma", mean: 3, shape: 2 },
      seed: "g",
    });
    const s = new AleaStream("gamma-check");
    const c = compileProgram(prog, 200_000, () => s.next());
    const d = c.pulses.map((p) => p.off - p.on);
    const mean = d.reduce((x, y) => x + y, 0) / d.length;
    const se = 3 / Math.sqrt(2) / Math.sqrt(d.length); // SD of gamma = mean / sqrt(shape)
    assert.ok(Math.abs(mean - 3) < 4 * se, `mean ${mean}`);
  });
});

test("ladder pulses carry their declared duration exactly, whatever the round-off of off - on", () => {
  // 0.1-step ladders accumulate floating-point error in the switch times.
  const c = compileProgram({ kind: "ladder", start: 0.1, durations: [15.8, 0.7, 94.6], repeats: 3, gap: 33.3 }, 10_000);
  assert.deepEqual([...new Set(c.pulses.map((p) => p.durationBin))], [15.8, 0.7, 94.6]);
});
