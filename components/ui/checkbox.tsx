import React from "react";
import { Pressable, View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { MIN_TOUCH } from "@/components/theme/tokens";
import { Text } from "./text";
import { Icon } from "./icon";

export function Checkbox({
  label,
  checked,
  onChange,
  disabled,
  testID,
}: {
  label: string;
  checked: boolean;
  onChange: (v: boolean) => void;
  disabled?: boolean;
  testID?: string;
}) {
  const t = useTheme();
  return (
    <Pressable
      role="checkbox"
      accessibilityRole="checkbox"
      aria-checked={checked}
      accessibilityState={{ checked, disabled }}
      accessibilityLabel={label}
      disabled={disabled}
      onPress={() => onChange(!checked)}
      testID={testID}
      style={{
        minHeight: MIN_TOUCH,
        flexDirection: "row",
        alignItems: "center",
        gap: t.spacing.md,
        opacity: disabled ? 0.55 : 1,
      }}
    >
      <View
        style={{
          width: 24,
          height: 24,
          borderRadius: 6,
          borderWidth: 2,
          borderColor: checked ? t.colors.primary : t.colors.border,
          backgroundColor: checked ? t.colors.primary : t.colors.surface,
          alignItems: "center",
          justifyContent: "center",
        }}
      >
        {checked ? <Icon name="check" size={16} color={t.colors.onPrimary} /> : null}
      </View>
      <Text style={{ flexShrink: 1 }}>{label}</Text>
    </Pressable>
  );
}
