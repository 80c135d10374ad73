import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { z } from "zod";
import { api } from "./api";

export const MeUserSchema = z.object({
  id: z.string(),
  email: z.string(),
  displayName: z.string(),
  isSiteAdmin: z.boolean().optional().default(false),
  notifyOnRunEnd: z.boolean().optional().default(true),
});
export const MeLabSchema = z.object({ id: z.string(), name: z.string(), role: z.enum(["owner", "editor", "viewer"]) });
export const MeSchema = z.object({ user: MeUserSchema, labs: z.array(MeLabSchema) });
export type Me = z.infer<typeof MeSchema>;
export type MeLab = z.infer<typeof MeLabSchema>;

export const meKeys = { all: ["me"] as const };

/** The signed-in user and their labs; a 401 error means "not signed in". */
export function useMe() {
  return useQuery({ queryKey: meKeys.all, queryFn: ({ signal }) => api("/api/me", { schema: MeSchema, signal }), retry: false, staleTime: 60_000 });
}

export function useSignIn() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: { email: string; password: string }) => api("/api/auth/sign-in", { method: "POST", body }),
    onSuccess: async () => {
      qc.clear();
      await qc.invalidateQueries({ queryKey: meKeys.all });
    },
  });
}

export function useSignUp() {
  return useMutation({
    mutationFn: (body: { email: string; password: string; displayName: string; invitationToken?: string }) =>
      api("/api/auth/sign-up", { method: "POST", body }),
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
  return useMutation({ mutationFn: (body: { email: string }) => api("/api/auth/reset-request", { method: "POST", body }) });
}

export function useResetConfirm() {
  return useMutation({ mutationFn: (body: { token: string; password: string }) => api("/api/auth/reset-confirm", { method: "POST", body }) });
}

export function useUpdateMe() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: { displayName?: string; notifyOnRunEnd?: boolean }) => api("/api/me", { method: "PATCH", body }),
    onSuccess: () => qc.invalidateQueries({ queryKey: meKeys.all }),
  });
}
