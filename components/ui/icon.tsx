import React from "react";
import Feather from "@expo/vector-icons/Feather";

export type IconName = React.ComponentProps<typeof Feather>["name"];

/** The app's one icon set (Feather outlines). Decorative: hidden from screen readers; label the control instead. */
export function Icon({ name, size = 20, color }: { name: IconName; size?: number; color: string }) {
  return (
    <Feather
      name={name}
      size={size}
      color={color}
      aria-hidden
      accessibilityElementsHidden
      importantForAccessibility="no"
    />
  );
}
