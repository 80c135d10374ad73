import React from "react";
import { Text as RNText, type TextProps, type TextStyle } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import type { TextVariant } from "@/components/theme/tokens";

export type AppTextProps = TextProps & {
  variant?: TextVariant;
  tone?: "default" | "muted" | "primary" | "danger" | "notice" | "onPrimary";
  align?: TextStyle["textAlign"];
};

/** Text in the theme's type scale and colours. Headings get role="heading" on the web. */
export function Text({ variant = "body", tone = "default", align, style, ...rest }: AppTextProps) {
  const t = useTheme();
  const color =
    tone === "muted"
      ? t.colors.textMuted
      : tone === "primary"
        ? t.colors.primary
        : tone === "danger"
          ? t.colors.danger
          : tone === "notice"
            ? t.colors.onNoticeSoft
            : tone === "onPrimary"
              ? t.colors.onPrimary
              : t.colors.text;
  const isHeading = variant === "display" || variant === "title" || variant === "heading";
  return (
    <RNText
      role={isHeading ? "heading" : undefined}
      aria-level={variant === "display" || variant === "title" ? 1 : variant === "heading" ? 2 : undefined}
      {...rest}
      style={[t.type[variant], { color, textAlign: align }, style]}
    />
  );
}
