/**
 * The signed-in user's own account: profile (display name, run-end e-mails)
 * and password. Sign-in, sign-out and /api/me itself live in use-me.ts.
 */
import { useMutation, useQueryClient } from "@tanstack/react-query";
import { api } from "./api";
import { meKeys } from "./use-me";
import { MeSchema, OkSchema, type ChangePasswordBody, type MePatchBody } from "@/shared/schemas/api-accounts";

/** The server's rule (shared/schemas/auth.ts). */
export { PASSWORD_MIN_LENGTH, PASSWORD_MAX_LENGTH } from "@/shared/schemas/auth";

/** PATCH /api/me: display name and/or the "e-mail me when my lab's runs end" setting. */
export function useUpdateProfile() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: MePatchBody) => api("/api/me", { method: "PATCH", body, schema: MeSchema }),
    onSuccess: (me) => qc.setQueryData(meKeys.all, me),
  });
}

/** POST /api/auth/change-password; the server ends the user's other sessions. */
export function useChangePassword() {
  return useMutation({
    mutationFn: (body: ChangePasswordBody) => api("/api/auth/change-password", { method: "POST", body, schema: OkSchema }),
  });
}
