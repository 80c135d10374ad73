import React from "react";
import { View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";

/** A horizontal progress bar, 0..1, with an accessible value. */
export function ProgressBar({ value, color, label }: { value: number; color?: string; label: string }) {
  const t = useTheme();
  const v = Math.max(0, Math.min(1, Number.isFinite(value) ? value : 0));
  return (
    <View
      role="progressbar"
      aria-label={label}
      aria-valuemin={0}
      aria-valuemax={100}
      aria-valuenow={Math.round(v * 100)}
      style={{ height: 8, borderRadius: 4, backgroundColor: t.colors.surfaceAlt, overflow: "hidden" }}
    >
      <View
        style={{ width: `${v * 100}%`, height: "100%", backgroundColor: color ?? t.colors.primary, borderRadius: 4 }}
      />
    </View>
  );
}
