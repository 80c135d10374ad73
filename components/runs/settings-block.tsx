import React from "react";
import { View } from "react-native";
import type { RunSpec } from "@/shared/schemas/run-spec";
import type { RunSettingsBlock } from "@/shared/schemas/analysis";
import { formatCount, formatProbability, formatQuantity } from "@/shared/number-format";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { useTheme } from "@/components/theme/use-theme";
import { DefinitionLink } from "@/components/definitions/definition-link";

/** The simulation method in words when no settings block is stored: "exact" or "approximate" first. */
export function methodLabel(method: RunSpec["method"] | undefined): string {
  return method === "tauLeap"
    ? "Approximate: tau-leaping (Cao, Gillespie & Petzold 2006)"
    : "Exact: direct method (Gillespie 1977)";
}

type Row = { label: string; value: string; detail?: string; term?: string; testID?: string };

/**
 * Every setting a run's figures depend on, in one block (the run's settings block: threshold and how it was
 * found, hysteresis, response window, end time, grid step, method, seed, replicates, warnings). Falls back to
 * the run spec when the run has no settings block yet.
 */
export function SettingsBlock({ settings, spec }: { settings: RunSettingsBlock | null | undefined; spec: RunSpec }) {
  const t = useTheme();
  const s = settings ?? null;
  const rows: Row[] = [
    {
      label: "Threshold",
      term: "threshold",
      testID: "run-threshold",
      value: s
        ? s.thresholdMolecules === null
          ? "none (no input pulses)"
          : `${formatQuantity(s.thresholdMolecules, "molecules")} up, ${formatQuantity(s.downThresholdMolecules, "molecules")} down`
        : spec.threshold.value !== undefined
          ? formatQuantity(spec.threshold.value, "molecules")
          : "default (resolved when the run starts)",
      detail: s ? `${s.thresholdSource === "set" ? "set by you" : s.thresholdSource}: ${s.thresholdRule}` : undefined,
    },
    {
      label: "Hysteresis band",
      term: "hysteresis",
      value: formatProbability(s ? s.hysteresis : spec.threshold.hysteresis),
    },
    {
      label: "Response window",
      term: "window",
      value: s
        ? `${formatQuantity(s.windowMinutes, "min")} after each pulse ends`
        : spec.threshold.windowMinutes !== undefined
          ? formatQuantity(spec.threshold.windowMinutes, "min")
          : "default: 3 output lifetimes",
      detail: s ? (s.windowSource === "set" ? "set by you" : "default: 3 output lifetimes") : undefined,
    },
    {
      label: "Noise duration",
      term: "false-pass-rate",
      value: `pulses under ${formatQuantity(s ? s.noiseDurationMinutes : spec.threshold.noiseDurationMinutes, "min")}`,
    },
    { label: "End time", value: formatQuantity(s ? s.endTimeMinutes : spec.endTimeMinutes, "min") },
    { label: "Grid step", value: formatQuantity(s ? s.gridStepMinutes : spec.gridStepMinutes, "min") },
    {
      label: "Method",
      term: "method",
      value: s ? s.method.label : methodLabel(spec.method),
      detail: s?.method.stepControl?.description,
      testID: "run-method",
    },
    { label: "Seed", value: s ? s.seed : spec.seed },
    { label: "Replicates", value: formatCount(s ? s.replicates : spec.replicates) },
  ];
  return (
    <Card testID="run-settings">
      <Text variant="heading">Settings</Text>
      <View style={{ flexDirection: "row", flexWrap: "wrap", columnGap: t.spacing.lg, rowGap: t.spacing.md }}>
        {rows.map((r) => (
          <View key={r.label} style={{ minWidth: 150, flexGrow: 1, flexBasis: 200, gap: 2 }}>
            <View style={{ flexDirection: "row", gap: t.spacing.xs, alignItems: "center" }}>
              <Text variant="label" tone="muted">
                {r.label}
              </Text>
              {r.term ? <DefinitionLink term={r.term} label={r.label} /> : null}
            </View>
            <Text testID={r.testID}>{r.value}</Text>
            {r.detail ? (
              <Text variant="caption" tone="muted">
                {r.detail}
              </Text>
            ) : null}
          </View>
        ))}
      </View>
      {s?.warnings.map((w) => (
        <Text key={w} tone="notice" testID="run-settings-warning">
          • {w}
        </Text>
      ))}
    </Card>
  );
}
