import React from "react";
import { View, type StyleProp, type ViewStyle } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { Text } from "./text";

/** One headline figure: label, value, a line of detail. */
export function StatCard({
  label,
  value,
  detail,
  testID,
  style,
  extra,
}: {
  label: string;
  value: string;
  detail?: string;
  /** Shown under the detail, e.g. a link to the figure's definition. */
  extra?: React.ReactNode;
  testID?: string;
  style?: StyleProp<ViewStyle>;
}) {
  const t = useTheme();
  return (
    <View
      testID={testID}
      style={[
        {
          backgroundColor: t.colors.surface,
          borderRadius: t.radii.lg,
          borderWidth: 1,
          borderColor: t.colors.divider,
          padding: t.spacing.lg,
          gap: t.spacing.xs,
        },
        style,
      ]}
    >
      <Text variant="label" tone="muted">
        {label}
      </Text>
      <Text variant="title">{value}</Text>
      {detail ? (
        <Text variant="caption" tone="muted">
          {detail}
        </Text>
      ) : null}
      {extra}
    </View>
  );
}
