import React, { useEffect } from "react";
import { Slot, usePathname, useRouter } from "expo-router";
import { AppShell } from "@/components/ui/app-shell";
import { useMe } from "@/components/data/use-me";
import { isUnauthorized } from "@/components/data/api";
import { useCurrentLab } from "@/components/data/current-lab";
import { Screen } from "@/components/ui/screen";
import { ErrorState, LoadingState } from "@/components/ui/states";
import { forgetLaunchPath, pathToReturnTo, signInHrefFor } from "@/components/auth/return-path";

/**
 * Signed-in area. The client owns sign-in redirects: when /api/me answers 401
 * we navigate to /sign-in (the server never redirects), with the requested
 * page in `next` so signing in comes back to it.
 */
export default function SignedInLayout() {
  const router = useRouter();
  const pathname = usePathname();
  const me = useMe();
  const { lab } = useCurrentLab();
  const signedOut = isUnauthorized(me.error);
  useEffect(() => {
    if (signedOut) router.replace(signInHrefFor(pathToReturnTo(pathname)));
  }, [signedOut, router, pathname]);
  const signedIn = !!me.data;
  useEffect(() => {
    if (signedIn) forgetLaunchPath();
  }, [signedIn]);
  if (me.isPending || signedOut)
    return (
      <Screen>
        <LoadingState label="Opening Linger" />
      </Screen>
    );
  if (me.error)
    return (
      <Screen title="Linger">
        <ErrorState error={me.error} onRetry={() => me.refetch()} />
      </Screen>
    );
  return (
    <AppShell pathname={pathname} labName={lab?.name} isSiteAdmin={!!me.data.user.isSiteAdmin}>
      <Slot />
    </AppShell>
  );
}
