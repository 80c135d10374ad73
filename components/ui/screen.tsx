import React from "react";
import { ScrollView, View, type StyleProp, type ViewStyle } from "react-native";
import { useSafeAreaInsets } from "react-native-safe-area-context";
import { useTheme } from "@/components/theme/use-theme";
import { MAX_CONTENT_WIDTH } from "@/components/theme/tokens";
import { useBreakpoints } from "@/components/theme/use-breakpoints";
import { Text } from "./text";

/**
 * One wrapper per screen: safe-area padding, a scrolling column capped at
 * MAX_CONTENT_WIDTH and centred, an optional title row with actions.
 */
export function Screen({
  title,
  subtitle,
  actions,
  children,
  scroll = true,
  contentStyle,
  testID,
}: {
  title?: string;
  subtitle?: string;
  actions?: React.ReactNode;
  children: React.ReactNode;
  scroll?: boolean;
  contentStyle?: StyleProp<ViewStyle>;
  testID?: string;
}) {
  const t = useTheme();
  const insets = useSafeAreaInsets();
  const { isWide } = useBreakpoints();
  const pad = isWide ? t.spacing.xxl : t.spacing.lg;
  const inner = (
    <View
      style={[
        {
          width: "100%",
          maxWidth: MAX_CONTENT_WIDTH,
          alignSelf: "center",
          paddingHorizontal: pad,
          paddingTop: pad + insets.top,
          paddingBottom: t.spacing.xxxl,
          gap: t.spacing.lg,
        },
        contentStyle,
      ]}
    >
      {title ? (
        <View
          style={{
            flexDirection: "row",
            flexWrap: "wrap",
            alignItems: "center",
            justifyContent: "space-between",
            gap: t.spacing.md,
          }}
        >
          <View style={{ flexShrink: 1, gap: t.spacing.xxs }}>
            <Text variant="title">{title}</Text>
            {subtitle ? <Text tone="muted">{subtitle}</Text> : null}
          </View>
          {actions ? (
            <View style={{ flexDirection: "row", flexWrap: "wrap", gap: t.spacing.sm }}>{actions}</View>
          ) : null}
        </View>
      ) : null}
      {children}
    </View>
  );
  return (
    <View style={{ flex: 1, backgroundColor: t.colors.background }} testID={testID} role="main">
      {scroll ? (
        <ScrollView contentContainerStyle={{ flexGrow: 1 }} keyboardShouldPersistTaps="handled">
          {inner}
        </ScrollView>
      ) : (
        inner
      )}
    </View>
  );
}
