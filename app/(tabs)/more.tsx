import React from "react";
import { View } from "react-native";
import { Screen } from "@/components/ui/screen";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { Icon } from "@/components/ui/icon";
import { navItemsFor } from "@/components/ui/nav-items";
import { useMe } from "@/components/data/use-me";
import { useTheme } from "@/components/theme/use-theme";

/** Phone only: the sections that do not fit in the tab bar. */
export default function More() {
  const t = useTheme();
  const me = useMe();
  return (
    <Screen title="More">
      <View style={{ gap: t.spacing.sm }}>
        {navItemsFor({ isSiteAdmin: me.data?.user.isSiteAdmin })
          .filter((i) => !i.phoneTab)
          .map((i) => (
            <Card key={i.href} href={i.href} accessibilityLabel={i.label}>
              <View style={{ flexDirection: "row", gap: t.spacing.md, alignItems: "center" }}>
                <Icon name={i.icon} color={t.colors.primary} />
                <Text variant="bodyStrong">{i.label}</Text>
              </View>
            </Card>
          ))}
      </View>
    </Screen>
  );
}
