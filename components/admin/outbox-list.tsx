import React from "react";
import { View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { Text } from "@/components/ui/text";
import type { OutboxMessage } from "@/components/data/admin";

const when = (iso: string) =>
  new Date(iso).toLocaleString("en-GB", {
    day: "numeric",
    month: "short",
    hour: "2-digit",
    minute: "2-digit",
    second: "2-digit",
    timeZone: "UTC",
  }) + " UTC";

/** Mail kept by the local fake SMTP server, newest first: subject, recipient, time and the plain text. */
export function OutboxList({ messages }: { messages: OutboxMessage[] }) {
  const t = useTheme();
  return (
    <View role="list" testID="outbox-list">
      {messages.map((m) => (
        <View
          key={m.id}
          role="listitem"
          style={{
            gap: t.spacing.xs,
            paddingVertical: t.spacing.md,
            borderTopWidth: 1,
            borderTopColor: t.colors.divider,
          }}
          testID={`outbox-${m.id}`}
        >
          <Text variant="bodyStrong">{m.subject}</Text>
          <Text variant="caption" tone="muted">{`to ${m.to} · ${when(m.receivedAt)}`}</Text>
          <View style={{ backgroundColor: t.colors.surfaceAlt, borderRadius: t.radii.md, padding: t.spacing.md }}>
            <Text selectable style={{ fontFamily: t.fonts.regular }}>
              {m.text}
            </Text>
          </View>
        </View>
      ))}
    </View>
  );
}
