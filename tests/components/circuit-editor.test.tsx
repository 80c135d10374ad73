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
    expect(screen.getByText("Reaction names must be unique")).toBeTruthy();
    fireEvent.press(screen.getByLabelText("Save"));
    expect(onSubmit).toHaveBeenCalledTimes(1);
    expect(onSubmit.mock.calls[0][0].reactions[0].rate.regulators[0].halfMax).toBe(0.5);
  });

  test("renaming a species or a signal renames every reaction that uses it, and the output", () => {
    const onSubmit = jest.fn();
    renderWithProviders(<CircuitEditor initial={BODY} submitLabel="Save" onSubmit={onSubmit} />);
    // Retyped through an empty field: the references wait, then follow the new name.
    fireEvent.changeText(screen.getByLabelText("Species 1 name"), "");
    fireEvent.changeText(screen.getByLabelText("Species 1 name"), "rpt");
    fireEvent.changeText(screen.getByLabelText("Species 1 name"), "rptX");
    fireEvent.changeText(screen.getByLabelText("Signal 1 name"), "inducer");
    expect(screen.getByLabelText("Made by make").props.value).toBe("rptX");
    expect(screen.getByLabelText("Consumed by lose").props.value).toBe("rptX");
    expect(screen.getByLabelText("Regulator 1 of make").props.value).toBe("inducer");
    fireEvent.press(screen.getByLabelText("Save"));
    expect(onSubmit).toHaveBeenCalledTimes(1);
    const saved = onSubmit.mock.calls[0][0] as CircuitInput;
    expect(saved.outputSpecies).toBe("rptX");
    expect(saved.reactions[0].products?.[0].species).toBe("rptX");
    expect(saved.reactions[1].reactants?.[0].species).toBe("rptX");
    const rate = saved.reactions[0].rate;
    expect(rate.kind === "regulated" && rate.regulators[0].source).toBe("inducer");
  });

  test("a wrong reference is explained beside its field in plain words, and blocks saving", () => {
    const onSubmit = jest.fn();
    renderWithProviders(<CircuitEditor initial={BODY} submitLabel="Save" onSubmit={onSubmit} />);
    fireEvent.changeText(screen.getAllByLabelText(/Only while this signal is on/)[0], "inducr");
    expect(screen.getByText("Reaction 1 is scaled by 'inducr', which is not a signal of this circuit.")).toBeTruthy();
    expect(screen.queryByText(/reactions\[0\]|scaledBy/)).toBeNull();
    fireEvent.changeText(screen.getByLabelText("Made by make"), "rtpC");
    expect(screen.getByText("Reaction 1 makes 'rtpC', which is not a species of this circuit.")).toBeTruthy();
    fireEvent.press(screen.getByLabelText("Save"));
    expect(onSubmit).not.toHaveBeenCalled();
  });

  test("a server message keeps its place without the developer prefix", () => {
    renderWithProviders(
      <CircuitEditor
        initial={BODY}
        submitLabel="Save"
        onSubmit={jest.fn()}
        serverErrors={{ "reactions.1.name": 'reactions[1] "lose": name is reserved' }}
      />,
    );
    expect(screen.getByText("Name is reserved")).toBeTruthy();
  });

  test("switching a reaction to regulated does not pick its own product as regulator", () => {
    const noSignal: CircuitInput = {
      ...BODY,
      species: [
        { name: "rptC", initialCount: 0 },
        { name: "actA", initialCount: 5 },
      ],
      signals: [],
      reactions: [
        BODY.reactions[1],
        { ...BODY.reactions[1], name: "makeC", reactants: [], products: [{ species: "rptC", count: 1 }] },
      ],
    };
    renderWithProviders(<CircuitEditor initial={noSignal} submitLabel="Save" onSubmit={jest.fn()} />);
    fireEvent.press(screen.getAllByLabelText("Regulated (Hill)")[1]);
    expect(screen.getByLabelText("Regulator 1 of makeC").props.value).toBe("actA");
    // With a signal in the circuit, the signal is the first choice.
    fireEvent.press(screen.getByLabelText("Add signal"));
    fireEvent.changeText(screen.getByLabelText("Signal 1 name"), "feed");
    fireEvent.press(screen.getAllByLabelText("Mass action")[1]);
    fireEvent.press(screen.getAllByLabelText("Regulated (Hill)")[1]);
    expect(screen.getByLabelText("Regulator 1 of makeC").props.value).toBe("feed");
  });

  test("stacked fields on a phone carry no flex basis (it would become blank height)", () => {
    renderWithProviders(<CircuitEditor initial={BODY} submitLabel="Save" onSubmit={jest.fn()} />);
    const field = screen.getByLabelText("Initial count of rptC (molecules)");
    type Node = { props: { style?: unknown }; parent: Node | null };
    let node: Node | null = field as unknown as Node;
    const bases: unknown[] = [];
    while (node) {
      const flat = [node.props.style].flat(Infinity) as ({ flexBasis?: unknown } | null)[];
      for (const st of flat) if (st && typeof st === "object" && "flexBasis" in st) bases.push(st.flexBasis);
      node = node.parent;
    }
    expect(bases).toEqual([]);
  });
});
