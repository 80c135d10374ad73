import React from "react";
import { View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { Button } from "@/components/ui/button";
import { StatCard } from "@/components/ui/stat-card";
import { formatFactor, formatNumber, formatQuantity } from "@/shared/number-format";
import type { RunDetail } from "@/shared/schemas/api-runs";

export type AccelerationView = NonNullable<RunDetail["acceleration"]>;

/** Ratios within this of 1 read as "about as fast" (a display rule, not a test). */
const SAME_SPEED = 0.02;

/** The T1/2 ratio (control / circuit) in plain words. */
export function halfRiseWords(a: AccelerationView): string {
  const r = a.halfRiseRatio;
  if (r === null || !Number.isFinite(r) || r <= 0)
    return "No T1/2 ratio: the output does not rise in one of the two runs.";
  if (Math.abs(r - 1) <= SAME_SPEED) return `About as fast as the matched control (T1/2 ratio ${formatNumber(r)}).`;
  if (r > 1)
    return `Acceleration: the circuit reaches half its steady level ${formatFactor(r)} faster than the matched control.`;
  return `Slow-down: the circuit reaches half its steady level ${formatFactor(1 / r)} slower than the matched control.`;
}

/** The median-delay difference (circuit minus control) in plain words. */
export function delayWords(a: AccelerationView): string {
  const d = a.medianDelayDifference;
  if (d === null || !Number.isFinite(d))
    return "No median-delay difference: a median response delay was not reached in one of the two runs.";
  if (d === 0) return "The median response delay is the same as the control's.";
  return `The circuit's median response delay is ${formatQuantity(Math.abs(d), "min")} ${d > 0 ? "longer" : "shorter"} than the control's.`;
}

const min = (v: number | null) => (v === null ? "not reached" : `${formatQuantity(v, "min")}`);

/** A circuit run against its finished matched simple-regulation control (shown on both runs), linking to the other one. */
export function AccelerationCard({ acceleration: a, runId }: { acceleration: AccelerationView; runId: string }) {
  const t = useTheme();
  const isControl = runId === a.controlRunId;
  return (
    <Card testID="acceleration-card">
      <Text variant="heading">{isControl ? "This control against its circuit" : "Against the matched control"}</Text>
      <Text testID="acceleration-words">{halfRiseWords(a)}</Text>
      <Text testID="delay-words">{delayWords(a)}</Text>
      <View style={{ flexDirection: "row", flexWrap: "wrap", gap: t.spacing.md }}>
        <StatCard
          style={{ flexGrow: 1, flexBasis: 150 }}
          label="T1/2 ratio (control ÷ circuit)"
          value={a.halfRiseRatio === null ? "–" : formatNumber(a.halfRiseRatio)}
          detail={`T1/2 circuit ${min(a.halfRiseCircuitMinutes)} · control ${min(a.halfRiseControlMinutes)}`}
        />
        <StatCard
          style={{ flexGrow: 1, flexBasis: 150 }}
          label="Median delay, circuit − control"
          value={
            a.medianDelayDifference === null
              ? "–"
              : `${a.medianDelayDifference > 0 ? "+" : ""}${formatQuantity(a.medianDelayDifference, "min")}`
          }
          detail={`circuit ${min(a.medianDelayCircuit)} · control ${min(a.medianDelayControl)}`}
        />
      </View>
      <View style={{ flexDirection: "row" }}>
        <Button
          label={isControl ? "Open the circuit run" : "Open the control run"}
          variant="secondary"
          icon="git-branch"
          compact
          href={`/runs/${isControl ? a.circuitRunId : a.controlRunId}`}
          testID="open-paired-run"
        />
      </View>
    </Card>
  );
}
