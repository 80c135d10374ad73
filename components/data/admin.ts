/**
 * Site administration (server/routes/admin.routes.ts): compute status, the local mail outbox,
 * every account, and an online database backup. Site admins only (403 otherwise).
 * Contracts: shared/schemas/api-accounts.ts, shared/schemas/api-health.ts.
 */
import { useMutation, useQuery } from "@tanstack/react-query";
import { usePagedQuery } from "./paged";
import { api } from "./api";
import {
  AdminUsersSchema,
  BackupResultSchema,
  OutboxSchema,
  type AdminUser,
  type Outbox,
  type OutboxMessage,
} from "@/shared/schemas/api-accounts";
import { ComputeStatusSchema } from "@/shared/schemas/api-health";

export type { AdminUser, BackupResult, OutboxMessage } from "@/shared/schemas/api-accounts";
export type { ComputeStatus } from "@/shared/schemas/api-health";

export const adminKeys = {
  all: ["admin"] as const,
  lists: () => [...adminKeys.all, "list"] as const,
  outbox: (limit: number) => [...adminKeys.lists(), "outbox", limit] as const,
  users: () => [...adminKeys.lists(), "users"] as const,
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

/** The outbox, newest first, `limit` a page (`loadMore` for older); `mailer` from the first page. */
export function useOutbox(enabled = true, limit = 50) {
  const q = usePagedQuery<OutboxMessage, Outbox>({
    queryKey: adminKeys.outbox(limit),
    path: "/api/admin/outbox",
    params: { limit: String(limit) },
    schema: OutboxSchema,
    enabled,
  });
  return { ...q, mailer: q.firstPage?.mailer };
}

/** The accounts by e-mail address, a page at a time. */
export function useAdminUsers(enabled = true) {
  return usePagedQuery<AdminUser>({ queryKey: adminKeys.users(), path: "/api/admin/users", schema: AdminUsersSchema, enabled });
}

export function useBackup() {
  return useMutation({ mutationFn: () => api("/api/admin/backup", { method: "POST", schema: BackupResultSchema }) });
}
