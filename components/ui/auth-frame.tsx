import React from "react";
import { ScrollView, View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { Text } from "./text";
import { Card } from "./card";

/** Frame for the signed-out pages: the product name and one card. */
export function AuthFrame({ title, children }: { title: string; children: React.ReactNode }) {
  const t = useTheme();
  return (
    <ScrollView
      contentContainerStyle={{ flexGrow: 1, justifyContent: "center", padding: t.spacing.lg }}
      keyboardShouldPersistTaps="handled"
    >
      <View role="main" style={{ width: "100%", maxWidth: 440, alignSelf: "center", gap: t.spacing.lg }}>
        <View style={{ gap: t.spacing.xs }}>
          <Text variant="display" tone="primary">
            Linger
          </Text>
          <Text tone="muted">Noise-filter studies for gene circuits</Text>
        </View>
        <Card style={{ gap: t.spacing.lg, padding: t.spacing.xl }}>
          <Text variant="title">{title}</Text>
          {children}
        </Card>
      </View>
    </ScrollView>
  );
}
