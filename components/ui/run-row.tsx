import React from "react";
import { View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import type { RunStatusName } from "@/components/theme/tokens";
import { Card } from "./card";
import { Text } from "./text";
import { StatusBadge } from "./status-badge";
import { ProgressBar } from "./progress-bar";

export type RunRowData = {
  id: string;
  name: string;
  status: string;
  replicates: number;
  replicatesDone?: number;
  circuitName?: string | null;
  programName?: string | null;
};

/** One run in a list: name, status, replicates done, progress bar. */
export function RunRow({ run, onPress }: { run: RunRowData; onPress: () => void }) {
  const t = useTheme();
  const done = run.replicatesDone ?? 0;
  const fraction = run.status === "finished" ? 1 : run.replicates > 0 ? done / run.replicates : 0;
  const color = t.colors.status[run.status as RunStatusName] ?? t.colors.primary;
  const detail = [run.circuitName, run.programName].filter(Boolean).join(" · ");
  return (
    <Card onPress={onPress} testID={`run-row-${run.id}`}>
      <View
        style={{ flexDirection: "row", justifyContent: "space-between", alignItems: "flex-start", gap: t.spacing.sm }}
      >
        <View style={{ flex: 1, gap: 2 }}>
          <Text variant="bodyStrong" numberOfLines={1}>
            {run.name}
          </Text>
          {detail ? (
            <Text variant="caption" tone="muted" numberOfLines={1}>
              {detail}
            </Text>
          ) : null}
        </View>
        <StatusBadge status={run.status} />
      </View>
      <ProgressBar value={fraction} color={color} label={`Progress of ${run.name}`} />
      <Text variant="caption" tone="muted">
        {done.toLocaleString("en")} of {run.replicates.toLocaleString("en")} replicates
      </Text>
    </Card>
  );
}
