import React, { useId } from "react";
import { TextInput, View, type KeyboardTypeOptions, type StyleProp, type ViewStyle } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { MIN_TOUCH } from "@/components/theme/tokens";
import { Text } from "./text";

export type FieldProps = {
  label: string;
  value: string;
  onChangeText: (text: string) => void;
  /** Inline error shown under the input (and announced). */
  error?: string;
  hint?: string;
  /** Unit shown after the label, e.g. "per minute". */
  unit?: string;
  placeholder?: string;
  secureTextEntry?: boolean;
  keyboardType?: KeyboardTypeOptions;
  autoComplete?: React.ComponentProps<typeof TextInput>["autoComplete"];
  autoCapitalize?: "none" | "sentences" | "words" | "characters";
  multiline?: boolean;
  testID?: string;
  style?: StyleProp<ViewStyle>;
  onSubmitEditing?: () => void;
  editable?: boolean;
};

/** A labelled text input with an inline validation message. */
export function Field({
  label,
  value,
  onChangeText,
  error,
  hint,
  unit,
  style,
  testID,
  multiline,
  editable = true,
  ...input
}: FieldProps) {
  const t = useTheme();
  const id = useId();
  const errorId = `${id}-error`;
  const fullLabel = unit ? `${label} (${unit})` : label;
  return (
    <View style={[{ gap: t.spacing.xs }, style]}>
      <Text variant="label" nativeID={`${id}-label`}>
        {fullLabel}
      </Text>
      <TextInput
        {...input}
        testID={testID}
        editable={editable}
        multiline={multiline}
        value={value}
        onChangeText={onChangeText}
        accessibilityLabel={fullLabel}
        aria-label={fullLabel}
        aria-invalid={error ? true : undefined}
        aria-describedby={error ? errorId : undefined}
        placeholderTextColor={t.colors.textMuted}
        style={{
          minHeight: multiline ? 88 : MIN_TOUCH,
          borderWidth: error ? 2 : 1.5,
          borderColor: error ? t.colors.danger : t.colors.border,
          borderRadius: t.radii.md,
          paddingHorizontal: t.spacing.md,
          paddingVertical: t.spacing.sm,
          backgroundColor: editable ? t.colors.surface : t.colors.surfaceAlt,
          color: t.colors.text,
          fontFamily: t.fonts.regular,
          fontSize: 16,
          textAlignVertical: multiline ? "top" : "center",
        }}
      />
      {error ? (
        <Text
          variant="caption"
          tone="danger"
          nativeID={errorId}
          role="alert"
          testID={testID ? `${testID}-error` : undefined}
        >
          {error}
        </Text>
      ) : hint ? (
        <Text variant="caption" tone="muted">
          {hint}
        </Text>
      ) : null}
    </View>
  );
}
