import React, { useState } from "react";
import { View } from "react-native";
import { useRouter } from "expo-router";
import { Screen } from "@/components/ui/screen";
import { Card } from "@/components/ui/card";
import { LoadMore } from "@/components/ui/load-more";
import { Text } from "@/components/ui/text";
import { Button } from "@/components/ui/button";
import { LabSwitcher } from "@/components/ui/lab-switcher";
import { Banner, EmptyState, ErrorState, LoadingState } from "@/components/ui/states";
import { MemberList, memberErrorMessage } from "@/components/lab/member-list";
import { InviteForm } from "@/components/lab/invite-form";
import { InvitationList } from "@/components/lab/invitation-list";
import { CreateLabForm } from "@/components/lab/create-lab-form";
import { ConfirmAction } from "@/components/lab/confirm-action";
import { AuditList } from "@/components/lab/audit-list";
import { ROLE_WORDS, withArticle } from "@/components/lab/roles";
import { useCurrentLab } from "@/components/data/current-lab";
import { useMe } from "@/components/data/use-me";
import { runIdsOf, useRunsByIds } from "@/components/data/runs";
import {
  useAudit,
  useChangeRole,
  useCreateLab,
  useInvitations,
  useInvite,
  useLab,
  useRemoveMember,
  useWithdrawInvitation,
} from "@/components/data/labs";

function CreateLabCard() {
  const create = useCreateLab();
  const { choose } = useCurrentLab();
  return (
    <Card>
      <Text variant="heading">Start another lab</Text>
      <Text tone="muted">
        You become its owner and can invite others. Circuits, programs and runs stay in the lab they were made in.
      </Text>
      <CreateLabForm
        busy={create.isPending}
        error={create.error}
        onSubmit={(name) => create.mutate({ name }, { onSuccess: (lab) => choose(lab.id) })}
      />
    </Card>
  );
}

/** Lab page: members and roles; owners invite, withdraw invitations, change roles, remove members and read the history. */
export default function LabScreen() {
  const router = useRouter();
  const me = useMe();
  const { lab: current } = useCurrentLab();
  const labId = current?.id ?? "";
  const isOwner = current?.role === "owner";
  const lab = useLab(labId);
  const invitations = useInvitations(labId, isOwner);
  const audit = useAudit(labId, isOwner, 5);
  const runs = useRunsByIds(runIdsOf(audit.data));
  const invite = useInvite(labId);
  const withdraw = useWithdrawInvitation(labId);
  const changeRole = useChangeRole(labId);
  const remove = useRemoveMember(labId);
  const leave = useRemoveMember(labId);
  const [sentTo, setSentTo] = useState<{ email: string; role: "owner" | "editor" | "viewer" } | null>(null);
  const myId = me.data?.user.id ?? "";

  if (!current) {
    return (
      <Screen title="Lab">
        <EmptyState
          icon="users"
          title="You are not in a lab yet"
          message="Open an invitation link from a lab owner, or start a lab of your own."
        />
        <CreateLabCard />
      </Screen>
    );
  }
  const members = lab.data?.lab.members ?? [];
  const memberName = (id: string) => members.find((m) => m.userId === id)?.displayName;
  const runName = (id: string) => runs.byId.get(id)?.name;
  const roleError =
    changeRole.error && changeRole.variables ? { userId: changeRole.variables.userId, error: changeRole.error } : null;
  const removeError = remove.error && remove.variables ? { userId: remove.variables, error: remove.error } : null;
  return (
    <Screen
      title={current.name}
      subtitle={`As ${withArticle(current.role)} you ${ROLE_WORDS[current.role].youCan}.`}
      testID="lab-screen"
    >
      <Card>
        <Text variant="heading">Current lab</Text>
        <LabSwitcher />
      </Card>
      <Card testID="members-card">
        <Text variant="heading">Members</Text>
        {lab.isPending ? (
          <LoadingState label="Loading members" />
        ) : lab.error ? (
          <ErrorState title="Members could not be loaded" error={lab.error} onRetry={() => lab.refetch()} />
        ) : (
          <MemberList
            members={members}
            myUserId={myId}
            canManage={isOwner}
            busyUserId={
              remove.isPending ? remove.variables : changeRole.isPending ? changeRole.variables?.userId : null
            }
            error={roleError ?? removeError}
            onChangeRole={(userId, role) => changeRole.mutate({ userId, role })}
            onRemove={(userId) => remove.mutate(userId)}
          />
        )}
      </Card>
      {isOwner ? (
        <Card testID="invite-card">
          <Text variant="heading">Invite someone</Text>
          <InviteForm
            busy={invite.isPending}
            error={invite.error}
            sentTo={sentTo}
            onSubmit={(v) => {
              setSentTo(null);
              invite.mutate(v, { onSuccess: () => setSentTo(v) });
            }}
          />
        </Card>
      ) : null}
      {isOwner ? (
        <Card testID="invitations-card">
          <Text variant="heading">Pending invitations</Text>
          {invitations.isPending ? (
            <LoadingState label="Loading invitations" />
          ) : invitations.error ? (
            <ErrorState
              title="Invitations could not be loaded"
              error={invitations.error}
              onRetry={() => invitations.refetch()}
            />
          ) : (
            <InvitationList
              invitations={invitations.data}
              busyId={withdraw.isPending ? withdraw.variables : null}
              error={withdraw.error}
              onWithdraw={(id) => withdraw.mutate(id)}
            />
          )}
          <LoadMore list={invitations} noun="invitations" testID="invitations-load-more" />
        </Card>
      ) : null}
      {isOwner ? (
        <Card testID="history-card">
          <Text variant="heading">Recent history</Text>
          {audit.isPending ? (
            <LoadingState label="Loading the history" />
          ) : audit.error ? (
            <ErrorState title="The history could not be loaded" error={audit.error} onRetry={() => audit.refetch()} />
          ) : audit.data.length === 0 ? (
            <Text tone="muted">Nothing has happened in this lab yet.</Text>
          ) : (
            <AuditList events={audit.data} names={{ user: memberName, run: runName }} />
          )}
          <View style={{ flexDirection: "row" }}>
            <Button
              label="See the whole history"
              variant="secondary"
              icon="clock"
              href={"/lab/audit"}
              testID="open-audit"
            />
          </View>
        </Card>
      ) : null}
      <Card>
        <Text variant="heading">Leave this lab</Text>
        <Text tone="muted">You lose access to its circuits, programs and runs until someone invites you again.</Text>
        {leave.error ? (
          <Banner tone="danger" testID="leave-error">
            {memberErrorMessage(leave.error)}
          </Banner>
        ) : null}
        <View style={{ flexDirection: "row" }}>
          <ConfirmAction
            label="Leave lab"
            icon="log-out"
            question={`Leave ${current.name}?`}
            confirmLabel={`Leave ${current.name}`}
            busy={leave.isPending}
            onConfirm={() => leave.mutate(myId, { onSuccess: () => router.replace("/") })}
            testID="leave-lab"
          />
        </View>
      </Card>
      <CreateLabCard />
    </Screen>
  );
}
