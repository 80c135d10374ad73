import React from "react";
import { Pressable, View, type StyleProp, type ViewStyle } from "react-native";
import type { Href } from "expo-router";
import { useTheme } from "@/components/theme/use-theme";
import { PressableLink } from "./pressable-link";

/**
 * A surface with a border and padding. With href it is a real link (`<a href>`
 * on the web) with an accessible label; with onPress alone it is a button, or
 * a radio choice when `checked` is given (put those inside a radiogroup).
 */
export function Card({
  children,
  style,
  href,
  onPress,
  checked,
  accessibilityLabel,
  testID,
}: {
  children: React.ReactNode;
  style?: StyleProp<ViewStyle>;
  /** Where the card goes. */
  href?: Href;
  /** An action that does not go anywhere (use href for navigation). */
  onPress?: () => void;
  /** With onPress: the card is one option of a radio group, checked or not. */
  checked?: boolean;
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
  const pressStyle = ({ hovered, focused }: { pressed: boolean; hovered?: boolean; focused?: boolean }) => [
    base,
    { minHeight: 44 },
    hovered ? { borderColor: t.colors.border } : null,
    focused ? { borderColor: t.colors.focus, borderWidth: 2 } : null,
    style,
  ];
  if (href) {
    return (
      <PressableLink
        href={href}
        accessibilityLabel={accessibilityLabel}
        aria-label={accessibilityLabel}
        onPress={onPress}
        testID={testID}
        style={pressStyle}
      >
        {children}
      </PressableLink>
    );
  }
  if (onPress) {
    return (
      <Pressable
        role={checked === undefined ? "button" : "radio"}
        accessibilityRole={checked === undefined ? "button" : "radio"}
        aria-checked={checked}
        accessibilityState={checked === undefined ? undefined : { checked }}
        accessibilityLabel={accessibilityLabel}
        onPress={onPress}
        testID={testID}
        style={pressStyle}
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
