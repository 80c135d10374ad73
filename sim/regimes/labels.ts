/**
 * The behaviour vocabulary (docs/regimes.md): what a circuit does at given
 * parameters, with the named numbers its rule used.
 */
export const REGIME_LABELS = [
  "silent",
  "steady",
  "follower",
  "persistence filter",
  "pulse generator",
  "memory",
  "damped oscillation",
  "sustained oscillation",
  "unclear",
] as const;
export type RegimeLabel = (typeof REGIME_LABELS)[number];

export interface RegimeVerdict {
  label: RegimeLabel;
  /** Named numbers the rule used (eigenvalues per minute, periods in minutes, levels in molecules). */
  evidence: Record<string, number | number[] | null>;
  reason?: string;
}
