/**
 * Labs, members, invitations and the audit trail (server/routes/labs.routes.ts,
 * and the public invitation routes of auth.routes.ts).
 *
 * The response shapes are declared here because shared/schemas has no labs
 * contract yet; they mirror server/services/labs.service.ts and audit.service.ts.
 */
import { useInfiniteQuery, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { z } from "zod";
import { api } from "./api";
import { MeSchema, meKeys } from "./use-me";

export const LAB_ROLES = ["owner", "editor", "viewer"] as const;
export const LabRoleSchema = z.enum(LAB_ROLES);
export type LabRole = z.infer<typeof LabRoleSchema>;

export const LabMemberSchema = z.object({
  userId: z.string(),
  email: z.string(),
  displayName: z.string(),
  role: LabRoleSchema,
  joinedAt: z.string(),
});
export type LabMember = z.infer<typeof LabMemberSchema>;

export const LabDetailSchema = z.object({
  id: z.string(),
  name: z.string(),
  isDemo: z.boolean().optional().default(false),
  createdAt: z.string(),
  members: z.array(LabMemberSchema),
});
export type LabDetail = z.infer<typeof LabDetailSchema>;
const LabResponseSchema = z.object({ lab: LabDetailSchema, role: LabRoleSchema.optional() });

export const PendingInvitationSchema = z.object({
  id: z.string(),
  email: z.string().nullable(),
  role: LabRoleSchema.nullable(),
  expiresAt: z.string(),
  createdAt: z.string(),
  invitedBy: z.string().nullable(),
});
export type PendingInvitation = z.infer<typeof PendingInvitationSchema>;
const InvitationListSchema = z.object({ invitations: z.array(PendingInvitationSchema) });
const InviteResponseSchema = z.object({ invitation: z.object({ email: z.string(), role: LabRoleSchema, expiresAt: z.string() }) });

export const AuditEventSchema = z.object({
  id: z.number(),
  labId: z.string().nullable(),
  userId: z.string().nullable(),
  userName: z.string().nullable(),
  action: z.string(),
  targetType: z.string().nullable(),
  targetId: z.string().nullable(),
  detail: z.unknown(),
  at: z.string(),
});
export type AuditEvent = z.infer<typeof AuditEventSchema>;
const AuditPageSchema = z.object({ events: z.array(AuditEventSchema) });

/** What a public invitation link offers. */
export const InvitationOfferSchema = z.object({
  labName: z.string(),
  role: LabRoleSchema,
  email: z.string(),
  expiresAt: z.string(),
  hasAccount: z.boolean(),
});
export type InvitationOffer = z.infer<typeof InvitationOfferSchema>;
const InvitationOfferResponseSchema = z.object({ invitation: InvitationOfferSchema });
const AcceptResponseSchema = MeSchema.extend({ labId: z.string(), role: LabRoleSchema });
export type AcceptResult = z.infer<typeof AcceptResponseSchema>;

const CreatedLabSchema = z.object({ lab: z.object({ id: z.string(), name: z.string(), role: LabRoleSchema }) });

export const labKeys = {
  all: ["labs"] as const,
  detail: (labId: string) => ["labs", "detail", labId] as const,
  invitations: (labId: string) => ["labs", "invitations", labId] as const,
  audit: (labId: string, pageSize: number) => ["labs", "audit", labId, pageSize] as const,
  invitation: (token: string) => ["invitations", token] as const,
};

/** One page of the audit trail (events newest first). */
export const AUDIT_PAGE_SIZE = 30;

export function useLab(labId: string) {
  return useQuery({
    queryKey: labKeys.detail(labId),
    queryFn: ({ signal }) => api(`/api/labs/${labId}`, { schema: LabResponseSchema, signal }),
    enabled: !!labId,
  });
}

export function useInvitations(labId: string, enabled = true) {
  return useQuery({
    queryKey: labKeys.invitations(labId),
    queryFn: ({ signal }) => api(`/api/labs/${labId}/invitations`, { schema: InvitationListSchema, signal }).then((r) => r.invitations),
    enabled: !!labId && enabled,
  });
}

export function useInvite(labId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: { email: string; role: LabRole }) => api(`/api/labs/${labId}/invitations`, { method: "POST", body, schema: InviteResponseSchema }),
    onSuccess: () => {
      qc.invalidateQueries({ queryKey: labKeys.invitations(labId) });
      qc.invalidateQueries({ queryKey: ["labs", "audit", labId] });
    },
  });
}

export function useWithdrawInvitation(labId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (invitationId: string) => api(`/api/labs/${labId}/invitations/${encodeURIComponent(invitationId)}`, { method: "DELETE" }),
    onSuccess: () => {
      qc.invalidateQueries({ queryKey: labKeys.invitations(labId) });
      qc.invalidateQueries({ queryKey: ["labs", "audit", labId] });
    },
  });
}

export function useChangeRole(labId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (v: { userId: string; role: LabRole }) =>
      api(`/api/labs/${labId}/members/${encodeURIComponent(v.userId)}`, { method: "PATCH", body: { role: v.role }, schema: z.object({ lab: LabDetailSchema }) }),
    onSuccess: () => {
      qc.invalidateQueries({ queryKey: labKeys.detail(labId) });
      qc.invalidateQueries({ queryKey: ["labs", "audit", labId] });
      // The caller's own role may have changed.
      qc.invalidateQueries({ queryKey: meKeys.all });
    },
  });
}

/** Removes a member (owners) or, with one's own id, leaves the lab. */
export function useRemoveMember(labId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (userId: string) => api(`/api/labs/${labId}/members/${encodeURIComponent(userId)}`, { method: "DELETE" }),
    onSuccess: () => {
      qc.invalidateQueries({ queryKey: labKeys.detail(labId) });
      qc.invalidateQueries({ queryKey: ["labs", "audit", labId] });
      qc.invalidateQueries({ queryKey: meKeys.all });
    },
  });
}

export function useCreateLab() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: { name: string }) => api("/api/labs", { method: "POST", body, schema: CreatedLabSchema }).then((r) => r.lab),
    onSuccess: () => qc.invalidateQueries({ queryKey: meKeys.all }),
  });
}

/** The audit trail, newest first, paged back with ?before=<oldest id shown>. */
export function useAudit(labId: string, enabled = true, pageSize = AUDIT_PAGE_SIZE) {
  return useInfiniteQuery({
    queryKey: labKeys.audit(labId, pageSize),
    initialPageParam: undefined as number | undefined,
    queryFn: ({ pageParam, signal }) =>
      api(`/api/labs/${labId}/audit?limit=${pageSize}${pageParam ? `&before=${pageParam}` : ""}`, { schema: AuditPageSchema, signal }).then((r) => r.events),
    getNextPageParam: (last) => (last.length < pageSize ? undefined : last[last.length - 1]?.id),
    enabled: !!labId && enabled,
  });
}

/** What an invitation link offers (public; 404 when expired, used or withdrawn). */
export function useInvitationOffer(token: string | undefined) {
  return useQuery({
    queryKey: labKeys.invitation(token ?? ""),
    queryFn: ({ signal }) => api(`/api/invitations/${encodeURIComponent(token ?? "")}`, { schema: InvitationOfferResponseSchema, signal }).then((r) => r.invitation),
    enabled: !!token,
    retry: false,
  });
}

/** Accepts an invitation: as the signed-in user (token only), or creating the invited account (password, displayName). */
export function useAcceptInvitation() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: { token: string; password?: string; displayName?: string }) => api("/api/invitations/accept", { method: "POST", body, schema: AcceptResponseSchema }),
    onSuccess: (r) => {
      qc.setQueryData(meKeys.all, { user: r.user, labs: r.labs });
      qc.invalidateQueries({ queryKey: labKeys.all });
    },
  });
}
