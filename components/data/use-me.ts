/**
 * The session: /api/me, sign-in and -out, sign-up and password reset
 * (contract: shared/schemas/api-accounts.ts). Profile changes live in account.ts.
 */
import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { api } from "./api";
import {
  MeSchema,
  OkSchema,
  SignedInSchema,
  SignUpResponseSchema,
  type SignUpConfirmBody,
  type ResetConfirmBody,
  type ResetRequestBody,
  type SignInBody,
  type SignUpBody,
} from "@/shared/schemas/api-accounts";

export type { Me, MeLab, MeUser } from "@/shared/schemas/api-accounts";

export const meKeys = { all: ["me"] as const };

/** The signed-in user and their labs; a 401 error means "not signed in". */
export function useMe() {
  return useQuery({ queryKey: meKeys.all, queryFn: ({ signal }) => api("/api/me", { schema: MeSchema, signal }), retry: false, staleTime: 60_000 });
}

export function useSignIn() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: SignInBody) => api("/api/auth/sign-in", { method: "POST", body, schema: SignedInSchema }),
    onSuccess: async () => {
      qc.clear();
      await qc.invalidateQueries({ queryKey: meKeys.all });
    },
  });
}

/** Sign-up: {user} when signed in at once (invitation, first account), else {ok, message} "check your mail". */
export function useSignUp() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: SignUpBody) => api("/api/auth/sign-up", { method: "POST", body, schema: SignUpResponseSchema }),
    onSuccess: async (r) => {
      if (!("user" in r)) return;
      qc.clear();
      await qc.invalidateQueries({ queryKey: meKeys.all });
    },
  });
}

/** Finish a sign-up with the token from its mail; signs in. */
export function useSignUpConfirm() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: SignUpConfirmBody) =>
      api("/api/auth/sign-up/confirm", { method: "POST", body, schema: SignedInSchema }),
    onSuccess: async () => {
      qc.clear();
      await qc.invalidateQueries({ queryKey: meKeys.all });
    },
  });
}

export function useSignOut() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => api("/api/auth/sign-out", { method: "POST" }),
    onSettled: () => {
      qc.clear();
    },
  });
}

export function useResetRequest() {
  return useMutation({ mutationFn: (body: ResetRequestBody) => api("/api/auth/reset-request", { method: "POST", body, schema: OkSchema }) });
}

export function useResetConfirm() {
  return useMutation({ mutationFn: (body: ResetConfirmBody) => api("/api/auth/reset-confirm", { method: "POST", body, schema: OkSchema }) });
}
