import React from "react";
import { View } from "react-native";
import { Redirect, Slot, useGlobalSearchParams } from "expo-router";
import { useMe } from "@/components/data/use-me";
import { useTheme } from "@/components/theme/use-theme";
import { safeReturnPath } from "@/components/auth/return-path";

/** Signed-out pages: a narrow centred column. A signed-in visitor goes home, or to the page in `next`. */
export default function AuthLayout() {
  const t = useTheme();
  const me = useMe();
  const { next } = useGlobalSearchParams<{ next?: string }>();
  if (me.data) return <Redirect href={safeReturnPath(next)} />;
  return (
    <View style={{ flex: 1, backgroundColor: t.colors.background }}>
      <Slot />
    </View>
  );
}
