import React, { useState } from "react";
import { View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { Field } from "@/components/ui/field";
import { Button } from "@/components/ui/button";
import { Banner } from "@/components/ui/states";
import { ApiError } from "@/components/data/api";

export type SignInValues = { email: string; password: string };

/** Client-side checks before the request; the server checks again. */
export function validateSignIn(v: SignInValues): Partial<Record<keyof SignInValues, string>> {
  const errors: Partial<Record<keyof SignInValues, string>> = {};
  if (!v.email.trim()) errors.email = "Enter your email address.";
  else if (!/^[^\s@]+@[^\s@]+\.[^\s@]+$/.test(v.email.trim()))
    errors.email = "That does not look like an email address.";
  if (!v.password) errors.password = "Enter your password.";
  return errors;
}

/** The sign-in form. Keeps what was typed when the server says no. */
export function SignInForm({
  onSubmit,
  busy,
  error,
}: {
  onSubmit: (v: SignInValues) => void;
  busy?: boolean;
  error?: unknown;
}) {
  const t = useTheme();
  const [values, setValues] = useState<SignInValues>({ email: "", password: "" });
  const [errors, setErrors] = useState<Partial<Record<keyof SignInValues, string>>>({});
  const submit = () => {
    const e = validateSignIn(values);
    setErrors(e);
    if (Object.keys(e).length === 0) onSubmit({ email: values.email.trim(), password: values.password });
  };
  const serverFields = error instanceof ApiError ? error.fieldMap() : {};
  const serverMessage =
    error instanceof ApiError
      ? error.status === 401
        ? "That email and password do not match an account."
        : error.message
      : error
        ? "Signing in failed. Try again."
        : undefined;
  return (
    <View style={{ gap: t.spacing.lg }}>
      {serverMessage ? (
        <Banner tone="danger" testID="sign-in-error">
          {serverMessage}
        </Banner>
      ) : null}
      <Field
        label="Email"
        testID="email"
        value={values.email}
        onChangeText={(email) => setValues((v) => ({ ...v, email }))}
        error={errors.email ?? serverFields.email}
        keyboardType="email-address"
        autoComplete="email"
        autoCapitalize="none"
      />
      <Field
        label="Password"
        testID="password"
        value={values.password}
        onChangeText={(password) => setValues((v) => ({ ...v, password }))}
        error={errors.password ?? serverFields.password}
        secureTextEntry
        autoComplete="current-password"
        onSubmitEditing={submit}
      />
      <Button label="Sign in" testID="sign-in-submit" onPress={submit} busy={busy} />
    </View>
  );
}
