import React from "react";
import { screen } from "@testing-library/react-native";
import { Dimensions } from "react-native";
import { AppShell } from "@/components/ui/app-shell";
import { Text } from "@/components/ui/text";
import { breakpointsFor } from "@/components/theme/use-breakpoints";
import { renderWithProviders } from "./render";
import { navItemsFor, isActive, MORE_ITEM } from "@/components/ui/nav-items";

function setWidth(width: number) {
  const window = { width, height: 800, scale: 1, fontScale: 1 };
  Dimensions.set({ window, screen: window });
}

describe("AppShell chooses its layout from the window width at run time", () => {
  test("phone width (390 px) gets bottom tabs with More", () => {
    setWidth(390);
    renderWithProviders(
      <AppShell pathname="/">
        <Text>content</Text>
      </AppShell>,
    );
    expect(screen.getByTestId("layout-phone")).toBeTruthy();
    expect(screen.queryByTestId("layout-wide")).toBeNull();
    expect(screen.getByLabelText("More")).toBeTruthy();
    expect(screen.queryByLabelText("Sweeps")).toBeNull();
    // Each tab is a link with its own address (an <a href> on the web).
    expect(screen.getByLabelText("More").props.href).toBe("/more");
    expect(screen.getByLabelText("Runs").props.href).toBe("/runs");
    expect(screen.getByLabelText("Runs").props.role).toBe("link");
  });

  test("wide width (1280 px) gets the side navigation with every section", () => {
    setWidth(1280);
    renderWithProviders(
      <AppShell pathname="/runs/abc" labName="Tank Sensor Group">
        <Text>content</Text>
      </AppShell>,
    );
    expect(screen.getByTestId("layout-wide")).toBeTruthy();
    for (const label of ["Home", "Circuits", "Inputs", "Runs", "Compare", "Sweeps", "Traces", "Lab", "Settings"]) {
      expect(screen.getByLabelText(label)).toBeTruthy();
    }
    expect(screen.getByText("Tank Sensor Group")).toBeTruthy();
    expect(screen.getByLabelText("Runs").props["aria-current"]).toBe("page");
    expect(screen.getByLabelText("Sweeps").props.href).toBe("/sweeps");
    expect(screen.getByLabelText("Home").props.href).toBe("/");
    // the metric definitions are one tap away from every page
    expect(screen.getByLabelText("Definitions").props.href).toBe("/definitions");
    expect(screen.getByLabelText("Definitions").props.role).toBe("link");
  });

  test("phone width: Definitions is on the More page (not a tab) and More is active there", () => {
    const more = navItemsFor().filter((i) => !i.phoneTab);
    expect(more.map((i) => i.href)).toContain("/definitions");
    expect(isActive(MORE_ITEM, "/definitions")).toBe(true);
  });

  test("the breakpoint is 768 px", () => {
    expect(breakpointsFor(767).isWide).toBe(false);
    expect(breakpointsFor(768).isWide).toBe(true);
  });
});
