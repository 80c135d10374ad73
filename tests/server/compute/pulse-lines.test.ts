/**
 * The per-chunk reduction of the finalising thread works on pulse columns, not records: the statistics
 * hash of the columns (run-store.ts, version 2: addPackedPulses), the records put in order (inRecordOrder)
 * and kept as SQLite gives them back (packedAsStored) must equal, byte for byte, what the record-based
 * path gives: unpackPulseStats, pulseAsStored, the sort by (replicate, pulse), addPulses and
 * packPulseStats; and version 2 must tell apart exactly the records version 1's lines (canonicalPulse)
 * tell apart. Checked on generated records with a fixed seed whose every figure is drawn from edge
 * values (NaN, -0, infinities, integers, 1e21 and above, 1e-7 and below, the smallest double) and
 * ordinary doubles, with widths from none to four, flags that are not 0 or 1, records out of order,
 * ties and a NaN replicate number.
 */
import { test } from "node:test";
import assert from "node:assert/strict";
import seedrandom from "seedrandom";
import { PULSE_FIELDS, packPulseStats, unpackPulseStats, type PackedPulseStats } from "@/sim/engine/pulse-columns";
import { canonicalPulse, createStatsHasher, pulseAsStored, STATS_HASH_V2 } from "@/server/compute/run-store";
import { inRecordOrder, packedAsStored } from "@/server/compute/finalise-worker";

const EDGES = [
  NaN,
  -0,
  0,
  1,
  -1,
  7,
  123456789,
  2 ** 53,
  -(2 ** 53) - 2,
  1e21,
  1.5e21,
  -3e22,
  1e300,
  Number.MAX_VALUE,
  1e-6,
  1e-7,
  -1e-7,
  2.5e-8,
  5e-324,
  Infinity,
  -Infinity,
  0.1,
  1 / 3,
  15.799999999999997,
];

function generated(seed: string, n: number): PackedPulseStats {
  const rnd = seedrandom(seed);
  const value = () => (rnd() < 0.6 ? EDGES[Math.floor(rnd() * EDGES.length)] : (rnd() - 0.3) * 10 ** (rnd() * 8 - 4));
  const numbers = new Float64Array(n * PULSE_FIELDS);
  const widths: number[] = [];
  for (let i = 0; i < n; i++) {
    const o = i * PULSE_FIELDS;
    for (let f = 0; f < PULSE_FIELDS; f++) numbers[o + f] = value();
    // replicate and pulse index mostly small integers, so the sort has ties and runs to keep
    numbers[o] = rnd() < 0.05 ? NaN : Math.floor(rnd() * 6);
    numbers[o + 1] = rnd() < 0.05 ? value() : Math.floor(rnd() * 4);
    numbers[o + 5] = [0, 1, 2, NaN, -0][Math.floor(rnd() * 5)];
    numbers[o + 6] = [0, 1, 2, NaN, -0][Math.floor(rnd() * 5)];
    const nw = Math.floor(rnd() * 5);
    numbers[o + 12] = nw;
    for (let j = 0; j < nw; j++) widths.push(value());
  }
  return { numbers, widths: Float64Array.from(widths) };
}

/** The record-based path, as the finalising thread had it. */
function byRecords(p: PackedPulseStats) {
  const records = unpackPulseStats(p).map(pulseAsStored);
  records.sort((a, b) => a.replicate - b.replicate || a.pulseIndex - b.pulseIndex);
  return { records, stored: packPulseStats(records) };
}

function assertSameDoubles(a: Float64Array, b: Float64Array, what: string) {
  assert.equal(a.length, b.length, `${what}: length`);
  for (let i = 0; i < a.length; i++) assert.ok(Object.is(a[i], b[i]), `${what}[${i}]: ${a[i]} vs ${b[i]}`);
}

const hashOfRecords = (records: ReturnType<typeof pulseAsStored>[]) => {
  const h = createStatsHasher();
  h.addPulses(records);
  return h.digest([]);
};
const hashOfColumns = (p: PackedPulseStats) => {
  const h = createStatsHasher();
  h.addPackedPulses(p);
  return h.digest([]);
};

test("the hash of columns equals the hash of the stored records, for edge values", () => {
  for (const seed of ["pulse-lines-1", "pulse-lines-2", "pulse-lines-3"]) {
    const p = generated(seed, 3000);
    const records = unpackPulseStats(p).map(pulseAsStored);
    const h = hashOfColumns(p);
    assert.match(h, /^v2:[0-9a-f]{64}$/);
    assert.ok(h.startsWith(STATS_HASH_V2));
    assert.equal(h, hashOfRecords(records));
    // the edge values did reach the records
    const lines = records.map(canonicalPulse).join("\n");
    for (const s of ["null", "NaN", "Infinity", "-Infinity", "1e+21", "1e-7", "5e-324", "[]", "-1e-7"])
      assert.ok(lines.includes(s), `${seed}: no ${s} in the records`);
  }
});

test("version 2 tells apart the records version 1's lines tell apart, and no others", () => {
  // one record changed in one figure at a time, to another edge or ordinary value: the version 1 lines
  // differ exactly when the version 2 hashes do (-0 and 0, NaN and null are the same to both)
  const rnd = seedrandom("pulse-lines-pairs");
  const base = unpackPulseStats(generated("pulse-lines-base", 40)).map(pulseAsStored);
  const figures = ["on", "off", "durationBin", "delay", "offDelay", "peak", "timeToPeak", "fwhm", "baseline"] as const;
  let differed = 0;
  let same = 0;
  for (let k = 0; k < 400; k++) {
    const i = Math.floor(rnd() * base.length);
    const changed = base.map((r) => ({ ...r, widths: r.widths.slice() }));
    const r = changed[i];
    const pick = () => (rnd() < 0.7 ? EDGES[Math.floor(rnd() * EDGES.length)] : Math.floor(rnd() * 3));
    const what = Math.floor(rnd() * (figures.length + 3));
    if (what < figures.length) (r as Record<string, unknown>)[figures[what]] = rnd() < 0.1 ? null : pick();
    else if (what === figures.length) r.passed = !r.passed;
    else if (what === figures.length + 1) r.widths = r.widths.length ? [pick(), ...r.widths.slice(1)] : [pick()];
    else r.widths = r.widths.map((x) => (x === 0 ? -0 : x));
    const stored = changed.map((x) => pulseAsStored(x));
    const v1Differs = stored.map(canonicalPulse).join("\n") !== base.map(canonicalPulse).join("\n");
    const v2Differs = hashOfRecords(stored) !== hashOfRecords(base);
    assert.equal(
      v2Differs,
      v1Differs,
      `change ${k} (record ${i}): ${canonicalPulse(stored[i])} vs ${canonicalPulse(base[i])}`,
    );
    if (v1Differs) differed++;
    else same++;
  }
  assert.ok(differed > 100 && same > 20, `both kinds of change were tried (${differed} differed, ${same} the same)`);
});

test("records put in order and kept as stored equal the sorted, packed stored records", () => {
  for (const seed of ["pulse-order-1", "pulse-order-2"]) {
    const p = generated(seed, 2000);
    const want = byRecords(p);
    const ordered = inRecordOrder(p);
    assert.notEqual(ordered, p, "these records were out of order");
    assert.equal(hashOfColumns(ordered), hashOfRecords(want.records));
    const stored = packedAsStored(ordered);
    assertSameDoubles(stored.numbers, want.stored.numbers, `${seed} numbers`);
    assertSameDoubles(stored.widths, want.stored.widths, `${seed} widths`);
  }
  // already in order (as a worker sends a chunk): the same columns back
  const finite = unpackPulseStats(generated("pulse-order-3", 500)).filter(
    (r) => Number.isFinite(r.replicate) && Number.isFinite(r.pulseIndex),
  );
  const inOrder = byRecords(packPulseStats(finite)).stored;
  assert.equal(inRecordOrder(inOrder), inOrder);
});
