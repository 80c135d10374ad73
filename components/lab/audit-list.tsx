import React from "react";
import { View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { Text } from "@/components/ui/text";
import type { AuditEvent } from "@/components/data/labs";
import { describeAuditEvent, type AuditNames } from "./audit-words";

const when = (iso: string) =>
  new Date(iso).toLocaleString("en-GB", {
    day: "numeric",
    month: "short",
    year: "numeric",
    hour: "2-digit",
    minute: "2-digit",
    timeZone: "UTC",
  }) + " UTC";

/** The audit trail as a list of sentences, newest first. */
export function AuditList({ events, names }: { events: AuditEvent[]; names?: AuditNames }) {
  const t = useTheme();
  return (
    <View role="list" testID="audit-list">
      {events.map((e) => (
        <View
          key={e.id}
          role="listitem"
          style={{ gap: 2, paddingVertical: t.spacing.sm, borderTopWidth: 1, borderTopColor: t.colors.divider }}
        >
          <Text>{describeAuditEvent(e, names)}</Text>
          <Text variant="caption" tone="muted">
            {when(e.at)}
          </Text>
        </View>
      ))}
    </View>
  );
}
