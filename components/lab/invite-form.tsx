import React, { useState } from "react";
import { View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { Field } from "@/components/ui/field";
import { Choice } from "@/components/ui/choice";
import { Button } from "@/components/ui/button";
import { Banner } from "@/components/ui/states";
import { Text } from "@/components/ui/text";
import { serverFields, serverMessage } from "@/components/account/server-fields";
import type { LabRole } from "@/components/data/labs";
import { ROLE_OPTIONS, ROLE_WORDS, withArticle } from "./roles";

export type InviteValues = { email: string; role: LabRole };

const EMAIL = /^[^\s@]+@[^\s@]+\.[^\s@]+$/;

export function validateInvite(v: InviteValues): Partial<Record<keyof InviteValues, string>> {
  const e: Partial<Record<keyof InviteValues, string>> = {};
  if (!v.email.trim()) e.email = "Enter the e-mail address to invite.";
  else if (!EMAIL.test(v.email.trim())) e.email = "That does not look like an e-mail address.";
  return e;
}

/**
 * Invite someone by e-mail with a role (owners). Keeps what was typed when the
 * server says no (for example "already a member"); clears the address once
 * `sentTo` reports a sent invitation.
 */
export function InviteForm({
  onSubmit,
  busy,
  error,
  sentTo,
}: {
  onSubmit: (v: InviteValues) => void;
  busy?: boolean;
  error?: unknown;
  /** The address of the invitation just sent (shown as a confirmation). */
  sentTo?: { email: string; role: LabRole } | null;
}) {
  const t = useTheme();
  const [values, setValues] = useState<InviteValues>({ email: "", role: "viewer" });
  const [errors, setErrors] = useState<Partial<Record<keyof InviteValues, string>>>({});
  // Empty the address once an invitation is sent (compared while rendering, not in an effect).
  const [lastSent, setLastSent] = useState(sentTo);
  if (sentTo !== lastSent) {
    setLastSent(sentTo);
    if (sentTo) setValues((v) => ({ ...v, email: "" }));
  }
  const fields = serverFields(error);
  const message = serverMessage(error, ["email", "role"], "The invitation could not be sent. Try again.");
  const submit = () => {
    const e = validateInvite(values);
    setErrors(e);
    if (Object.keys(e).length === 0) onSubmit({ email: values.email.trim(), role: values.role });
  };
  return (
    <View style={{ gap: t.spacing.md }} testID="invite-form">
      {message ? (
        <Banner tone="danger" testID="invite-error">
          {message}
        </Banner>
      ) : null}
      {sentTo && !error ? (
        <Banner
          tone="success"
          testID="invite-sent"
        >{`Invitation sent to ${sentTo.email} as ${withArticle(sentTo.role)}. The link works for 7 days.`}</Banner>
      ) : null}
      <Field
        label="E-mail address"
        testID="invite-email"
        value={values.email}
        onChangeText={(email) => setValues((v) => ({ ...v, email }))}
        error={errors.email ?? fields.email}
        keyboardType="email-address"
        autoComplete="email"
        autoCapitalize="none"
        onSubmitEditing={submit}
      />
      <Choice
        label="Role"
        value={values.role}
        options={ROLE_OPTIONS}
        onChange={(role) => setValues((v) => ({ ...v, role }))}
        testID="invite-role"
      />
      <Text variant="caption" tone="muted">{`${ROLE_WORDS[values.role].label}: ${ROLE_WORDS[values.role].can}.`}</Text>
      <Button
        label="Send invitation"
        icon="send"
        onPress={submit}
        busy={busy}
        testID="invite-submit"
        style={{ alignSelf: "flex-start" }}
      />
    </View>
  );
}
