/**
 * The behaviour vocabulary (docs/regimes.md): what a circuit does at given
 * parameters, with the named numbers its rule used. The list itself lives with
 * the wire schema (shared/schemas/regime.ts) so client and engine share it.
 */
import { REGIME_LABEL_VALUES } from "@/shared/schemas/regime";

export const REGIME_LABELS = REGIME_LABEL_VALUES;
export type RegimeLabel = (typeof REGIME_LABELS)[number];

export interface RegimeVerdict {
  label: RegimeLabel;
  /** Named numbers the rule used (eigenvalues per minute, periods in minutes, levels in molecules). */
  evidence: Record<string, number | number[] | null>;
  reason?: string;
}
