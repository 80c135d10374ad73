import React from "react";
import { View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { useCurrentLab } from "@/components/data/current-lab";
import { Text } from "./text";
import { Choice } from "./choice";

/** The current lab's name; a chooser when the user belongs to several. */
export function LabSwitcher() {
  const t = useTheme();
  const { lab, labs, choose } = useCurrentLab();
  if (!lab) return <Text tone="muted">You are not in a lab yet. Ask a lab owner for an invitation.</Text>;
  if (labs.length < 2) {
    return (
      <View style={{ gap: 2 }}>
        <Text variant="heading" testID="current-lab-name">
          {lab.name}
        </Text>
        <Text variant="caption" tone="muted">
          Your role: {lab.role}
        </Text>
      </View>
    );
  }
  return (
    <View style={{ gap: t.spacing.xs }}>
      <Text variant="heading" testID="current-lab-name">
        {lab.name}
      </Text>
      <Choice
        label="Switch lab"
        value={lab.id}
        options={labs.map((l) => ({ value: l.id, label: l.name }))}
        onChange={choose}
      />
    </View>
  );
}
