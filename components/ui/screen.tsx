import React from "react";
import { ScrollView, View, type StyleProp, type ViewStyle } from "react-native";
import { useSafeAreaInsets } from "react-native-safe-area-context";
import { useTheme } from "@/components/theme/use-theme";
import { MAX_CONTENT_WIDTH } from "@/components/theme/tokens";
import { useBreakpoints } from "@/components/theme/use-breakpoints";
import type { Href } from "expo-router";
import { Text } from "./text";
import { Icon } from "./icon";
import { PressableLink } from "./pressable-link";

/**
 * One wrapper per screen: safe-area padding, a scrolling column capped at
 * MAX_CONTENT_WIDTH and centred, an optional title row with actions, and on
 * detail pages a visible link back to the list they came from.
 */
export function Screen({
  title,
  subtitle,
  back,
  actions,
  children,
  scroll = true,
  contentStyle,
  testID,
}: {
  title?: string;
  subtitle?: string;
  /** A link back up ("Runs", "Circuit Tank sensor"...), shown above the title. */
  back?: { href: Href; label: string };
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
      {back ? (
        <PressableLink
          href={back.href}
          accessibilityLabel={`Back to ${back.label}`}
          aria-label={`Back to ${back.label}`}
          testID="back-link"
          style={({ hovered }: { pressed: boolean; hovered?: boolean }) => ({
            flexDirection: "row",
            alignItems: "center",
            alignSelf: "flex-start",
            gap: t.spacing.xs,
            minHeight: 44,
            minWidth: 44,
            paddingRight: t.spacing.sm,
            marginBottom: -t.spacing.md,
            opacity: hovered ? 0.8 : 1,
          })}
        >
          <Icon name="chevron-left" size={18} color={t.colors.primary} />
          <Text variant="label" tone="primary">
            {back.label}
          </Text>
        </PressableLink>
      ) : null}
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
            // maxWidth: a confirmation question in the actions wraps within the screen instead of running past it
            <View
              style={{ flexDirection: "row", flexWrap: "wrap", gap: t.spacing.sm, flexShrink: 1, maxWidth: "100%" }}
            >
              {actions}
            </View>
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
