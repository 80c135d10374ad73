/**
 * A sweep's progress as the sweep list and the sweep's screen show it: the bar's fraction and the caption.
 * `pointsDone` counts every point that ended (cancelled and failed ones too), `pointsFinished` only the
 * finished ones. While the sweep computes, the bar counts every ended point; once it has stopped, only the
 * finished ones, so a cancelled sweep's bar is not full. When some ended points did not finish, the caption
 * counts them apart: "0 of 3 points finished, 3 cancelled or failed"; otherwise "2 of 3 points".
 */
import { formatCount } from "@/shared/number-format";
import type { RunStatus } from "@/shared/schemas/api-runs";

export interface SweepProgressCounts {
  status: RunStatus;
  pointCount: number;
  pointsDone: number;
  pointsFinished: number;
}

export function sweepProgress(s: SweepProgressCounts): { fraction: number; caption: string } {
  const active = s.status === "queued" || s.status === "running";
  const stopped = s.pointsDone - s.pointsFinished;
  return {
    fraction: s.pointCount ? (active ? s.pointsDone : s.pointsFinished) / s.pointCount : 0,
    caption:
      stopped > 0
        ? `${formatCount(s.pointsFinished)} of ${formatCount(s.pointCount)} points finished, ${formatCount(stopped)} cancelled or failed`
        : `${formatCount(s.pointsDone)} of ${formatCount(s.pointCount)} points`,
  };
}
