/** The number-writing rules of shared/number-format.ts in words (the definitions page and docs/metrics.md). */
export const NUMBER_RULES = [
  "Three significant figures, trailing zeros dropped: 12.3 min, 40 molecules, 12,300.",
  "Scientific notation below 0.001 and from 100,000 up, written 4.78 × 10⁻⁴.",
  "Probabilities as percent from 0.1% up (47.8%, 0.12%); smaller ones as a fraction, 4.8 × 10⁻⁶, never as a tiny percent.",
  "A unit is always shown with a figure that has one.",
  "A dash (–) is a figure that is not defined; “not reached” is a median the data never reach, written once even when both ends of its interval are open.",
];
