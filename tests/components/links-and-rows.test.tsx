import React from "react";
import { fireEvent, screen } from "@testing-library/react-native";
import { safeReturnPath, signInHrefFor } from "@/components/auth/return-path";
import { RunRow, runHeadlineLabel } from "@/components/ui/run-row";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { PulseCard, type PulseRow } from "@/components/runs/pulse-table";
import { renderWithProviders } from "./render";

describe("the page to return to after signing in", () => {
  test("a path on this site comes back with its query", () => {
    expect(safeReturnPath("/runs/run_1")).toBe("/runs/run_1");
    expect(safeReturnPath("/compare?ids=a,b")).toBe("/compare?ids=a,b");
    expect(safeReturnPath(["/sweeps/s1"])).toBe("/sweeps/s1");
  });

  test("other sites, schemes, odd characters and the sign-in pages go home instead", () => {
    for (const bad of [
      "//evil.example/runs",
      "/\\evil.example",
      "https://evil.example/",
      "javascript:alert(1)",
      "runs/1",
      "/runs/1\n",
      "/ /evil",
      "/sign-in?next=/runs/1",
      "/sign-up",
      "",
      undefined,
      42,
    ])
      expect(safeReturnPath(bad)).toBe("/");
  });

  test("the sign-in link carries the page in next, except for home", () => {
    expect(signInHrefFor("/runs/run_1?x=1")).toBe("/sign-in?next=%2Fruns%2Frun_1%3Fx%3D1");
    expect(signInHrefFor("/")).toBe("/sign-in");
    expect(signInHrefFor("//evil.example")).toBe("/sign-in");
  });
});

describe("run rows tell runs apart", () => {
  const base = {
    id: "run_a",
    name: "Tank sensor, hold on Duration ladder with a long name that would have been cut",
    status: "finished",
    replicates: 200,
    replicatesDone: 200,
    circuitName: "Tank sensor, hold",
    programName: "Duration ladder",
    createdAt: "2026-03-04T09:05:00.000Z",
    createdBy: "Ada Editor",
    seed: "12345",
    headline: { d50: 7.5, falsePassRate: 0.04, medianDelay: 12 },
  };

  test("whole name, date, author, seed and headline figures; the row is a link", () => {
    renderWithProviders(<RunRow run={base} href="/runs/run_a" />);
    const name = screen.getByText(base.name);
    expect(name.props.numberOfLines).toBeUndefined();
    expect(screen.getByTestId("run-row-when-run_a").props.children).toMatch(/2026.*by Ada Editor · seed 12345/);
    expect(screen.getByTestId("run-row-figures-run_a").props.children).toBe(
      "d50 7.5 min · false pass 4% · median delay 12 min",
    );
    expect(screen.getByTestId("run-row-run_a").props.href).toBe("/runs/run_a");
    expect(screen.getByTestId("run-row-run_a").props.role).toBe("link");
  });

  test("no figures before a run finishes", () => {
    expect(runHeadlineLabel(null)).toBe("");
    expect(runHeadlineLabel({ d50: null, falsePassRate: null, medianDelay: 3 })).toBe("median delay 3 min");
  });
});

test("a card that is one of several choices is a radio, not a link", () => {
  renderWithProviders(
    <Card onPress={() => {}} checked accessibilityLabel="Hold template">
      <Text>Hold</Text>
    </Card>,
  );
  const card = screen.getByLabelText("Hold template");
  expect(card.props.role).toBe("radio");
  expect(card.props.accessibilityState).toEqual({ checked: true });
  expect(card.props.href).toBeUndefined();
});

test("a phone pulse card shows passed, delay and width, the rest one tap away", () => {
  const row: PulseRow = {
    replicate: 3,
    pulseIndex: 2,
    on: 60,
    off: 65,
    durationBin: 5,
    excluded: false,
    passed: false,
    delay: null,
    offDelay: null,
    width: null,
    peak: 4,
    timeToPeak: 2,
    fwhm: null,
  };
  renderWithProviders(<PulseCard row={row} />);
  expect(screen.getByText("Replicate 3, pulse 2 (5 min)")).toBeTruthy();
  expect(screen.getByText("Not passed")).toBeTruthy();
  expect(screen.getByText("Delay none · width –")).toBeTruthy();
  expect(screen.queryByTestId("pulse-more")).toBeNull();
  fireEvent.press(screen.getByLabelText("More figures for Replicate 3, pulse 2 (5 min)"));
  expect(screen.getByTestId("pulse-more")).toBeTruthy();
});
