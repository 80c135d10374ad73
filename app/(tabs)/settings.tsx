import React from "react";
import { View } from "react-native";
import { useRouter } from "expo-router";
import { Screen } from "../../components/ui/screen";
import { Card } from "../../components/ui/card";
import { Text } from "../../components/ui/text";
import { Button } from "../../components/ui/button";
import { LabSwitcher } from "../../components/ui/lab-switcher";
import { useMe, useSignOut } from "../../components/data/use-me";
import { useTheme } from "../../components/theme/use-theme";

export default function Settings() {
  const t = useTheme();
  const router = useRouter();
  const me = useMe();
  const signOut = useSignOut();
  return (
    <Screen title="Lab & account">
      <Card>
        <Text variant="heading">Account</Text>
        <Text>{me.data?.user.displayName}</Text>
        <Text tone="muted">{me.data?.user.email}</Text>
      </Card>
      <Card>
        <Text variant="heading">Lab</Text>
        <LabSwitcher />
      </Card>
      <View style={{ flexDirection: "row" }}>
        <Button label="Sign out" variant="secondary" icon="log-out" busy={signOut.isPending} onPress={() => signOut.mutate(undefined, { onSettled: () => router.replace("/sign-in") })} />
      </View>
    </Screen>
  );
}
