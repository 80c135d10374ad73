import React from "react";
import { screen } from "@testing-library/react-native";
import { RegimeCard } from "@/components/regimes/regime-card";
import {
  differenceSentence,
  verdictMeaning,
  wiringPhrase,
  wiringVersusBehaviour,
} from "@/components/regimes/regime-words";
import { regimeLook, PENDING_LOOK } from "@/components/regimes/regime-style";
import { contrastRatio } from "@/components/theme/contrast";
import { REGIME_LABEL_VALUES, type RunRegimeView } from "@/shared/schemas/regime";
import { renderWithProviders } from "./render";

const regime = (
  d: RunRegimeView["deterministic"]["label"],
  s: RunRegimeView["stochastic"]["label"],
): RunRegimeView => ({
  deterministic: { label: d, evidence: { peakRatio: 0.58, periodMinutes: 4.2 } },
  stochastic: { label: s, evidence: { acfFirstPeak: 0.43, amplitudeCv: 0.5, quasiCycles: 1 } },
});

describe("regime card", () => {
  test("both labels side by side with their evidence in words", () => {
    renderWithProviders(<RegimeCard regime={regime("damped oscillation", "damped oscillation")} />);
    expect(screen.getByTestId("regime-deterministic-label")).toHaveTextContent(/damped oscillation/);
    expect(screen.getByTestId("regime-stochastic-label")).toHaveTextContent(/damped oscillation/);
    expect(screen.getByText("peak coherence (autocorrelation one period later)")).toBeTruthy();
    expect(screen.getByText("0.43")).toBeTruthy();
    expect(screen.getByText(/noise-driven quasi-cycles, not a limit cycle/)).toBeTruthy();
    expect(screen.getByTestId("regime-agrees")).toBeTruthy();
    expect(screen.queryByTestId("regime-differs")).toBeNull();
  });

  test("a sentence when the labels differ", () => {
    renderWithProviders(<RegimeCard regime={regime("steady", "damped oscillation")} />);
    expect(screen.getByTestId("regime-differs")).toHaveTextContent(
      /mean-field model says steady, the stochastic ensemble says a damped oscillator/,
    );
  });

  test("words: difference, unclear reason, wiring beside behaviour", () => {
    expect(differenceSentence(regime("memory", "memory"))).toBeNull();
    expect(verdictMeaning({ label: "unclear", evidence: {}, reason: "no steady state found" })).toBe(
      "Unclear: no steady state found.",
    );
    expect(wiringVersusBehaviour("an incoherent type-1 feed-forward circuit", regime("follower", "follower"))).toBe(
      "Wired as an incoherent type-1 feed-forward circuit; at these parameters it behaves as a follower.",
    );
    expect(wiringVersusBehaviour("a loop", regime("memory", "steady"))).toBe(
      "Wired as a loop; at these parameters, in the mean-field model it behaves as a switch with memory, and with molecular noise it is steady.",
    );
  });
});

// WCAG 2.1 SC 1.4.3 (4.5:1 for text): each label's symbol ink on its fill; SC 1.4.1: labels differ by symbol too.
describe("wiring phrase", () => {
  const rep = (from: string, to: string) => ({ from, to, sign: "represses" as const });
  test("feed-forward label, negative autoregulation, a repressor loop, no feedback", () => {
    expect(wiringPhrase({ label: "incoherent type 1" }, [], [])).toBe("an incoherent type 1 feed-forward circuit");
    expect(wiringPhrase(null, [rep("limA", "limA")], ["limA"])).toBe(
      "a self-repressing gene (negative autoregulation)",
    );
    expect(wiringPhrase(null, [rep("a", "b"), rep("b", "c"), rep("c", "a")], ["a", "b", "c"])).toBe(
      "a feedback loop of repressors",
    );
    expect(
      wiringPhrase(
        null,
        [
          { from: "Q", to: "a", sign: "activates" },
          { from: "a", to: "b", sign: "activates" },
        ],
        ["a", "b"],
      ),
    ).toBe("a circuit without feedback");
  });
});

describe("regime looks", () => {
  test("every label's symbol contrasts with its fill at 4.5:1 or more, and symbols are distinct", () => {
    const looks = REGIME_LABEL_VALUES.map(regimeLook);
    for (const [i, l] of looks.entries())
      expect([REGIME_LABEL_VALUES[i], contrastRatio(l.ink, l.fill) >= 4.5]).toEqual([REGIME_LABEL_VALUES[i], true]);
    expect(contrastRatio(PENDING_LOOK.ink, PENDING_LOOK.fill)).toBeGreaterThanOrEqual(4.5);
    expect(new Set(looks.map((l) => l.symbol)).size).toBe(looks.length);
    expect(new Set(looks.map((l) => l.fill)).size).toBe(looks.length);
  });
});
