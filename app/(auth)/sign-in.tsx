import React from "react";
import { View } from "react-native";
import { Link, useLocalSearchParams, useRouter } from "expo-router";
import { AuthFrame } from "@/components/ui/auth-frame";
import { SignInForm } from "@/components/forms/sign-in-form";
import { useSignIn } from "@/components/data/use-me";
import { useTheme } from "@/components/theme/use-theme";
import { Text } from "@/components/ui/text";
import { safeReturnPath } from "@/components/auth/return-path";

export default function SignIn() {
  const t = useTheme();
  const router = useRouter();
  const signIn = useSignIn();
  const { next } = useLocalSearchParams<{ next?: string }>();
  const back = safeReturnPath(next);
  return (
    <AuthFrame title="Sign in">
      <SignInForm
        busy={signIn.isPending}
        error={signIn.error}
        onSubmit={(v) => signIn.mutate(v, { onSuccess: () => router.replace(back) })}
      />
      <View style={{ flexDirection: "row", flexWrap: "wrap", justifyContent: "space-between", gap: t.spacing.md }}>
        <Link href="/reset" style={{ minHeight: 44, paddingVertical: 12 }}>
          <Text tone="primary" variant="label">
            Forgot your password?
          </Text>
        </Link>
        <Link
          href={back === "/" ? "/sign-up" : { pathname: "/sign-up", params: { next: back } }}
          style={{ minHeight: 44, paddingVertical: 12 }}
        >
          <Text tone="primary" variant="label">
            Create an account
          </Text>
        </Link>
      </View>
    </AuthFrame>
  );
}
