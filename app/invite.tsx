import React from "react";
import { Link, useLocalSearchParams, useRouter } from "expo-router";
import { AuthFrame } from "@/components/ui/auth-frame";
import { ErrorState, LoadingState } from "@/components/ui/states";
import { Text } from "@/components/ui/text";
import { SignInForm } from "@/components/forms/sign-in-form";
import { AcceptInvitation } from "@/components/lab/accept-invitation";
import { ApiError } from "@/components/data/api";
import { useMe, useSignIn } from "@/components/data/use-me";
import { useAcceptInvitation, useInvitationOffer } from "@/components/data/labs";
import { useCurrentLab } from "@/components/data/current-lab";

/**
 * /invite?token=... — the link in the invitation mail (server/services/labs.service.ts).
 * Outside the (auth) group on purpose: that group sends signed-in visitors home,
 * and a signed-in user must be able to accept here too.
 */
export default function InviteScreen() {
  const router = useRouter();
  const { token } = useLocalSearchParams<{ token?: string }>();
  const me = useMe();
  const offer = useInvitationOffer(token);
  const accept = useAcceptInvitation();
  const signIn = useSignIn();
  const { choose } = useCurrentLab();
  const title = "Lab invitation";
  const back = (
    <Link href="/" style={{ minHeight: 44, paddingVertical: 12 }}>
      <Text tone="primary" variant="label">
        Go to Linger
      </Text>
    </Link>
  );
  if (!token) {
    return (
      <AuthFrame title={title}>
        <ErrorState
          title="This link has no invitation in it"
          error="Open the link from the invitation e-mail exactly as it was sent."
        />
        {back}
      </AuthFrame>
    );
  }
  if (offer.isPending || (me.isPending && !me.error))
    return (
      <AuthFrame title={title}>
        <LoadingState label="Opening the invitation" />
      </AuthFrame>
    );
  if (offer.error) {
    const gone = offer.error instanceof ApiError && offer.error.status === 404;
    return (
      <AuthFrame title={title}>
        <ErrorState
          title={gone ? "This invitation cannot be used" : "The invitation could not be loaded"}
          error={
            gone ? "It has expired, has been used, or was withdrawn. Ask the lab owner for a new one." : offer.error
          }
          onRetry={gone ? undefined : () => offer.refetch()}
        />
        {back}
      </AuthFrame>
    );
  }
  const user = me.data?.user ?? null;
  return (
    <AuthFrame title={title}>
      <AcceptInvitation
        offer={offer.data}
        signedInAs={user}
        busy={accept.isPending}
        error={accept.error}
        onAccept={(account) =>
          accept.mutate(
            { token, ...(account ?? {}) },
            {
              onSuccess: (r) => {
                choose(r.labId);
                router.replace("/lab");
              },
            },
          )
        }
        signIn={
          <SignInForm
            busy={signIn.isPending}
            error={signIn.error}
            onSubmit={(v) => signIn.mutate(v, { onSuccess: () => me.refetch() })}
          />
        }
      />
    </AuthFrame>
  );
}
