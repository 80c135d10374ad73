import React from "react";
import { View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { Text } from "@/components/ui/text";
import type { AdminUser } from "@/components/data/admin";

/** Every account on the instance. */
export function UserList({ users }: { users: AdminUser[] }) {
  const t = useTheme();
  return (
    <View role="list" testID="user-list">
      {users.map((u) => (
        <View
          key={u.id}
          role="listitem"
          style={{ gap: 2, paddingVertical: t.spacing.sm, borderTopWidth: 1, borderTopColor: t.colors.divider }}
        >
          <Text variant="bodyStrong">{`${u.displayName}${u.isSiteAdmin ? " · site admin" : ""}`}</Text>
          <Text variant="caption" tone="muted">
            {`${u.email} · ${u.labCount === 1 ? "1 lab" : `${u.labCount} labs`} · joined ${new Date(u.createdAt).toLocaleDateString("en-GB", { day: "numeric", month: "short", year: "numeric" })}`}
          </Text>
        </View>
      ))}
    </View>
  );
}
