import React from "react";
import { fireEvent, screen } from "@testing-library/react-native";
import { CircuitEditor } from "@/components/forms/circuit-editor";
import type { CircuitInput } from "@/shared/schemas/circuit";
import { renderWithProviders } from "./render";

const BODY: CircuitInput = {
  name: "Tank sensor, direct",
  description: "",
  species: [{ name: "rptC", initialCount: 0 }],
  signals: [{ name: "Q", offLevel: 0, onLevel: 1 }],
  reactions: [
    {
      name: "make",
      reactants: [],
      products: [{ species: "rptC", count: 1 }],
      modifiers: [],
      rate: {
        kind: "regulated",
        maxRatePerMinute: 5,
        logic: "and",
        leakFraction: 0,
        regulators: [{ source: "Q", effect: "activates", halfMax: 0.5, hill: 2 }],
      },
    },
    {
      name: "lose",
      reactants: [{ species: "rptC", count: 1 }],
      products: [],
      modifiers: [],
      rate: { kind: "massAction", ratePerMinute: 0.1 },
    },
  ],
  outputSpecies: "rptC",
};

describe("CircuitEditor", () => {
  test("shows inline messages as the user types, with units in the labels", () => {
    renderWithProviders(<CircuitEditor initial={BODY} submitLabel="Save" onSubmit={jest.fn()} />);
    fireEvent.changeText(screen.getByLabelText("Initial count of rptC (molecules)"), "-3");
    expect(screen.getByText("initial count must not be negative")).toBeTruthy();
    fireEvent.changeText(screen.getByLabelText("Hill coefficient n"), "12");
    expect(screen.getByText("Hill coefficient n must be at most 10")).toBeTruthy();
    fireEvent.changeText(screen.getByLabelText("Rate constant (per minute)"), "fast");
    expect(screen.getByText("Enter a number.")).toBeTruthy();
    fireEvent.changeText(screen.getByLabelText("Species 1 name"), "2bad");
    expect(screen.getByText("letters, digits and _ only, starting with a letter")).toBeTruthy();
  });

  test("does not submit an invalid circuit and keeps what was typed", () => {
    const onSubmit = jest.fn();
    renderWithProviders(<CircuitEditor initial={BODY} submitLabel="Save" onSubmit={onSubmit} />);
    fireEvent.changeText(screen.getByLabelText("Half-max K (molecules)"), "0");
    fireEvent.press(screen.getByLabelText("Save"));
    expect(onSubmit).not.toHaveBeenCalled();
    expect(screen.getByText("half-max K must be positive")).toBeTruthy();
    expect(screen.getByText("1 field needs attention before saving.")).toBeTruthy();
    expect(screen.getByLabelText("Half-max K (molecules)").props.value).toBe("0");
  });

  test("shows server field errors at their fields and submits a valid body", () => {
    const onSubmit = jest.fn();
    renderWithProviders(
      <CircuitEditor
        initial={BODY}
        submitLabel="Save"
        onSubmit={onSubmit}
        serverErrors={{ "reactions.1.name": "reaction names must be unique" }}
        serverMessage="The circuit was not saved."
      />,
    );
    expect(screen.getByText("The circuit was not saved.")).toBeTruthy();
    expect(screen.getByText("reaction names must be unique")).toBeTruthy();
    fireEvent.press(screen.getByLabelText("Save"));
    expect(onSubmit).toHaveBeenCalledTimes(1);
    expect(onSubmit.mock.calls[0][0].reactions[0].rate.regulators[0].halfMax).toBe(0.5);
  });
});
