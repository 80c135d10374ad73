import React from "react";
import { View } from "react-native";
import { Redirect, Slot } from "expo-router";
import { useMe } from "@/components/data/use-me";
import { useTheme } from "@/components/theme/use-theme";

/** Signed-out pages: a narrow centred column. A signed-in visitor goes home. */
export default function AuthLayout() {
  const t = useTheme();
  const me = useMe();
  if (me.data) return <Redirect href="/" />;
  return (
    <View style={{ flex: 1, backgroundColor: t.colors.background }}>
      <Slot />
    </View>
  );
}
