import React, { useState } from "react";
import { View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { Text } from "@/components/ui/text";
import { Choice } from "@/components/ui/choice";
import { Button } from "@/components/ui/button";
import { Banner } from "@/components/ui/states";
import { ApiError } from "@/components/data/api";
import type { LabMember, LabRole } from "@/components/data/labs";
import { ConfirmAction } from "./confirm-action";
import { ROLE_OPTIONS, ROLE_WORDS } from "./roles";

/** The message to show for a refused member change (the server's own words, e.g. "A lab needs at least one owner..."). */
export function memberErrorMessage(error: unknown): string {
  if (error instanceof ApiError) return error.message;
  return "That change did not go through. Try again.";
}

type RowProps = {
  member: LabMember;
  isSelf: boolean;
  canManage: boolean;
  busy?: boolean;
  error?: unknown;
  onChangeRole: (role: LabRole) => void;
  onRemove: () => void;
};

/** One member: name, address, role; owners change the role or remove the member (with a confirmation). */
export function MemberRow({ member, isSelf, canManage, busy, error, onChangeRole, onRemove }: RowProps) {
  const t = useTheme();
  const [selfDemotion, setSelfDemotion] = useState<LabRole | null>(null);
  const name = `${member.displayName}${isSelf ? " (you)" : ""}`;
  const choose = (role: LabRole) => {
    if (role === member.role) return;
    if (isSelf && member.role === "owner") setSelfDemotion(role);
    else onChangeRole(role);
  };
  return (
    <View
      style={{ gap: t.spacing.sm, paddingVertical: t.spacing.md, borderTopWidth: 1, borderTopColor: t.colors.divider }}
      testID={`member-${member.email}`}
    >
      <View style={{ gap: 2 }}>
        <Text variant="bodyStrong">{name}</Text>
        <Text variant="caption" tone="muted">
          {member.email}
        </Text>
      </View>
      {canManage ? (
        <Choice
          label={`Role of ${member.displayName}`}
          value={member.role}
          options={ROLE_OPTIONS}
          onChange={choose}
          testID={`role-${member.email}`}
        />
      ) : (
        <Text variant="label">{`${ROLE_WORDS[member.role].label}: ${ROLE_WORDS[member.role].can}`}</Text>
      )}
      {selfDemotion ? (
        <View role="group" aria-label="Confirm your own role change" style={{ gap: t.spacing.sm }}>
          <Text variant="label">{`Make yourself ${ROLE_WORDS[selfDemotion].label.toLowerCase()}? You will no longer manage this lab.`}</Text>
          <View style={{ flexDirection: "row", flexWrap: "wrap", gap: t.spacing.sm }}>
            <Button
              label={`Make me ${ROLE_WORDS[selfDemotion].label.toLowerCase()}`}
              variant="danger"
              compact
              onPress={() => {
                onChangeRole(selfDemotion);
                setSelfDemotion(null);
              }}
            />
            <Button label="Keep my role" variant="secondary" compact onPress={() => setSelfDemotion(null)} />
          </View>
        </View>
      ) : null}
      {error ? (
        <Banner tone="danger" testID={`member-error-${member.email}`}>
          {memberErrorMessage(error)}
        </Banner>
      ) : null}
      {canManage && !isSelf ? (
        <View style={{ flexDirection: "row" }}>
          <ConfirmAction
            label="Remove"
            accessibilityLabel={`Remove ${member.displayName}`}
            icon="user-minus"
            question={`Remove ${member.displayName} from the lab? They lose access at once; you can invite them again.`}
            confirmLabel={`Remove ${member.displayName}`}
            busy={busy}
            onConfirm={onRemove}
            testID={`remove-${member.email}`}
          />
        </View>
      ) : null}
    </View>
  );
}

/** The lab's members. `error` is shown under the member whose change was refused. */
export function MemberList({
  members,
  myUserId,
  canManage,
  busyUserId,
  error,
  onChangeRole,
  onRemove,
}: {
  members: LabMember[];
  myUserId: string;
  canManage: boolean;
  busyUserId?: string | null;
  error?: { userId: string; error: unknown } | null;
  onChangeRole: (userId: string, role: LabRole) => void;
  onRemove: (userId: string) => void;
}) {
  return (
    <View testID="member-list">
      {members.map((m) => (
        <MemberRow
          key={m.userId}
          member={m}
          isSelf={m.userId === myUserId}
          canManage={canManage}
          busy={busyUserId === m.userId}
          error={error && error.userId === m.userId ? error.error : undefined}
          onChangeRole={(role) => onChangeRole(m.userId, role)}
          onRemove={() => onRemove(m.userId)}
        />
      ))}
    </View>
  );
}
