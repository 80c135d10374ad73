import React from "react";
import { View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { Text } from "@/components/ui/text";
import { Banner } from "@/components/ui/states";
import type { PendingInvitation } from "@/components/data/labs";
import { ConfirmAction } from "./confirm-action";
import { memberErrorMessage } from "./member-list";

const day = (iso: string) =>
  new Date(iso).toLocaleDateString("en-GB", { day: "numeric", month: "short", year: "numeric" });

/** Pending invitations with a withdraw action (its link stops working). */
export function InvitationList({
  invitations,
  onWithdraw,
  busyId,
  error,
}: {
  invitations: PendingInvitation[];
  onWithdraw: (id: string) => void;
  busyId?: string | null;
  error?: unknown;
}) {
  const t = useTheme();
  if (invitations.length === 0)
    return (
      <Text tone="muted" testID="no-invitations">
        No pending invitations.
      </Text>
    );
  return (
    <View testID="invitation-list">
      {error ? <Banner tone="danger">{memberErrorMessage(error)}</Banner> : null}
      {invitations.map((i) => (
        <View
          key={i.id}
          style={{
            gap: t.spacing.sm,
            paddingVertical: t.spacing.md,
            borderTopWidth: 1,
            borderTopColor: t.colors.divider,
          }}
          testID={`invitation-${i.email}`}
        >
          <View style={{ gap: 2 }}>
            <Text variant="bodyStrong">{i.email ?? "unknown address"}</Text>
            <Text variant="caption" tone="muted">
              {`as ${i.role ?? "member"} · invited by ${i.invitedBy ?? "a former member"} on ${day(i.createdAt)} · link works until ${day(i.expiresAt)}`}
            </Text>
          </View>
          <View style={{ flexDirection: "row" }}>
            <ConfirmAction
              label="Withdraw"
              icon="x"
              accessibilityLabel={`Withdraw the invitation to ${i.email}`}
              question={`Withdraw the invitation to ${i.email}? Its link stops working.`}
              confirmLabel="Withdraw invitation"
              busy={busyId === i.id}
              onConfirm={() => onWithdraw(i.id)}
              testID={`withdraw-${i.email}`}
            />
          </View>
        </View>
      ))}
    </View>
  );
}
