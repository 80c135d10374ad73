import React from "react";
import { Pressable, View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { MIN_TOUCH } from "@/components/theme/tokens";
import { Text } from "./text";

/** A row of mutually exclusive options (radio group), each >= 44 px. */
export function Choice<T extends string>({
  label,
  value,
  options,
  onChange,
  testID,
}: {
  label: string;
  value: T;
  options: { value: T; label: string }[];
  onChange: (value: T) => void;
  testID?: string;
}) {
  const t = useTheme();
  return (
    <View style={{ gap: t.spacing.xs }} testID={testID}>
      <Text variant="label">{label}</Text>
      <View role="radiogroup" aria-label={label} style={{ flexDirection: "row", flexWrap: "wrap", gap: t.spacing.sm }}>
        {options.map((o) => {
          const selected = o.value === value;
          return (
            <Pressable
              key={o.value}
              role="radio"
              accessibilityRole="radio"
              aria-checked={selected}
              accessibilityState={{ checked: selected }}
              accessibilityLabel={o.label}
              onPress={() => onChange(o.value)}
              testID={testID ? `${testID}-${o.value}` : undefined}
              style={({ focused }: { pressed: boolean; focused?: boolean }) => ({
                minHeight: MIN_TOUCH,
                minWidth: MIN_TOUCH,
                // A long label wraps inside the row instead of running past its container on a phone.
                maxWidth: "100%",
                justifyContent: "center",
                paddingHorizontal: t.spacing.md,
                borderRadius: t.radii.md,
                borderWidth: focused ? 2 : 1.5,
                borderColor: focused ? t.colors.focus : selected ? t.colors.primary : t.colors.border,
                backgroundColor: selected ? t.colors.primarySoft : t.colors.surface,
              })}
            >
              <Text variant="label" style={{ color: selected ? t.colors.onPrimarySoft : t.colors.text }}>
                {o.label}
              </Text>
            </Pressable>
          );
        })}
      </View>
    </View>
  );
}
