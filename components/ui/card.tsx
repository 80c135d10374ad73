import React from "react";
import { Pressable, View, type StyleProp, type ViewStyle } from "react-native";
import { useTheme } from "@/components/theme/use-theme";

/** A surface with a border and padding. With onPress it becomes a link-like pressable with an accessible label. */
export function Card({
  children,
  style,
  onPress,
  accessibilityLabel,
  testID,
}: {
  children: React.ReactNode;
  style?: StyleProp<ViewStyle>;
  onPress?: () => void;
  accessibilityLabel?: string;
  testID?: string;
}) {
  const t = useTheme();
  const base: ViewStyle = {
    backgroundColor: t.colors.surface,
    borderRadius: t.radii.lg,
    borderWidth: 1,
    borderColor: t.colors.divider,
    padding: t.spacing.lg,
    gap: t.spacing.sm,
  };
  if (onPress) {
    return (
      <Pressable
        role="link"
        accessibilityRole="link"
        accessibilityLabel={accessibilityLabel}
        onPress={onPress}
        testID={testID}
        style={({ hovered, focused }: { pressed: boolean; hovered?: boolean; focused?: boolean }) => [
          base,
          { minHeight: 44 },
          hovered ? { borderColor: t.colors.border } : null,
          focused ? { borderColor: t.colors.focus, borderWidth: 2 } : null,
          style,
        ]}
      >
        {children}
      </Pressable>
    );
  }
  return (
    <View style={[base, style]} testID={testID}>
      {children}
    </View>
  );
}
