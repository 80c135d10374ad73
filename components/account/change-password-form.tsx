import React, { useState } from "react";
import { View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { Field } from "@/components/ui/field";
import { Button } from "@/components/ui/button";
import { Banner } from "@/components/ui/states";
import { PASSWORD_MAX_LENGTH, PASSWORD_MIN_LENGTH } from "@/components/data/account";
import { serverFields, serverMessage } from "./server-fields";

export type ChangePasswordValues = { currentPassword: string; newPassword: string; repeatPassword: string };
type Errors = Partial<Record<keyof ChangePasswordValues, string>>;

/** Checks before the request (the server checks the length and the current password again). */
export function validateChangePassword(v: ChangePasswordValues): Errors {
  const e: Errors = {};
  if (!v.currentPassword) e.currentPassword = "Enter your current password.";
  if (v.newPassword.length < PASSWORD_MIN_LENGTH) e.newPassword = `Use at least ${PASSWORD_MIN_LENGTH} characters.`;
  else if (v.newPassword.length > PASSWORD_MAX_LENGTH) e.newPassword = `Use at most ${PASSWORD_MAX_LENGTH} characters.`;
  else if (v.currentPassword && v.newPassword === v.currentPassword)
    e.newPassword = "Choose a password different from the current one.";
  if (!e.newPassword && v.repeatPassword !== v.newPassword) e.repeatPassword = "The two new passwords differ.";
  return e;
}

const EMPTY: ChangePasswordValues = { currentPassword: "", newPassword: "", repeatPassword: "" };

/**
 * Change one's password. Keeps what was typed when the server refuses (a wrong
 * current password shows under that field); empties the fields after `done`.
 */
export function ChangePasswordForm({
  onSubmit,
  busy,
  error,
  done,
}: {
  onSubmit: (v: { currentPassword: string; newPassword: string }) => void;
  busy?: boolean;
  error?: unknown;
  /** True after the server accepted the change. */
  done?: boolean;
}) {
  const t = useTheme();
  const [values, setValues] = useState<ChangePasswordValues>(EMPTY);
  const [errors, setErrors] = useState<Errors>({});
  // Empty the fields once the server accepts the change (compared while rendering, not in an effect).
  const [wasDone, setWasDone] = useState(done);
  if (done !== wasDone) {
    setWasDone(done);
    if (done) setValues(EMPTY);
  }
  const fields = serverFields(error);
  const wrongCurrent = fields.currentPassword ? "That is not your current password." : undefined;
  const message = serverMessage(
    error,
    ["currentPassword", "newPassword"],
    "The password could not be changed. Try again.",
  );
  const set = (k: keyof ChangePasswordValues) => (text: string) => setValues((v) => ({ ...v, [k]: text }));
  const submit = () => {
    const e = validateChangePassword(values);
    setErrors(e);
    if (Object.keys(e).length === 0)
      onSubmit({ currentPassword: values.currentPassword, newPassword: values.newPassword });
  };
  return (
    <View style={{ gap: t.spacing.md }} testID="change-password-form">
      {message ? (
        <Banner tone="danger" testID="change-password-error">
          {message}
        </Banner>
      ) : null}
      {done && !error ? (
        <Banner tone="success" testID="change-password-done">
          Your password is changed. Your other sessions are signed out.
        </Banner>
      ) : null}
      <Field
        label="Current password"
        testID="current-password"
        value={values.currentPassword}
        onChangeText={set("currentPassword")}
        error={errors.currentPassword ?? wrongCurrent}
        secureTextEntry
        autoComplete="current-password"
      />
      <Field
        label="New password"
        testID="new-password"
        value={values.newPassword}
        onChangeText={set("newPassword")}
        error={errors.newPassword ?? fields.newPassword}
        hint={`At least ${PASSWORD_MIN_LENGTH} characters.`}
        secureTextEntry
        autoComplete="new-password"
      />
      <Field
        label="New password again"
        testID="repeat-password"
        value={values.repeatPassword}
        onChangeText={set("repeatPassword")}
        error={errors.repeatPassword}
        secureTextEntry
        autoComplete="new-password"
        onSubmitEditing={submit}
      />
      <Button
        label="Change password"
        icon="lock"
        onPress={submit}
        busy={busy}
        testID="change-password-submit"
        style={{ alignSelf: "flex-start" }}
      />
    </View>
  );
}
