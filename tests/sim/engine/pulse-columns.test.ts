/**
 * Pulse records packed as columns (how a chunk's pulses leave a worker thread) come
 * back exactly: the same records, key for key, for real chunks of a filter and a pulse
 * generator (passed and not, censored delays, excluded pulses, several widths), and the
 * pool's results equal the engine's in-process results.
 */
import { test, after } from "node:test";
import assert from "node:assert/strict";
import { simulateChunk } from "@/sim";
import { packPulseStats, unpackPulseStats, PULSE_FIELDS } from "@/sim/engine/pulse-columns";
import { RunSpecSchema } from "@/shared/schemas/run-spec";
import { launchBody } from "@/tests/helpers/run-helpers";
import { createSimPool } from "@/server/compute/pool";

const specOf = (template: "c1ffl-and" | "i1ffl") => {
  const b = launchBody({ template, replicates: 100, seed: "columns" });
  return RunSpecSchema.parse({ circuit: b.circuit, program: b.program, inputSignal: b.inputSignal, ...b.settings });
};

const pool = createSimPool({ threads: 1 });
after(() => pool.destroy());

for (const template of ["c1ffl-and", "i1ffl"] as const) {
  test(`${template}: pack then unpack gives the same records`, () => {
    const { pulses } = simulateChunk(specOf(template), 0, 100);
    assert.ok(pulses.length >= 100, `${pulses.length} records`);
    const kinds = {
      passed: pulses.some((p) => p.passed),
      failed: pulses.some((p) => !p.passed && !p.excluded),
      censored: pulses.some((p) => p.delay === null),
      widths: pulses.some((p) => p.widths.length > 0),
    };
    assert.deepEqual(kinds, { passed: true, failed: true, censored: true, widths: true });
    const packed = packPulseStats(pulses);
    assert.equal(packed.numbers.length, pulses.length * PULSE_FIELDS);
    const back = unpackPulseStats(packed);
    assert.deepEqual(back, pulses);
    // key order too (anything that serialises records sees the same text)
    assert.equal(JSON.stringify(back), JSON.stringify(pulses));
  });
}

test("nulls, excluded pulses and several widths survive the round trip", () => {
  const records = [
    {
      replicate: 3,
      pulseIndex: 0,
      on: 0,
      off: 2.5,
      durationBin: 2.5,
      excluded: true,
      passed: false,
      delay: null,
      offDelay: null,
      widths: [],
      peak: 7,
      timeToPeak: 0,
      fwhm: null,
      baseline: 7,
    },
    {
      replicate: 3,
      pulseIndex: 1,
      on: 10,
      off: 70,
      durationBin: 60,
      excluded: false,
      passed: true,
      delay: 4.25,
      offDelay: 0,
      widths: [1.5, 0.25, 30],
      peak: 41,
      timeToPeak: 12.5,
      fwhm: 20.125,
      baseline: -0,
    },
  ];
  assert.deepEqual(unpackPulseStats(packPulseStats(records)), records);
  assert.ok(Object.is(unpackPulseStats(packPulseStats(records))[1].baseline, -0), "-0 kept");
});

test("the pool's chunk (pulses moved as columns) equals the in-process chunk", async () => {
  const spec = specOf("c1ffl-and");
  const direct = simulateChunk(spec, 0, 40);
  const pooled = await pool.runChunk({ spec, replicateStart: 0, count: 40 });
  assert.equal(pooled.packedPulses, undefined);
  assert.deepEqual(pooled.pulses, direct.pulses);
  assert.deepEqual(pooled.replicates, direct.replicates);
});
