import React from "react";
import { View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { Text } from "./text";
import { Icon } from "./icon";

export const SAFETY_NOTE =
  "Linger results are model predictions, not measurements. They guide design and experiments and do not replace them; designs meant for release follow your local biosafety rules and review.";

/** The short note shown wherever results appear. */
export function SafetyNote({ compact }: { compact?: boolean }) {
  const t = useTheme();
  return (
    <View
      role="note"
      aria-label="Note on results"
      testID="safety-note"
      style={{
        flexDirection: "row",
        gap: t.spacing.sm,
        alignItems: "flex-start",
        backgroundColor: t.colors.noticeSoft,
        borderRadius: t.radii.md,
        padding: compact ? t.spacing.sm : t.spacing.md,
      }}
    >
      <Icon name="info" size={18} color={t.colors.onNoticeSoft} />
      <Text variant="caption" tone="notice" style={{ flex: 1 }}>
        {SAFETY_NOTE}
      </Text>
    </View>
  );
}
