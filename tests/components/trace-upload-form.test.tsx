import React from "react";
import { act, fireEvent, screen, waitFor } from "@testing-library/react-native";
import { TraceUploadForm } from "@/components/traces/upload-form";
import { TraceUploadError, type TraceFile } from "@/components/data/traces";
import { ApiError } from "@/components/data/api";
import {
  UPLOAD_DEFAULTS,
  toUploadOptions,
  uploadServerErrors,
  validateUpload,
} from "@/components/traces/settings-form";
import { renderWithProviders } from "./render";

const FILE: TraceFile = { name: "cells.csv", size: 1200, mimeType: "text/csv", uri: "file:///cells.csv" };
const PROGRAMS = [{ id: "p1", name: "Duration ladder" }];

function setup(props: Partial<React.ComponentProps<typeof TraceUploadForm>> = {}) {
  const onPreview = jest.fn();
  const onSave = jest.fn();
  const pickFile = jest.fn(async () => FILE);
  const utils = renderWithProviders(
    <TraceUploadForm programs={PROGRAMS} pickFile={pickFile} onPreview={onPreview} onSave={onSave} {...props} />,
  );
  return { onPreview, onSave, pickFile, ...utils };
}

/** The form as a screen uses it: Preview answers with the given error, as a rejecting server would. */
function Harness({ answer, onPreview }: { answer: unknown; onPreview: jest.Mock }) {
  const [error, setError] = React.useState<unknown>(null);
  return (
    <TraceUploadForm
      programs={PROGRAMS}
      pickFile={async () => FILE}
      onPreview={(req) => {
        onPreview(req);
        setError(answer);
      }}
      onSave={() => setError(answer)}
      error={error}
    />
  );
}

async function chooseFile() {
  await act(async () => {
    fireEvent.press(screen.getByLabelText("Choose a file"));
  });
  await waitFor(() => expect(screen.getByTestId("upload-file-name").props.children).toBe("cells.csv (1.17 kB)"));
}

describe("TraceUploadForm", () => {
  test("nothing is sent without a file and a threshold; each missing field says what it needs", () => {
    const { onPreview, onSave } = setup();
    fireEvent.press(screen.getByLabelText("Preview"));
    expect(onPreview).not.toHaveBeenCalled();
    expect(screen.getByTestId("upload-file-error").props.children).toBe("Choose a CSV or TSV file.");
    expect(screen.getByText("Threshold must be a positive number of molecules.")).toBeTruthy();
    fireEvent.press(screen.getByLabelText("Save trace set"));
    expect(onSave).not.toHaveBeenCalled();
  });

  test("bad numbers are explained inline as the user types, and the typed text stays", async () => {
    setup();
    fireEvent.changeText(screen.getByLabelText("Threshold (molecules)"), "-3");
    expect(screen.getByText("Threshold must be a positive number of molecules.")).toBeTruthy();
    fireEvent.press(screen.getByLabelText("Moving average"));
    fireEvent.changeText(screen.getByLabelText("Moving-average width (frames, odd)"), "4");
    expect(screen.getByText("Width must be an odd whole number of frames from 3 to 51.")).toBeTruthy();
    fireEvent.press(screen.getByLabelText("Fitted from plateaus"));
    fireEvent.changeText(screen.getByLabelText("Model's ON steady state (molecules)"), "abc");
    expect(screen.getByText("Enter the model's ON steady state in molecules (positive).")).toBeTruthy();
    expect(screen.getByLabelText("Model's ON steady state (molecules)").props.value).toBe("abc");
    fireEvent.press(screen.getByLabelText("An input program"));
    fireEvent.press(screen.getByLabelText("Preview"));
    expect(screen.getByText("Choose an input program.")).toBeTruthy();
  });

  test("a valid form sends the options the server expects", async () => {
    const { onPreview, onSave } = setup();
    await chooseFile();
    fireEvent.press(screen.getByLabelText("Long"));
    fireEvent.changeText(screen.getByLabelText("Threshold (molecules)"), "50");
    fireEvent.changeText(screen.getByLabelText("Scale factor (trace units per molecule)"), "2.5");
    fireEvent.press(screen.getByLabelText("Preview"));
    expect(onPreview).toHaveBeenCalledTimes(1);
    const req = onPreview.mock.calls[0][0];
    expect(req.file).toBe(FILE);
    expect(req.options).toMatchObject({
      layout: "long",
      timeUnit: "min",
      schedule: { source: "column", column: "input", onAbove: 0 },
      settings: {
        background: { mode: "preInput" },
        scale: { mode: "entered", unitsPerMolecule: 2.5 },
        thresholdMolecules: 50,
      },
    });
    fireEvent.press(screen.getByLabelText("Save trace set"));
    expect(onSave).toHaveBeenCalledTimes(1);
  });

  test("a rejected file lists its problems by line and column, and the form keeps what was typed", async () => {
    const error = new TraceUploadError(
      400,
      "invalid_traces",
      "The file was not accepted: line 4, column 3: value is not a number.",
      [{ path: "line 4, column 3", message: "value is not a number" }],
      [
        { line: 4, column: 3, message: 'value "abc" is not a number' },
        { line: 9, column: 0, message: "line is shorter than the header" },
      ],
    );
    const onPreview = jest.fn();
    renderWithProviders(<Harness answer={error} onPreview={onPreview} />);
    await chooseFile();
    fireEvent.changeText(screen.getByLabelText("Threshold (molecules)"), "50");
    fireEvent.changeText(screen.getByLabelText("Input column"), "inducer");
    fireEvent.press(screen.getByLabelText("Preview"));
    expect(onPreview).toHaveBeenCalledTimes(1);
    const items = screen.getAllByTestId("upload-problems-item");
    expect(items).toHaveLength(2);
    expect(screen.getByText("Line 4, column 3:")).toBeTruthy();
    expect(screen.getByText('value "abc" is not a number')).toBeTruthy();
    expect(screen.getByText("Line 9:")).toBeTruthy();
    expect(screen.getByText(/2 problems/)).toBeTruthy();
    // Kept as typed: the threshold, the column, the chosen file.
    expect(screen.getByLabelText("Threshold (molecules)").props.value).toBe("50");
    expect(screen.getByLabelText("Input column").props.value).toBe("inducer");
    expect(screen.getByTestId("upload-file-name").props.children).toBe("cells.csv (1.17 kB)");
    // The summary message repeats the list, so it is not shown as well.
    expect(screen.queryByTestId("upload-error")).toBeNull();
  });

  test("server field errors on the options appear under their fields; other errors in a banner", async () => {
    const fieldError = new ApiError(400, "invalid", "Invalid options", [
      { path: "schedule.programId", message: "That input program was not found in this lab." },
    ]);
    const first = renderWithProviders(<Harness answer={fieldError} onPreview={jest.fn()} />);
    await chooseFile();
    fireEvent.changeText(screen.getByLabelText("Threshold (molecules)"), "50");
    fireEvent.press(screen.getByLabelText("An input program"));
    fireEvent.press(screen.getByLabelText("Duration ladder"));
    fireEvent.press(screen.getByLabelText("Preview"));
    expect(screen.getByText("That input program was not found in this lab.")).toBeTruthy();
    expect(screen.getByTestId("upload-error")).toBeTruthy();
    first.unmount();

    const tooLarge = new TraceUploadError(
      413,
      "file_too_large",
      "The file is larger than 5 MB; split it or drop columns you do not need.",
      [],
      [],
    );
    renderWithProviders(<Harness answer={tooLarge} onPreview={jest.fn()} />);
    await chooseFile();
    fireEvent.changeText(screen.getByLabelText("Threshold (molecules)"), "50");
    fireEvent.press(screen.getByLabelText("Save trace set"));
    expect(screen.getByTestId("upload-error")).toBeTruthy();
    expect(screen.getByText("The file is larger than 5 MB; split it or drop columns you do not need.")).toBeTruthy();
    expect(screen.queryByTestId("upload-problems")).toBeNull();
  });
});

describe("upload form checks", () => {
  const ok = { ...UPLOAD_DEFAULTS, settings: { ...UPLOAD_DEFAULTS.settings, thresholdMolecules: "50" } };
  test("a file over the 5 MB limit is refused before sending", () => {
    expect(validateUpload(ok, { size: 5 * 1024 * 1024 + 1 }).file).toMatch(/larger than 5 MB/);
    expect(validateUpload(ok, { size: 5 * 1024 * 1024 })).toEqual({});
  });
  test("options leave empty optional fields out and read decimal commas", () => {
    const o = toUploadOptions({ ...ok, onAbove: "0,5", settings: { ...ok.settings, maxGapMinutes: "" } });
    expect(o.name).toBeUndefined();
    expect(o.channel).toBeUndefined();
    expect(o.schedule).toEqual({ source: "column", column: "input", onAbove: 0.5 });
    expect("maxGapMinutes" in o.settings).toBe(false);
  });
  test("server paths map to form keys; line problems are left to the list", () => {
    expect(
      uploadServerErrors([
        { path: "settings.scale.unitsPerMolecule", message: "too small" },
        { path: "schedule.column", message: "unknown column" },
        { path: "line 3, column 2", message: "not a number" },
      ]),
    ).toEqual({ "settings.scale.unitsPerMolecule": "too small", scheduleColumn: "unknown column" });
  });
});
