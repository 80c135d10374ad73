import React from "react";
import { View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { Text } from "@/components/ui/text";
import { Icon } from "@/components/ui/icon";

/** Marks a trace set made by Linger itself (not measured); the word is always shown, never colour alone. */
export function SyntheticBadge({ testID = "synthetic-badge" }: { testID?: string }) {
  const t = useTheme();
  return (
    <View
      testID={testID}
      style={{
        flexDirection: "row",
        alignItems: "center",
        gap: t.spacing.xs,
        alignSelf: "flex-start",
        backgroundColor: t.colors.noticeSoft,
        borderWidth: 1.5,
        borderColor: t.colors.notice,
        borderRadius: t.radii.pill,
        paddingHorizontal: t.spacing.sm,
        paddingVertical: 1,
      }}
    >
      <Icon name="cpu" size={14} color={t.colors.onNoticeSoft} />
      <Text variant="caption" style={{ color: t.colors.onNoticeSoft, fontFamily: t.fonts.semibold }}>
        Synthetic, not measured
      </Text>
    </View>
  );
}

/** The longer explanation shown on a synthetic set's detail. */
export const SYNTHETIC_NOTE =
  "This set is synthetic: Linger made it from a circuit with hidden parameters plus measurement noise, background, scale, missing frames and staggered starts. It is for trying the traces tools, not a measurement.";
