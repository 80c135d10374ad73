import React from "react";
import { View } from "react-native";
import { Slot, type ErrorBoundaryProps } from "expo-router";
import { QueryClientProvider } from "@tanstack/react-query";
import { useFonts } from "expo-font";
import { Inter_400Regular } from "@expo-google-fonts/inter/400Regular";
import { Inter_500Medium } from "@expo-google-fonts/inter/500Medium";
import { Inter_600SemiBold } from "@expo-google-fonts/inter/600SemiBold";
import { Inter_700Bold } from "@expo-google-fonts/inter/700Bold";
import Feather from "@expo/vector-icons/Feather";
// Loaded first so it reads the address the app was opened at before the router rewrites it.
import "@/components/auth/return-path";
import { makeQueryClient } from "@/components/data/query-client";
import { CurrentLabProvider } from "@/components/data/current-lab";
import { useTheme } from "@/components/theme/use-theme";
import { Screen } from "@/components/ui/screen";
import { ErrorState } from "@/components/ui/states";

const queryClient = makeQueryClient();

/** Providers, fonts loaded before first paint (a plain background until then), and the app-wide error boundary. */
export default function RootLayout() {
  const t = useTheme();
  const [loaded, error] = useFonts({
    Inter_400Regular,
    Inter_500Medium,
    Inter_600SemiBold,
    Inter_700Bold,
    ...Feather.font,
  });
  if (!loaded && !error) return <View style={{ flex: 1, backgroundColor: t.colors.background }} testID="font-splash" />;
  return (
    <QueryClientProvider client={queryClient}>
      <CurrentLabProvider>
        <Slot />
      </CurrentLabProvider>
    </QueryClientProvider>
  );
}

export function ErrorBoundary({ error, retry }: ErrorBoundaryProps) {
  return (
    <Screen title="Linger">
      <ErrorState title="This screen failed to load" error={error} onRetry={retry} />
    </Screen>
  );
}
