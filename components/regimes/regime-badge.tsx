import React from "react";
import { View } from "react-native";
import { Text } from "@/components/ui/text";
import { useTheme } from "@/components/theme/use-theme";
import type { RegimeLabelValue } from "@/shared/schemas/regime";
import { regimeLook } from "./regime-style";

/** A behaviour label as a pill: its symbol and fill (as on regime maps) and its name. */
export function RegimeBadge({ label, testID }: { label: RegimeLabelValue; testID?: string }) {
  const t = useTheme();
  const look = regimeLook(label);
  return (
    <View
      testID={testID}
      style={{
        flexDirection: "row",
        alignSelf: "flex-start",
        alignItems: "center",
        gap: t.spacing.xs,
        borderRadius: t.radii.pill,
        borderWidth: 1,
        borderColor: t.colors.border,
        backgroundColor: look.fill,
        paddingHorizontal: t.spacing.md,
        paddingVertical: t.spacing.xxs,
      }}
    >
      <Text accessibilityElementsHidden importantForAccessibility="no" style={{ color: look.ink }}>
        {look.symbol}
      </Text>
      <Text variant="bodyStrong" style={{ color: look.ink }}>
        {label}
      </Text>
    </View>
  );
}
