import { contrastRatio } from "@/components/theme/contrast";
import { darkPalette, lightPalette, type Palette } from "@/components/theme/tokens";

// WCAG 2.1 SC 1.4.3: 4.5:1 for normal text; SC 1.4.11: 3:1 for UI component boundaries.
describe("theme colours meet WCAG 2.1 AA", () => {
  test("contrastRatio matches the WCAG definition at the extremes", () => {
    // Black on white is 21:1 by the WCAG 2.1 formula ((1 + 0.05) / (0 + 0.05)).
    expect(contrastRatio("#000000", "#FFFFFF")).toBeCloseTo(21, 5);
    expect(contrastRatio("#777777", "#777777")).toBeCloseTo(1, 5);
  });

  for (const [name, p] of [
    ["light", lightPalette],
    ["dark", darkPalette],
  ] as [string, Palette][]) {
    test(`${name}: text pairs >= 4.5:1`, () => {
      const pairs: [string, string, string][] = [
        ["text/background", p.text, p.background],
        ["text/surface", p.text, p.surface],
        ["text/surfaceAlt", p.text, p.surfaceAlt],
        ["muted/background", p.textMuted, p.background],
        ["muted/surface", p.textMuted, p.surface],
        ["muted/surfaceAlt", p.textMuted, p.surfaceAlt],
        ["primary/surface", p.primary, p.surface],
        ["primary/background", p.primary, p.background],
        ["onPrimary/primary", p.onPrimary, p.primary],
        ["onPrimary/danger", p.onPrimary, p.danger],
        ["onPrimarySoft/primarySoft", p.onPrimarySoft, p.primarySoft],
        ["danger/surface", p.danger, p.surface],
        ["danger/background", p.danger, p.background],
        ["onDangerSoft/dangerSoft", p.onDangerSoft, p.dangerSoft],
        ["onNoticeSoft/noticeSoft", p.onNoticeSoft, p.noticeSoft],
        ...Object.entries(p.status).map(([k, c]) => [`status ${k}/surface`, c, p.surface] as [string, string, string]),
      ];
      for (const [label, fg, bg] of pairs) {
        expect({ label, ratio: contrastRatio(fg, bg) >= 4.5 }).toEqual({ label, ratio: true });
      }
    });

    test(`${name}: control borders and chart series >= 3:1 on surface`, () => {
      expect(contrastRatio(p.border, p.surface)).toBeGreaterThanOrEqual(3);
      for (const c of p.series) expect({ c, ok: contrastRatio(c, p.surface) >= 3 }).toEqual({ c, ok: true });
    });
  }
});
