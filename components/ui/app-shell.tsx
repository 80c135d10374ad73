import React from "react";
import { View } from "react-native";
import { useSafeAreaInsets } from "react-native-safe-area-context";
import { useTheme } from "@/components/theme/use-theme";
import { useBreakpoints } from "@/components/theme/use-breakpoints";
import { MIN_TOUCH } from "@/components/theme/tokens";
import { Text } from "./text";
import { Icon } from "./icon";
import { PressableLink } from "./pressable-link";
import { navItemsFor, MORE_ITEM, isActive, type NavItem } from "./nav-items";

type ShellProps = {
  pathname: string;
  labName?: string;
  /** Shows the Admin section. */
  isSiteAdmin?: boolean;
  children: React.ReactNode;
};

/**
 * The signed-in frame. The width check runs at run time: a phone browser
 * (< 768 px) gets bottom tabs, a wide window gets a side navigation.
 */
export function AppShell(props: ShellProps) {
  const { isWide } = useBreakpoints();
  return isWide ? <SideNavShell {...props} /> : <BottomTabsShell {...props} />;
}

function NavButton({ item, active, layout }: { item: NavItem; active: boolean; layout: "tab" | "side" }) {
  const t = useTheme();
  const color = active ? t.colors.primary : t.colors.textMuted;
  return (
    <PressableLink
      href={item.href}
      accessibilityLabel={item.label}
      aria-label={item.label}
      aria-current={active ? "page" : undefined}
      testID={`nav-${item.label.toLowerCase().replace(/[^a-z]+/g, "-")}`}
      style={({ hovered, focused }: { pressed: boolean; hovered?: boolean; focused?: boolean }) =>
        layout === "tab"
          ? {
              flex: 1,
              minHeight: 56,
              minWidth: MIN_TOUCH,
              alignItems: "center",
              justifyContent: "center",
              gap: 2,
              borderTopWidth: 3,
              borderTopColor: active ? t.colors.primary : "transparent",
              outlineColor: focused ? t.colors.focus : undefined,
            }
          : {
              flexDirection: "row",
              alignItems: "center",
              gap: t.spacing.md,
              minHeight: MIN_TOUCH,
              paddingHorizontal: t.spacing.md,
              borderRadius: t.radii.md,
              backgroundColor: active ? t.colors.primarySoft : hovered ? t.colors.surfaceAlt : "transparent",
            }
      }
    >
      <Icon
        name={item.icon}
        size={layout === "tab" ? 22 : 20}
        color={active && layout === "side" ? t.colors.onPrimarySoft : color}
      />
      <Text
        variant={layout === "tab" ? "caption" : "label"}
        style={{
          color: active && layout === "side" ? t.colors.onPrimarySoft : color,
          fontFamily: active ? t.fonts.semibold : t.fonts.medium,
        }}
      >
        {item.label}
      </Text>
    </PressableLink>
  );
}

function BottomTabsShell({ pathname, children }: ShellProps) {
  const t = useTheme();
  const insets = useSafeAreaInsets();
  const tabs = [...navItemsFor().filter((i) => i.phoneTab), MORE_ITEM];
  return (
    <View style={{ flex: 1, backgroundColor: t.colors.background }} testID="layout-phone">
      <View style={{ flex: 1 }}>{children}</View>
      <View
        role="navigation"
        aria-label="Sections"
        style={{
          flexDirection: "row",
          backgroundColor: t.colors.surface,
          borderTopWidth: 1,
          borderTopColor: t.colors.divider,
          paddingBottom: insets.bottom,
        }}
      >
        {tabs.map((item) => (
          <NavButton key={item.href} item={item} active={isActive(item, pathname)} layout="tab" />
        ))}
      </View>
    </View>
  );
}

function SideNavShell({ pathname, labName, isSiteAdmin, children }: ShellProps) {
  const t = useTheme();
  return (
    <View style={{ flex: 1, flexDirection: "row", backgroundColor: t.colors.background }} testID="layout-wide">
      <View
        role="navigation"
        aria-label="Sections"
        style={{
          width: 232,
          backgroundColor: t.colors.surface,
          borderRightWidth: 1,
          borderRightColor: t.colors.divider,
          padding: t.spacing.lg,
          gap: t.spacing.xs,
        }}
      >
        <View style={{ paddingHorizontal: t.spacing.md, paddingBottom: t.spacing.lg, gap: 2 }}>
          <Text variant="title" tone="primary">
            Linger
          </Text>
          {labName ? (
            <Text variant="caption" tone="muted" numberOfLines={2}>
              {labName}
            </Text>
          ) : null}
        </View>
        {navItemsFor({ isSiteAdmin }).map((item) => (
          <NavButton key={item.href} item={item} active={isActive(item, pathname)} layout="side" />
        ))}
      </View>
      <View style={{ flex: 1 }}>{children}</View>
    </View>
  );
}
