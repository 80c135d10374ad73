/**
 * The signed-in user's own account: profile (display name, run-end e-mails)
 * and password. Sign-in, sign-out and /api/me itself live in use-me.ts.
 */
import { useMutation, useQueryClient } from "@tanstack/react-query";
import { api } from "./api";
import { MeSchema, meKeys } from "./use-me";

/** Same rule as the server (server/services/auth.service.ts PASSWORD_MIN_LENGTH / MAX). */
export const PASSWORD_MIN_LENGTH = 8;
export const PASSWORD_MAX_LENGTH = 200;

/** PATCH /api/me: display name and/or the "e-mail me when my lab's runs end" setting. */
export function useUpdateProfile() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: { displayName?: string; notifyOnRunEnd?: boolean }) => api("/api/me", { method: "PATCH", body, schema: MeSchema }),
    onSuccess: (me) => qc.setQueryData(meKeys.all, me),
  });
}

/** POST /api/auth/change-password; the server ends the user's other sessions. */
export function useChangePassword() {
  return useMutation({
    mutationFn: (body: { currentPassword: string; newPassword: string }) => api("/api/auth/change-password", { method: "POST", body }),
  });
}
