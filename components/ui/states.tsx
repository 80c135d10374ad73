import React from "react";
import { ActivityIndicator, View } from "react-native";
import type { Href } from "expo-router";
import { useTheme } from "@/components/theme/use-theme";
import { Text } from "./text";
import { Button } from "./button";
import { Icon, type IconName } from "./icon";

/** Shown when a list has nothing yet, with the one action that fills it. */
export function EmptyState({
  title,
  message,
  actionLabel,
  onAction,
  actionHref,
  icon = "inbox",
}: {
  title: string;
  message?: string;
  actionLabel?: string;
  onAction?: () => void;
  /** Where the action goes (a link rather than a button). */
  actionHref?: Href;
  icon?: IconName;
}) {
  const t = useTheme();
  return (
    <View
      testID="empty-state"
      style={{
        alignItems: "center",
        gap: t.spacing.sm,
        paddingVertical: t.spacing.xxl,
        paddingHorizontal: t.spacing.lg,
      }}
    >
      <Icon name={icon} size={32} color={t.colors.textMuted} />
      <Text variant="heading" align="center">
        {title}
      </Text>
      {message ? (
        <Text tone="muted" align="center">
          {message}
        </Text>
      ) : null}
      {actionLabel && (onAction || actionHref) ? (
        <Button label={actionLabel} onPress={onAction} href={actionHref} style={{ marginTop: t.spacing.sm }} />
      ) : null}
    </View>
  );
}

/** Shown when a request failed, with a retry. */
export function ErrorState({
  title = "Something went wrong",
  error,
  onRetry,
}: {
  title?: string;
  error?: unknown;
  onRetry?: () => void;
}) {
  const t = useTheme();
  const message = error instanceof Error ? error.message : typeof error === "string" ? error : undefined;
  return (
    <View
      role="alert"
      testID="error-state"
      style={{
        gap: t.spacing.sm,
        padding: t.spacing.lg,
        backgroundColor: t.colors.dangerSoft,
        borderRadius: t.radii.md,
      }}
    >
      <View style={{ flexDirection: "row", gap: t.spacing.sm, alignItems: "center" }}>
        <Icon name="alert-triangle" color={t.colors.onDangerSoft} />
        <Text variant="bodyStrong" style={{ color: t.colors.onDangerSoft }}>
          {title}
        </Text>
      </View>
      {message ? <Text style={{ color: t.colors.onDangerSoft }}>{message}</Text> : null}
      {onRetry ? (
        <Button label="Try again" variant="secondary" onPress={onRetry} style={{ alignSelf: "flex-start" }} />
      ) : null}
    </View>
  );
}

export function LoadingState({ label = "Loading" }: { label?: string }) {
  const t = useTheme();
  return (
    <View
      testID="loading-state"
      role="progressbar"
      aria-label={label}
      style={{ alignItems: "center", gap: t.spacing.sm, paddingVertical: t.spacing.xxl }}
    >
      {/* decorative: the labelled progressbar is the wrapper */}
      <ActivityIndicator color={t.colors.primary} aria-hidden />
      <Text tone="muted">{label}…</Text>
    </View>
  );
}

/** Inline banner for form-level errors and confirmations. */
export function Banner({
  tone,
  children,
  testID,
}: {
  tone: "danger" | "notice" | "success";
  children: React.ReactNode;
  testID?: string;
}) {
  const t = useTheme();
  const bg = tone === "danger" ? t.colors.dangerSoft : tone === "notice" ? t.colors.noticeSoft : t.colors.primarySoft;
  const fg =
    tone === "danger" ? t.colors.onDangerSoft : tone === "notice" ? t.colors.onNoticeSoft : t.colors.onPrimarySoft;
  return (
    <View
      role={tone === "danger" ? "alert" : "status"}
      testID={testID}
      style={{ backgroundColor: bg, borderRadius: t.radii.md, padding: t.spacing.md }}
    >
      {typeof children === "string" ? <Text style={{ color: fg }}>{children}</Text> : children}
    </View>
  );
}
