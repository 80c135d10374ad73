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

/**
 * A classification that went through every rule but the last two (the pass curve, then "steady"): what those
 * add is settled by settlePassCurve once the run's pass curve is known, so the ensembles and mean-field work
 * can run before the run's replicates are in.
 */
export interface PassCurvePending {
  pendingPassCurve: true;
  /** The evidence a pass-curve verdict is merged into. */
  passCurveBase: RegimeVerdict["evidence"];
  /** The verdict when the pass curve says nothing (or there is none). */
  steady: RegimeVerdict;
}

export const isPassCurvePending = (v: RegimeVerdict | PassCurvePending): v is PassCurvePending =>
  (v as PassCurvePending).pendingPassCurve === true;
