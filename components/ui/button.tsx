import React from "react";
import { ActivityIndicator, Pressable, StyleSheet, View, type StyleProp, type ViewStyle } from "react-native";
import type { Href } from "expo-router";
import { useTheme } from "@/components/theme/use-theme";
import { MIN_TOUCH } from "@/components/theme/tokens";
import { Text } from "./text";
import { Icon, type IconName } from "./icon";
import { PressableLink } from "./pressable-link";

export type ButtonProps = {
  label: string;
  onPress?: () => void;
  /** Makes the button a real link (`<a href>` on the web) to this route. */
  href?: Href;
  variant?: "primary" | "secondary" | "ghost" | "danger";
  icon?: IconName;
  disabled?: boolean;
  busy?: boolean;
  /** Defaults to the label. */
  accessibilityLabel?: string;
  testID?: string;
  style?: StyleProp<ViewStyle>;
  compact?: boolean;
};

/**
 * A button with at least a 44 px touch target and an accessible label. With
 * href it looks the same but is a link, since it goes somewhere.
 */
export function Button({
  label,
  onPress,
  href,
  variant = "primary",
  icon,
  disabled,
  busy,
  accessibilityLabel,
  testID,
  style,
  compact,
}: ButtonProps) {
  const t = useTheme();
  const bg =
    variant === "primary"
      ? t.colors.primary
      : variant === "danger"
        ? t.colors.danger
        : variant === "secondary"
          ? t.colors.surface
          : "transparent";
  const fg = variant === "primary" || variant === "danger" ? t.colors.onPrimary : t.colors.primary;
  const border = variant === "secondary" ? t.colors.border : "transparent";
  const inactive = disabled || busy;
  const pressStyle = ({ pressed, hovered, focused }: { pressed: boolean; hovered?: boolean; focused?: boolean }) => [
    styles.base,
    {
      backgroundColor: bg,
      borderColor: focused ? t.colors.focus : border,
      borderRadius: t.radii.md,
      paddingHorizontal: compact ? t.spacing.md : t.spacing.lg,
      opacity: inactive ? 0.55 : pressed ? 0.85 : 1,
    },
    hovered && variant === "ghost" ? { backgroundColor: t.colors.surfaceAlt } : null,
    style,
  ];
  const content = (
    <View style={styles.row}>
      {busy ? (
        <ActivityIndicator size="small" color={fg} aria-hidden />
      ) : icon ? (
        <Icon name={icon} size={18} color={fg} />
      ) : null}
      <Text variant="label" style={{ color: fg, fontFamily: t.fonts.semibold }}>
        {label}
      </Text>
    </View>
  );
  if (href && !inactive) {
    return (
      <PressableLink
        href={href}
        accessibilityLabel={accessibilityLabel ?? label}
        aria-label={accessibilityLabel ?? label}
        onPress={onPress}
        testID={testID}
        style={pressStyle}
      >
        {content}
      </PressableLink>
    );
  }
  return (
    <Pressable
      role="button"
      accessibilityRole="button"
      accessibilityLabel={accessibilityLabel ?? label}
      accessibilityState={{ disabled: !!inactive, busy: !!busy }}
      aria-disabled={!!inactive}
      disabled={inactive}
      onPress={onPress}
      testID={testID}
      style={pressStyle}
    >
      {content}
    </Pressable>
  );
}

const styles = StyleSheet.create({
  base: { minHeight: MIN_TOUCH, minWidth: MIN_TOUCH, justifyContent: "center", alignItems: "center", borderWidth: 1.5 },
  row: { flexDirection: "row", alignItems: "center", gap: 8 },
});
