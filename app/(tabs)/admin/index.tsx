import React from "react";
import { Screen } from "@/components/ui/screen";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { Button } from "@/components/ui/button";
import { EmptyState, ErrorState, LoadingState } from "@/components/ui/states";
import { OutboxList } from "@/components/admin/outbox-list";
import { UserList } from "@/components/admin/user-list";
import { LoadMore } from "@/components/ui/load-more";
import { BackupCard } from "@/components/admin/backup-card";
import { ComputeCard } from "@/components/admin/compute-card";
import { useMe } from "@/components/data/use-me";
import { useAdminUsers, useBackup, useComputeStatus, useOutbox } from "@/components/data/admin";

/** Site administration (site admins only; others see a short note and the API answers 403). */
export default function AdminScreen() {
  const me = useMe();
  const isAdmin = !!me.data?.user.isSiteAdmin;
  const outbox = useOutbox(isAdmin);
  const users = useAdminUsers(isAdmin);
  const backup = useBackup();
  const compute = useComputeStatus(isAdmin);
  if (!isAdmin) {
    return (
      <Screen title="Admin">
        <EmptyState icon="lock" title="For site admins only" message="This page manages the whole Linger instance." />
      </Screen>
    );
  }
  return (
    <Screen title="Admin" subtitle="This Linger instance" testID="admin-screen">
      {compute.isPending ? (
        <LoadingState label="Loading the compute status" />
      ) : compute.error ? (
        <ErrorState
          title="The compute status could not be loaded"
          error={compute.error}
          onRetry={() => compute.refetch()}
        />
      ) : (
        <ComputeCard status={compute.data} />
      )}
      <BackupCard onBackup={() => backup.mutate()} busy={backup.isPending} result={backup.data} error={backup.error} />
      <Card testID="outbox-card">
        <Text variant="heading">Outbox</Text>
        {outbox.isPending ? (
          <LoadingState label="Loading the outbox" />
        ) : outbox.error ? (
          <ErrorState title="The outbox could not be loaded" error={outbox.error} onRetry={() => outbox.refetch()} />
        ) : outbox.data.length === 0 ? (
          <Text tone="muted">
            {outbox.mailer === "smtp" ? "Mail goes to a real mail server, so nothing is kept here." : "No mail yet."}
          </Text>
        ) : (
          <>
            <Text variant="caption" tone="muted">
              Mail caught by the local mail catcher (nothing leaves this machine), newest first.
            </Text>
            <OutboxList messages={outbox.data} />
            <LoadMore list={outbox} noun="mail" testID="outbox-load-more" />
          </>
        )}
        <Button
          label="Refresh the outbox"
          variant="secondary"
          icon="refresh-cw"
          compact
          onPress={() => outbox.refetch()}
          busy={outbox.isFetching && !outbox.isPending}
          style={{ alignSelf: "flex-start" }}
        />
      </Card>
      <Card testID="users-card">
        <Text variant="heading">Accounts</Text>
        {users.isPending ? (
          <LoadingState label="Loading accounts" />
        ) : users.error ? (
          <ErrorState title="Accounts could not be loaded" error={users.error} onRetry={() => users.refetch()} />
        ) : (
          <>
            <UserList users={users.data} />
            <LoadMore list={users} noun="accounts" testID="users-load-more" />
          </>
        )}
      </Card>
    </Screen>
  );
}
