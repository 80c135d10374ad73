import React, { useState } from "react";
import { Link, useLocalSearchParams } from "expo-router";
import { AuthFrame } from "@/components/ui/auth-frame";
import { Field } from "@/components/ui/field";
import { Button } from "@/components/ui/button";
import { Banner } from "@/components/ui/states";
import { Text } from "@/components/ui/text";
import { ApiError } from "@/components/data/api";
import { useResetConfirm, useResetRequest } from "@/components/data/use-me";
import { PASSWORD_MIN_LENGTH } from "@/shared/schemas/auth";

/** Without a token: ask for a reset mail. With ?token=: choose a new password. */
export default function Reset() {
  const { token } = useLocalSearchParams<{ token?: string }>();
  const request = useResetRequest();
  const confirm = useResetConfirm();
  const [email, setEmail] = useState("");
  const [password, setPassword] = useState("");
  const [error, setError] = useState<string | undefined>();
  const serverError = (token ? confirm.error : request.error) as ApiError | null;
  if (token) {
    return (
      <AuthFrame title="Choose a new password">
        {confirm.isSuccess ? <Banner tone="success">Your password is changed. You can sign in now.</Banner> : null}
        {serverError ? <Banner tone="danger">{serverError.message}</Banner> : null}
        <Field
          label="New password"
          value={password}
          onChangeText={setPassword}
          secureTextEntry
          error={error ?? serverError?.fieldMap?.().password}
          autoComplete="new-password"
          hint={`At least ${PASSWORD_MIN_LENGTH} characters.`}
        />
        <Button
          label="Save password"
          busy={confirm.isPending}
          onPress={() => {
            if (password.length < PASSWORD_MIN_LENGTH)
              return setError(`Use at least ${PASSWORD_MIN_LENGTH} characters.`);
            setError(undefined);
            confirm.mutate({ token, password });
          }}
        />
        <Link href="/sign-in" style={{ minHeight: 44, paddingVertical: 12 }}>
          <Text tone="primary" variant="label">
            Back to sign in
          </Text>
        </Link>
      </AuthFrame>
    );
  }
  return (
    <AuthFrame title="Reset your password">
      {request.isSuccess ? (
        <Banner tone="success">If that address has an account, a reset link is on its way.</Banner>
      ) : null}
      {serverError ? <Banner tone="danger">{serverError.message}</Banner> : null}
      <Field
        label="Email"
        value={email}
        onChangeText={setEmail}
        error={error}
        autoCapitalize="none"
        keyboardType="email-address"
        autoComplete="email"
      />
      <Button
        label="Send reset link"
        busy={request.isPending}
        onPress={() => {
          if (!/^[^\s@]+@[^\s@]+\.[^\s@]+$/.test(email.trim())) return setError("Enter a valid email address.");
          setError(undefined);
          request.mutate({ email: email.trim() });
        }}
      />
      <Link href="/sign-in" style={{ minHeight: 44, paddingVertical: 12 }}>
        <Text tone="primary" variant="label">
          Back to sign in
        </Text>
      </Link>
    </AuthFrame>
  );
}
