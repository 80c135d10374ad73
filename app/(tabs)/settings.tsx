import React from "react";
import { View } from "react-native";
import { useRouter } from "expo-router";
import { Screen } from "@/components/ui/screen";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { Button } from "@/components/ui/button";
import { ErrorState, LoadingState } from "@/components/ui/states";
import { DisplayNameForm, RunMailSetting } from "@/components/account/profile-form";
import { ChangePasswordForm } from "@/components/account/change-password-form";
import { useMe, useSignOut } from "@/components/data/use-me";
import { useChangePassword, useUpdateProfile } from "@/components/data/account";

/** Account settings: display name, run e-mails, password, sign out. */
export default function Settings() {
  const router = useRouter();
  const me = useMe();
  const name = useUpdateProfile();
  const notify = useUpdateProfile();
  const password = useChangePassword();
  const signOut = useSignOut();
  if (me.isPending)
    return (
      <Screen title="Settings">
        <LoadingState label="Loading your account" />
      </Screen>
    );
  if (me.error)
    return (
      <Screen title="Settings">
        <ErrorState error={me.error} onRetry={() => me.refetch()} />
      </Screen>
    );
  const user = me.data.user;
  return (
    <Screen title="Settings" subtitle={user.email} testID="settings-screen">
      <Card>
        <Text variant="heading">Your name</Text>
        <DisplayNameForm
          current={user.displayName}
          busy={name.isPending}
          error={name.error}
          saved={name.isSuccess}
          onSubmit={(displayName) => name.mutate({ displayName })}
        />
      </Card>
      <Card>
        <Text variant="heading">E-mail</Text>
        <RunMailSetting
          value={user.notifyOnRunEnd}
          busy={notify.isPending}
          error={notify.error}
          onChange={(notifyOnRunEnd) => notify.mutate({ notifyOnRunEnd })}
        />
      </Card>
      <Card>
        <Text variant="heading">Password</Text>
        <ChangePasswordForm
          busy={password.isPending}
          error={password.error}
          done={password.isSuccess}
          onSubmit={(v) => password.mutate(v)}
        />
      </Card>
      <Card>
        <Text variant="heading">Lab</Text>
        <Text tone="muted">Members, invitations, roles and the lab&apos;s history are on the Lab page.</Text>
        <View style={{ flexDirection: "row" }}>
          <Button label="Open the Lab page" variant="secondary" icon="users" href={"/lab"} />
        </View>
      </Card>
      <View style={{ flexDirection: "row" }}>
        <Button
          label="Sign out"
          variant="secondary"
          icon="log-out"
          busy={signOut.isPending}
          onPress={() => signOut.mutate(undefined, { onSettled: () => router.replace("/sign-in") })}
          testID="sign-out"
        />
      </View>
    </Screen>
  );
}
