/**
 * Site administration (server/routes/admin.routes.ts): the local mail outbox,
 * every account, and an online database backup. Site admins only (403 otherwise).
 * Response shapes mirror the routes (no shared contract exists for them yet).
 */
import { useMutation, useQuery } from "@tanstack/react-query";
import { z } from "zod";
import { api } from "./api";

export const OutboxMessageSchema = z.object({
  id: z.number(),
  to: z.string(),
  from: z.string(),
  subject: z.string(),
  text: z.string(),
  receivedAt: z.string(),
});
export type OutboxMessage = z.infer<typeof OutboxMessageSchema>;
const OutboxSchema = z.object({ mailer: z.string(), messages: z.array(OutboxMessageSchema) });

export const AdminUserSchema = z.object({
  id: z.string(),
  email: z.string(),
  displayName: z.string(),
  isSiteAdmin: z.boolean(),
  createdAt: z.string(),
  labCount: z.number(),
});
export type AdminUser = z.infer<typeof AdminUserSchema>;
const UsersSchema = z.object({ users: z.array(AdminUserSchema) });
const BackupSchema = z.object({ file: z.string(), bytes: z.number() });
export type BackupResult = z.infer<typeof BackupSchema>;

export const adminKeys = {
  outbox: (limit: number) => ["admin", "outbox", limit] as const,
  users: ["admin", "users"] as const,
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
    queryKey: adminKeys.users,
    queryFn: ({ signal }) => api("/api/admin/users", { schema: UsersSchema, signal }).then((r) => r.users),
    enabled,
  });
}

export function useBackup() {
  return useMutation({ mutationFn: () => api("/api/admin/backup", { method: "POST", schema: BackupSchema }) });
}
