/**
 * Site administration (server/routes/admin.routes.ts): the local mail outbox,
 * every account, and an online database backup. Site admins only (403 otherwise).
 * Contract: shared/schemas/api-accounts.ts.
 */
import { useMutation, useQuery } from "@tanstack/react-query";
import { api } from "./api";
import { AdminUsersSchema, BackupResultSchema, OutboxSchema } from "@/shared/schemas/api-accounts";

export type { AdminUser, BackupResult, OutboxMessage } from "@/shared/schemas/api-accounts";

export const adminKeys = {
  all: ["admin"] as const,
  outbox: (limit: number) => [...adminKeys.all, "outbox", limit] as const,
  users: () => [...adminKeys.all, "users"] as const,
};

/** Newest first (the server orders them). */
export function useOutbox(enabled = true, limit = 50) {
  return useQuery({
    queryKey: adminKeys.outbox(limit),
    queryFn: ({ signal }) => api(`/api/admin/outbox?limit=${limit}`, { schema: OutboxSchema, signal }),
    enabled,
  });
}

export function useAdminUsers(enabled = true) {
  return useQuery({
    queryKey: adminKeys.users(),
    queryFn: ({ signal }) => api("/api/admin/users", { schema: AdminUsersSchema, signal }).then((r) => r.users),
    enabled,
  });
}

export function useBackup() {
  return useMutation({ mutationFn: () => api("/api/admin/backup", { method: "POST", schema: BackupResultSchema }) });
}
