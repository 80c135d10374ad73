/**
 * Pearson chi-square goodness of fit of a binomial fit of pass against
 * duration: X^2 = sum (passed - n p)^2 / (n p (1 - p)) over the k durations, on
 * k - 2 degrees of freedom for the two fitted logistic parameters (any
 * statistics handbook, e.g. Agresti 2013, Categorical Data Analysis, 3rd ed.,
 * section 4.5). Returns null when k < 3 (no degrees of freedom left).
 * poorFit = p < 0.05: the logistic shape does not describe the data.
 *
 * @example logisticGoodnessOfFit(counts, fit.fitted)?.poorFit
 */
import { chiSquareUpperTail } from "./chi-square";
import type { PassCount } from "./logistic-fit";

export interface GoodnessOfFit {
  chiSquare: number;
  df: number;
  pValue: number;
  poorFit: boolean;
}

export function logisticGoodnessOfFit(
  counts: readonly PassCount[],
  fitted: readonly { duration: number; passProbability: number }[],
): GoodnessOfFit | null {
  const groups = counts.filter((c) => c.trials > 0);
  if (fitted.length === 0 || groups.length < 3) return null;
  let chiSquare = 0;
  for (const c of groups) {
    const p = fitted.find((x) => x.duration === c.duration)?.passProbability;
    if (p === undefined) return null;
    const v = c.trials * p * (1 - p);
    const r = c.passed - c.trials * p;
    chiSquare += v > 0 ? (r * r) / v : r === 0 ? 0 : Infinity;
  }
  const df = groups.length - 2;
  const pValue = Number.isFinite(chiSquare) ? chiSquareUpperTail(chiSquare, df) : 0;
  return { chiSquare, df, pValue, poorFit: pValue < 0.05 };
}
