import React, { useState } from "react";
import { View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { Field } from "@/components/ui/field";
import { Button } from "@/components/ui/button";
import { Banner } from "@/components/ui/states";
import { Text } from "@/components/ui/text";
import { PASSWORD_MAX_LENGTH, PASSWORD_MIN_LENGTH } from "@/components/data/account";
import type { InvitationOffer } from "@/components/data/labs";
import { serverFields, serverMessage } from "@/components/account/server-fields";
import { ROLE_WORDS, withArticle } from "./roles";

export type NewAccountValues = { displayName: string; password: string; repeatPassword: string };
type Errors = Partial<Record<keyof NewAccountValues, string>>;

export function validateNewAccount(v: NewAccountValues): Errors {
  const e: Errors = {};
  if (!v.displayName.trim()) e.displayName = "Enter the name your lab will see.";
  else if (v.displayName.trim().length > 80) e.displayName = "Use at most 80 characters.";
  if (v.password.length < PASSWORD_MIN_LENGTH) e.password = `Use at least ${PASSWORD_MIN_LENGTH} characters.`;
  else if (v.password.length > PASSWORD_MAX_LENGTH) e.password = `Use at most ${PASSWORD_MAX_LENGTH} characters.`;
  else if (v.repeatPassword !== v.password) e.repeatPassword = "The two passwords differ.";
  return e;
}

const until = (iso: string) =>
  new Date(iso).toLocaleDateString("en-GB", { day: "numeric", month: "long", year: "numeric" });

/** What the invitation offers: the lab, the role and the invited address. */
export function InvitationSummary({ offer }: { offer: InvitationOffer }) {
  const t = useTheme();
  return (
    <View style={{ gap: t.spacing.xs }} testID="invitation-summary">
      <Text variant="heading" testID="invitation-lab">
        {offer.labName}
      </Text>
      <Text>{`You are invited to join as ${withArticle(offer.role)}: ${ROLE_WORDS[offer.role].can}.`}</Text>
      <Text
        variant="caption"
        tone="muted"
      >{`Sent to ${offer.email} · the link works until ${until(offer.expiresAt)}`}</Text>
    </View>
  );
}

/**
 * Accepting an invitation. Signed in: one button. Signed out without an
 * account: choose a display name and a password (the invited address is the
 * account's). Signed out with an account: `signIn` (a sign-in form) is shown.
 */
export function AcceptInvitation({
  offer,
  signedInAs,
  onAccept,
  busy,
  error,
  signIn,
}: {
  offer: InvitationOffer;
  signedInAs?: { email: string; displayName: string } | null;
  onAccept: (account?: { displayName: string; password: string }) => void;
  busy?: boolean;
  error?: unknown;
  signIn?: React.ReactNode;
}) {
  const t = useTheme();
  const [values, setValues] = useState<NewAccountValues>({ displayName: "", password: "", repeatPassword: "" });
  const [errors, setErrors] = useState<Errors>({});
  const fields = serverFields(error);
  const message = serverMessage(
    error,
    signedInAs ? [] : ["displayName", "password"],
    "The invitation could not be accepted. Try again.",
  );
  const set = (k: keyof NewAccountValues) => (text: string) => setValues((v) => ({ ...v, [k]: text }));
  const banner = message ? (
    <Banner tone="danger" testID="accept-error">
      {message}
    </Banner>
  ) : null;

  if (signedInAs) {
    const other = signedInAs.email.toLowerCase() !== offer.email.toLowerCase();
    return (
      <View style={{ gap: t.spacing.lg }}>
        <InvitationSummary offer={offer} />
        {banner}
        <Text>{`You are signed in as ${signedInAs.displayName} (${signedInAs.email}).`}</Text>
        {other ? (
          <Banner tone="notice">{`This invitation was sent to ${offer.email}. Accepting adds the account you are signed in with.`}</Banner>
        ) : null}
        <Button
          label={`Join ${offer.labName}`}
          icon="user-plus"
          busy={busy}
          onPress={() => onAccept()}
          testID="accept-invitation"
        />
      </View>
    );
  }
  if (offer.hasAccount) {
    return (
      <View style={{ gap: t.spacing.lg }}>
        <InvitationSummary offer={offer} />
        {banner}
        <Text>{`${offer.email} already has a Linger account. Sign in with it; then you can join.`}</Text>
        {signIn}
      </View>
    );
  }
  const submit = () => {
    const e = validateNewAccount(values);
    setErrors(e);
    if (Object.keys(e).length === 0) onAccept({ displayName: values.displayName.trim(), password: values.password });
  };
  return (
    <View style={{ gap: t.spacing.lg }}>
      <InvitationSummary offer={offer} />
      {banner}
      <Text>{`Create your account for ${offer.email} to join.`}</Text>
      <Field
        label="Display name"
        testID="accept-display-name"
        value={values.displayName}
        onChangeText={set("displayName")}
        error={errors.displayName ?? fields.displayName}
        autoComplete="name"
        hint="Shown to the members of your labs."
      />
      <Field
        label="Password"
        testID="accept-password"
        value={values.password}
        onChangeText={set("password")}
        error={errors.password ?? fields.password}
        secureTextEntry
        autoComplete="new-password"
        hint={`At least ${PASSWORD_MIN_LENGTH} characters.`}
      />
      <Field
        label="Password again"
        testID="accept-repeat-password"
        value={values.repeatPassword}
        onChangeText={set("repeatPassword")}
        error={errors.repeatPassword}
        secureTextEntry
        autoComplete="new-password"
        onSubmitEditing={submit}
      />
      <Button
        label="Create account and join"
        icon="user-plus"
        busy={busy}
        onPress={submit}
        testID="accept-invitation"
      />
    </View>
  );
}
