import React from "react";
import { fireEvent, screen } from "@testing-library/react-native";
import { ReproductionCard, reproductionVerdict, type Reproduction } from "@/components/runs/reproduction-card";
import {
  AccelerationCard,
  delayWords,
  halfRiseWords,
  type AccelerationView,
} from "@/components/runs/acceleration-card";
import { ImportConfirm, importProblemOf, pendingImportOf } from "@/components/runs/import-bundle";
import { ApiError } from "@/components/data/api";
import { renderWithProviders } from "./render";

const repro = (over: Partial<Reproduction>): Reproduction => ({
  of: "run_0",
  expectedHash: "a",
  actualHash: "a",
  identical: true,
  firstDifference: null,
  engineMatches: true,
  message: "Identical: every stored statistic matches the original.",
  ...over,
});
const acc = (over: Partial<AccelerationView>): AccelerationView => ({
  halfRiseCircuitMinutes: 10,
  halfRiseControlMinutes: 20,
  halfRiseRatio: 2,
  medianDelayCircuit: 12,
  medianDelayControl: 5,
  medianDelayDifference: 7,
  longPulseDelayCircuit: null,
  longPulseDelayControl: null,
  longPulseDelayDifference: null,
  circuitRunId: "run_c",
  controlRunId: "run_k",
  ...over,
});

describe("reproduction card", () => {
  test("identical, first difference, still computing", () => {
    expect(reproductionVerdict(repro({})).text).toBe("Identical: every stored statistic matches the original");
    expect(reproductionVerdict(repro({ identical: false, firstDifference: "replicate 3, pulse 2, delay" })).text).toBe(
      "Differs: first difference at replicate 3, pulse 2, delay",
    );
    expect(
      reproductionVerdict(repro({ identical: null, actualHash: null, message: "The reproduction is still computing." }))
        .tone,
    ).toBe("pending");
  });

  test("says whether the engine matches and links to the original run (not for bundles)", () => {
    const { unmount } = renderWithProviders(<ReproductionCard reproduction={repro({ engineMatches: false })} />);
    expect(screen.getByText(/Engine version: different from the original's/)).toBeTruthy();
    expect(screen.getByLabelText("Open the original run").props.href).toBe("/runs/run_0");
    unmount();
    renderWithProviders(<ReproductionCard reproduction={repro({ of: "bundle" })} />);
    expect(screen.queryByLabelText("Open the original run")).toBeNull();
  });
});

describe("acceleration card", () => {
  test("ratio above 1 reads as acceleration, below 1 as slow-down, null as not available", () => {
    expect(halfRiseWords(acc({}))).toMatch(/^Acceleration: .* 2× faster/);
    expect(halfRiseWords(acc({ halfRiseRatio: 0.5 }))).toMatch(/^Slow-down: .* 2× slower/);
    expect(halfRiseWords(acc({ halfRiseRatio: null }))).toMatch(/^No T1\/2 ratio/);
    expect(delayWords(acc({}))).toBe("The circuit's median response delay is 7 min longer than the control's.");
    expect(delayWords(acc({ medianDelayDifference: -3 }))).toMatch(/3 min shorter/);
  });

  test("links to the other run of the pair", () => {
    const { unmount } = renderWithProviders(<AccelerationCard acceleration={acc({})} runId="run_c" />);
    expect(screen.getByLabelText("Open the control run").props.href).toBe("/runs/run_k");
    unmount();
    renderWithProviders(<AccelerationCard acceleration={acc({})} runId="run_k" />);
    expect(screen.getByLabelText("Open the circuit run").props.href).toBe("/runs/run_c");
  });
});

test("a refused bundle import lists each field the server named", () => {
  const p = importProblemOf(
    new ApiError(400, "invalid", "Invalid bundle: ...", [
      { path: "spec.replicates", message: "Too big: expected number to be <=100000" },
    ]),
    "bundle.json",
  );
  expect(p.message).toBe("This file is not a run bundle Linger can re-run.");
  expect(p.fields).toEqual([{ path: "spec.replicates", message: "Too big: expected number to be <=100000" }]);
});

describe("import asks before it starts a computation", () => {
  test("the question names the file, the run and its replicates; each button calls its handler once", () => {
    const pending = pendingImportOf("bundle.json", { name: "Hold sensor on Feed spikes", spec: { replicates: 2000 } });
    const onConfirm = jest.fn();
    const onCancel = jest.fn();
    renderWithProviders(<ImportConfirm pending={pending} onConfirm={onConfirm} onCancel={onCancel} />);
    expect(screen.getByText("Import bundle.json?")).toBeTruthy();
    expect(
      screen.getByText(
        "A new run in this lab re-runs 2,000 replicates of “Hold sensor on Feed spikes” and checks that its statistics match the bundle.",
      ),
    ).toBeTruthy();
    fireEvent.press(screen.getByTestId("import-cancel"));
    expect(onCancel).toHaveBeenCalledTimes(1);
    expect(onConfirm).not.toHaveBeenCalled();
    fireEvent.press(screen.getByTestId("import-confirm"));
    expect(onConfirm).toHaveBeenCalledTimes(1);
  });

  test("a file without a name or replicates still gets a question", () => {
    const p = pendingImportOf("odd.json", [1, 2]);
    expect([p.runName, p.replicates]).toEqual([null, null]);
  });
});
