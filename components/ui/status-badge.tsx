import React from "react";
import { View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import type { RunStatusName } from "@/components/theme/tokens";
import { Text } from "./text";

const LABELS: Record<RunStatusName, string> = {
  queued: "Queued",
  running: "Running",
  finished: "Finished",
  failed: "Failed",
  capped: "Stopped at cap",
  cancelled: "Cancelled",
};

export function statusLabel(status: string): string {
  return LABELS[status as RunStatusName] ?? status;
}

/** Run status as a coloured outline pill; the colour is never the only cue (the word is always shown). */
export function StatusBadge({ status }: { status: string }) {
  const t = useTheme();
  const color = t.colors.status[status as RunStatusName] ?? t.colors.textMuted;
  return (
    <View
      style={{
        alignSelf: "flex-start",
        borderWidth: 1.5,
        borderColor: color,
        borderRadius: t.radii.pill,
        paddingHorizontal: t.spacing.sm,
        paddingVertical: 1,
      }}
    >
      <Text variant="caption" style={{ color, fontFamily: t.fonts.semibold }}>
        {statusLabel(status)}
      </Text>
    </View>
  );
}
