import React from "react";
import { screen } from "@testing-library/react-native";
import { SettingsBlock, methodLabel } from "@/components/runs/settings-block";
import { DefinitionLink } from "@/components/definitions/definition-link";
import { TERMS, TERM_IDS } from "@/components/definitions/terms";
import type { RunSpec } from "@/shared/schemas/run-spec";
import type { RunSettingsBlock } from "@/shared/schemas/analysis";
import { methodLabel as methodLabelOf } from "@/sim/analysis/method-label";
import { renderWithProviders } from "./render";
import * as fs from "fs";
import * as path from "path";

// Only the settings the block reads; the circuit and program do not matter here.
const spec = {
  endTimeMinutes: 600,
  gridStepMinutes: 1,
  replicates: 200,
  seed: "tank-7",
  method: "direct",
  threshold: { hysteresis: 0.2, noiseDurationMinutes: 10 },
} as unknown as RunSpec;

const block: RunSettingsBlock = {
  thresholdMolecules: 40,
  downThresholdMolecules: 32,
  thresholdSource: "default",
  thresholdRule: "half-way between the OFF steady state (0 molecules) and the highest ON response (80 molecules)",
  offSteadyStateMolecules: 0,
  onMaximumMolecules: 80,
  hysteresis: 0.2,
  windowMinutes: 30,
  windowSource: "default",
  outputLifetimeMinutes: 10,
  noiseDurationMinutes: 10,
  endTimeMinutes: 600,
  gridStepMinutes: 1,
  method: methodLabelOf("tauLeap"),
  seed: "tank-7",
  replicates: 200,
  outputSpecies: "rptC",
  warnings: ["The threshold is below 5 molecules."],
};

describe("settings block", () => {
  test("shows every setting of the run's settings block, the method label and its warnings", () => {
    renderWithProviders(<SettingsBlock settings={block} spec={spec} />);
    expect(screen.getByText("40 molecules up, 32 molecules down")).toBeTruthy();
    expect(screen.getByText(/default: half-way between the OFF steady state/)).toBeTruthy();
    expect(screen.getByText("20%")).toBeTruthy();
    expect(screen.getByText("30 min after each pulse ends")).toBeTruthy();
    expect(screen.getByText("600 min")).toBeTruthy();
    expect(screen.getByText("1 min")).toBeTruthy();
    expect(screen.getByText("tank-7")).toBeTruthy();
    expect(screen.getByText("200")).toBeTruthy();
    expect(screen.getByTestId("run-method").props.children).toMatch(/^Approximate: tau-leaping/);
    expect(screen.getByText(/The threshold is below 5 molecules/)).toBeTruthy();
    for (const term of ["threshold", "hysteresis", "window", "method"])
      expect(screen.getByTestId(`define-${term}`)).toBeTruthy();
  });

  test("without a settings block it shows the spec's settings and says the threshold is still to be resolved", () => {
    renderWithProviders(<SettingsBlock settings={null} spec={spec} />);
    expect(screen.getByText("default (resolved when the run starts)")).toBeTruthy();
    expect(screen.getByTestId("run-method").props.children).toBe("Exact: direct method (Gillespie 1977)");
    expect(methodLabel("tauLeap")).toMatch(/^Approximate: tau-leaping/);
  });
});

describe("definition links", () => {
  test("a link goes to the term's anchor on the definitions page", () => {
    renderWithProviders(<DefinitionLink term="d50" />);
    const link = screen.getByTestId("define-d50");
    expect(link.props.href ?? link.props.accessibilityLabel).toBeTruthy();
    expect(screen.getByLabelText("Definition of d50")).toBeTruthy();
  });

  test("an unknown term renders no link", () => {
    renderWithProviders(<DefinitionLink term="no-such-term" />);
    expect(screen.queryByText("definition")).toBeNull();
  });

  test("every term used by a DefinitionLink in the app exists, and anchors are unique", () => {
    expect(TERM_IDS.size).toBe(TERMS.length);
    const used = new Set<string>();
    const walk = (dir: string) => {
      for (const name of fs.readdirSync(dir)) {
        const p = path.join(dir, name);
        if (fs.statSync(p).isDirectory()) walk(p);
        else if (/\.tsx?$/.test(name))
          for (const m of fs.readFileSync(p, "utf8").matchAll(/(?:DefinitionLink term|term:)\s*=?\s*"([a-z0-9-]+)"/g))
            used.add(m[1]);
      }
    };
    walk(path.join(__dirname, "../../app"));
    walk(path.join(__dirname, "../../components"));
    expect(used.size).toBeGreaterThan(8);
    for (const id of used) expect(TERM_IDS.has(id)).toBe(true);
    for (const required of ["d50", "fano", "window", "hysteresis", "match-distance", "false-pass-rate", "delay-cost"])
      expect(TERM_IDS.has(required)).toBe(true);
  });
});
