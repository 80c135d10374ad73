/**
 * Site administration (server/routes/admin.routes.ts): compute status, the local mail outbox,
 * every account, and an online database backup. Site admins only (403 otherwise).
 * Contracts: shared/schemas/api-accounts.ts, shared/schemas/api-health.ts.
 */
import { useMutation, useQuery } from "@tanstack/react-query";
import { api } from "./api";
import { AdminUsersSchema, BackupResultSchema, OutboxSchema } from "@/shared/schemas/api-accounts";
import { ComputeStatusSchema } from "@/shared/schemas/api-health";

export type { AdminUser, BackupResult, OutboxMessage } from "@/shared/schemas/api-accounts";
export type { ComputeStatus } from "@/shared/schemas/api-health";

export const adminKeys = {
  all: ["admin"] as const,
  outbox: (limit: number) => [...adminKeys.all, "outbox", limit] as const,
  users: () => [...adminKeys.all, "users"] as const,
  compute: () => [...adminKeys.all, "compute"] as const,
};

/** Where chunks run (embedded pool or Redis workers with heartbeats); refreshed every 5 s while shown. */
export function useComputeStatus(enabled = true) {
  return useQuery({
    queryKey: adminKeys.compute(),
    queryFn: ({ signal }) => api("/api/admin/compute", { schema: ComputeStatusSchema, signal }),
    enabled,
    refetchInterval: 5000,
  });
}

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
