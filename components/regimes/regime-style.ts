/**
 * One look per behaviour label, for maps and badges: a fill colour and a
 * symbol, so labels are told apart without colour (WCAG 2.1 SC 1.4.1, use of
 * colour). Fills are the Okabe-Ito colour-blind-safe palette (Okabe & Ito
 * 2008, "Color Universal Design"), darkened where needed, plus greys; the
 * symbol's ink is black or white, whichever contrasts more, and every pair
 * meets 4.5:1 (tests/components/regime-style.test.tsx).
 */
import type { RegimeLabelValue } from "@/shared/schemas/regime";
import { contrastRatio } from "@/components/theme/contrast";

export interface RegimeLook {
  fill: string;
  ink: string;
  /** A single character drawn in the cell and the legend. */
  symbol: string;
  /** Short name for tight legends. */
  short: string;
}

const FILLS: Record<RegimeLabelValue, [string, string, string]> = {
  silent: ["#FFFFFF", "○", "silent"],
  steady: ["#BBBBBB", "—", "steady"],
  follower: ["#56B4E9", "→", "follower"],
  "persistence filter": ["#009E73", "▮", "filter"],
  "pulse generator": ["#E69F00", "▲", "pulse"],
  memory: ["#0072B2", "◆", "memory"],
  "damped oscillation": ["#F0E442", "≈", "damped"],
  "sustained oscillation": ["#D55E00", "∿", "sustained"],
  unclear: ["#555555", "?", "unclear"],
};

export function regimeLook(label: RegimeLabelValue): RegimeLook {
  const [fill, symbol, short] = FILLS[label];
  const ink = contrastRatio(fill, "#000000") >= contrastRatio(fill, "#FFFFFF") ? "#000000" : "#FFFFFF";
  return { fill, ink, symbol, short };
}

/** The look of a cell not computed yet. */
export const PENDING_LOOK: RegimeLook = { fill: "#EEEEEE", ink: "#000000", symbol: "·", short: "not yet" };
