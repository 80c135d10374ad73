import React from "react";
import { fireEvent, screen } from "@testing-library/react-native";
import { ProgramEditor, PROGRAM_DEFAULTS, suggestedEndTime } from "@/components/forms/program-editor";
import { validateRunForm, toLaunchRequest, type RunFormValues } from "@/components/forms/run-settings";
import { renderWithProviders } from "./render";

describe("ProgramEditor", () => {
  test("ladder durations are checked inline and the form is not submitted while invalid", () => {
    const onSubmit = jest.fn();
    renderWithProviders(
      <ProgramEditor
        initialName="Duration ladder"
        initial={PROGRAM_DEFAULTS.ladder}
        submitLabel="Create"
        onSubmit={onSubmit}
      />,
    );
    fireEvent.changeText(screen.getByLabelText("Pulse durations (min, separated by commas)"), "5, 0, 10");
    expect(screen.getByText("ladder duration must be positive")).toBeTruthy();
    fireEvent.changeText(screen.getByLabelText("Recovery gap (min)"), "");
    expect(screen.getByText("Enter a number.")).toBeTruthy();
    fireEvent.press(screen.getByLabelText("Create"));
    expect(onSubmit).not.toHaveBeenCalled();
    expect(screen.getByLabelText("Pulse durations (min, separated by commas)").props.value).toBe("5, 0, 10");
  });

  test("switching kind shows that kind's fields; a valid program is submitted", () => {
    const onSubmit = jest.fn();
    renderWithProviders(
      <ProgramEditor initialName="Spikes" initial={PROGRAM_DEFAULTS.ladder} submitLabel="Create" onSubmit={onSubmit} />,
    );
    fireEvent.press(screen.getByLabelText("Periodic train"));
    expect(screen.getByLabelText("On for (min)")).toBeTruthy();
    fireEvent.press(screen.getByLabelText("Create"));
    expect(onSubmit).toHaveBeenCalledWith("Spikes", expect.objectContaining({ kind: "periodic" }));
  });

  test("switching kind renames a program only while it keeps the default name", () => {
    const onSubmit = jest.fn();
    const { unmount } = renderWithProviders(
      <ProgramEditor
        initialName="Duration ladder"
        initial={PROGRAM_DEFAULTS.ladder}
        submitLabel="Create"
        onSubmit={onSubmit}
      />,
    );
    fireEvent.press(screen.getByLabelText("Periodic train"));
    expect(screen.getByLabelText("Program name").props.value).toBe("Periodic train");
    fireEvent.press(screen.getByLabelText("Random spikes"));
    expect(screen.getByLabelText("Program name").props.value).toBe("Random spikes");
    fireEvent.changeText(screen.getByLabelText("Program name"), "Night feed");
    fireEvent.press(screen.getByLabelText("Pulse list"));
    expect(screen.getByLabelText("Program name").props.value).toBe("Night feed");
    unmount();
    // A saved program with its own name keeps it.
    renderWithProviders(
      <ProgramEditor initialName="Spikes" initial={PROGRAM_DEFAULTS.ladder} submitLabel="Save" onSubmit={onSubmit} />,
    );
    fireEvent.press(screen.getByLabelText("Periodic train"));
    expect(screen.getByLabelText("Program name").props.value).toBe("Spikes");
  });

  test("suggested preview end covers the whole ladder", () => {
    // start 60 + (1+2+5+10+20+40+80) + 7 gaps of 240 = 1898 min
    expect(suggestedEndTime(PROGRAM_DEFAULTS.ladder)).toBe(1898);
  });
});

describe("run form validation", () => {
  const ok: RunFormValues = {
    name: "Hold on ladder",
    circuitId: "c1",
    programId: "p1",
    inputSignal: "Q",
    replicates: "200",
    seed: "abc123",
    endTimeMinutes: "1900",
    gridStepMinutes: "1",
    thresholdValue: "",
    hysteresis: "0.2",
    windowMinutes: "",
    noiseDurationMinutes: "10",
  };
  test("accepts defaults and builds the launch request with optional fields left out", () => {
    expect(validateRunForm(ok)).toEqual({});
    const req = toLaunchRequest(ok);
    expect(req.settings.replicates).toBe(200);
    expect(req.settings.threshold.value).toBeUndefined();
  });
  test("explains each bad field", () => {
    const e = validateRunForm({
      ...ok,
      replicates: "2.5",
      seed: "has space",
      gridStepMinutes: "0.01",
      hysteresis: "1.5",
    });
    expect(e.replicates).toBe("Replicates must be a whole number of at least 1.");
    expect(e.seed).toBe("seed uses letters, digits and _ . : - only");
    expect(e.gridStepMinutes).toBe("At most 20,001 grid points: use a larger step.");
    expect(e.hysteresis).toBe("Hysteresis must be between 0 and 0.9.");
  });
});
