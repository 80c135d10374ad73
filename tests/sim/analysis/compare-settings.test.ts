import { test } from "node:test";
import assert from "node:assert/strict";
import { settingsWarnings } from "@/sim/analysis/compare-runs";
import { methodLabel } from "@/sim/analysis/method-label";
import type { RunSettingsBlock } from "@/shared/schemas/analysis";

const base: RunSettingsBlock = {
  thresholdMolecules: 40,
  downThresholdMolecules: 32,
  thresholdSource: "set",
  thresholdRule: "set in the run",
  offSteadyStateMolecules: 0,
  onMaximumMolecules: 100,
  hysteresis: 0.2,
  windowMinutes: 30,
  windowSource: "set",
  outputLifetimeMinutes: 10,
  noiseDurationMinutes: 10,
  endTimeMinutes: 600,
  gridStepMinutes: 1,
  method: methodLabel("direct"),
  seed: "tank-1",
  replicates: 200,
  outputSpecies: "rptC",
  warnings: [],
};

test("runs measured alike give no warning", () => {
  assert.deepEqual(
    settingsWarnings([
      { name: "A", settings: base },
      { name: "B", settings: { ...base } },
    ]),
    [],
  );
});

test("one sentence per differing setting, naming each run's value", () => {
  const w = settingsWarnings([
    { name: "Hold", settings: base },
    {
      name: "Direct",
      settings: {
        ...base,
        thresholdMolecules: 25,
        windowMinutes: 45,
        method: methodLabel("tauLeap"),
        endTimeMinutes: 1200,
        replicates: 1000,
      },
    },
  ]);
  assert.equal(w.length, 5);
  assert.match(w[0], /different thresholds \(Hold: 40 molecules; Direct: 25 molecules\)/);
  assert.match(w[1], /different response windows \(Hold: 30 min; Direct: 45 min\)/);
  assert.match(
    w[2],
    /different methods \(Hold: Exact: direct method \(Gillespie 1977\); Direct: Approximate: tau-leaping/,
  );
  assert.match(w[3], /end at different times \(Hold: 600 min; Direct: 1,200 min\)/);
  assert.match(w[4], /different replicate counts \(Hold: 200; Direct: 1,000\)/);
});

test("hysteresis differences are named; round-off is not a difference", () => {
  const w = settingsWarnings([
    { name: "A", settings: base },
    { name: "B", settings: { ...base, hysteresis: 0.1, thresholdMolecules: 40 + 1e-12 } },
  ]);
  assert.equal(w.length, 1);
  assert.match(w[0], /hysteresis bands \(A: 20%; B: 10%\)/);
});

test("without settings for every run there is nothing to check", () => {
  assert.deepEqual(settingsWarnings([{ name: "A", settings: base }, { name: "B" }]), []);
});
