import React, { useState } from "react";
import { useLocalSearchParams, useRouter, Link } from "expo-router";
import { AuthFrame } from "@/components/ui/auth-frame";
import { Field } from "@/components/ui/field";
import { Button } from "@/components/ui/button";
import { Banner } from "@/components/ui/states";
import { Text } from "@/components/ui/text";
import { ApiError } from "@/components/data/api";
import { useSignUp, useSignUpConfirm } from "@/components/data/use-me";
import { PASSWORD_MIN_LENGTH } from "@/shared/schemas/auth";
import { safeReturnPath } from "@/components/auth/return-path";

/** The link from the sign-up mail: one button creates the account (a mail scanner's GET changes nothing). */
function FinishSignUp({ token }: { token: string }) {
  const router = useRouter();
  const confirm = useSignUpConfirm();
  const server = confirm.error instanceof ApiError ? confirm.error : null;
  return (
    <AuthFrame title="Finish creating your account">
      {server ? <Banner tone="danger">{server.message}</Banner> : null}
      <Button
        label="Create my account"
        busy={confirm.isPending}
        onPress={() => confirm.mutate({ token }, { onSuccess: () => router.replace("/") })}
      />
      <Link href="/sign-in" style={{ minHeight: 44, paddingVertical: 12 }}>
        <Text tone="primary" variant="label">
          I already have an account
        </Text>
      </Link>
    </AuthFrame>
  );
}

export default function SignUp() {
  const params = useLocalSearchParams<{ invite?: string; email?: string; token?: string; next?: string }>();
  if (params.token) return <FinishSignUp token={params.token} />;
  return <SignUpForm invite={params.invite} email={params.email} next={params.next} />;
}

function SignUpForm(params: { invite?: string; email?: string; next?: string }) {
  const router = useRouter();
  const signUp = useSignUp();
  const [v, setV] = useState({ email: params.email ?? "", displayName: "", password: "" });
  const [errors, setErrors] = useState<Record<string, string>>({});
  const server = signUp.error instanceof ApiError ? signUp.error : null;
  const fields = { ...(server?.fieldMap() ?? {}), ...errors };
  const submit = () => {
    const e: Record<string, string> = {};
    if (!/^[^\s@]+@[^\s@]+\.[^\s@]+$/.test(v.email.trim())) e.email = "Enter a valid email address.";
    if (!v.displayName.trim()) e.displayName = "Enter the name your lab will see.";
    if (v.password.length < PASSWORD_MIN_LENGTH) e.password = `Use at least ${PASSWORD_MIN_LENGTH} characters.`;
    setErrors(e);
    if (Object.keys(e).length) return;
    const body = {
      email: v.email.trim(),
      displayName: v.displayName.trim(),
      password: v.password,
      invitationToken: params.invite,
    };
    signUp.mutate(body, {
      onSuccess: (r) => {
        if ("user" in r) router.replace(safeReturnPath(params.next));
      },
    });
  };
  const sent = signUp.data && !("user" in signUp.data) ? signUp.data.message : null;
  return (
    <AuthFrame title={params.invite ? "Accept your invitation" : "Create an account"}>
      {sent ? <Banner tone="success">{sent}</Banner> : null}
      {server && !server.fields.length ? <Banner tone="danger">{server.message}</Banner> : null}
      <Field
        label="Email"
        value={v.email}
        onChangeText={(email) => setV({ ...v, email })}
        error={fields.email}
        autoCapitalize="none"
        keyboardType="email-address"
        autoComplete="email"
      />
      <Field
        label="Display name"
        value={v.displayName}
        onChangeText={(displayName) => setV({ ...v, displayName })}
        error={fields.displayName}
        autoComplete="name"
      />
      <Field
        label="Password"
        value={v.password}
        onChangeText={(password) => setV({ ...v, password })}
        error={fields.password}
        secureTextEntry
        autoComplete="new-password"
        hint={`At least ${PASSWORD_MIN_LENGTH} characters.`}
      />
      <Button label="Create account" onPress={submit} busy={signUp.isPending} />
      <Link href="/sign-in" style={{ minHeight: 44, paddingVertical: 12 }}>
        <Text tone="primary" variant="label">
          I already have an account
        </Text>
      </Link>
    </AuthFrame>
  );
}
