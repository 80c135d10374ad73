/**
 * Labs, members, invitations and the audit trail (server/routes/labs.routes.ts,
 * and the public invitation routes of auth.routes.ts). Contract:
 * shared/schemas/api-accounts.ts.
 */
import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { api } from "./api";
import { meKeys } from "./use-me";
import { usePagedQuery } from "./paged";
import {
  AcceptInvitationResponseSchema,
  AuditPageSchema,
  InvitationListSchema,
  InvitationOfferResponseSchema,
  InviteResponseSchema,
  LabCreatedSchema,
  LabMembersResponseSchema,
  LabResponseSchema,
  type AcceptInvitationBody,
  type InviteBody,
  type LabCreateBody,
  type AuditEvent,
  type LabRole,
  type PendingInvitation,
} from "@/shared/schemas/api-accounts";

export { LAB_ROLES } from "@/shared/schemas/api-accounts";
export type {
  AcceptInvitationResponse as AcceptResult,
  AuditEvent,
  InvitationOffer,
  LabDetail,
  LabMember,
  LabRole,
  PendingInvitation,
} from "@/shared/schemas/api-accounts";

export const labKeys = {
  all: ["labs"] as const,
  detail: (labId: string) => [...labKeys.all, "detail", labId] as const,
  invitations: (labId: string) => [...labKeys.all, "invitations", labId] as const,
  audits: (labId: string) => [...labKeys.all, "audit", labId] as const,
  audit: (labId: string, pageSize: number) => [...labKeys.audits(labId), pageSize] as const,
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

/** Pending invitations, oldest first, a page at a time. */
export function useInvitations(labId: string, enabled = true) {
  return usePagedQuery<PendingInvitation>({
    queryKey: labKeys.invitations(labId),
    path: `/api/labs/${labId}/invitations`,
    schema: InvitationListSchema,
    enabled: !!labId && enabled,
  });
}

export function useInvite(labId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: InviteBody) => api(`/api/labs/${labId}/invitations`, { method: "POST", body, schema: InviteResponseSchema }),
    onSuccess: () => {
      qc.invalidateQueries({ queryKey: labKeys.invitations(labId) });
      qc.invalidateQueries({ queryKey: labKeys.audits(labId) });
    },
  });
}

export function useWithdrawInvitation(labId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (invitationId: string) => api(`/api/labs/${labId}/invitations/${encodeURIComponent(invitationId)}`, { method: "DELETE" }),
    onSuccess: () => {
      qc.invalidateQueries({ queryKey: labKeys.invitations(labId) });
      qc.invalidateQueries({ queryKey: labKeys.audits(labId) });
    },
  });
}

export function useChangeRole(labId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (v: { userId: string; role: LabRole }) =>
      api(`/api/labs/${labId}/members/${encodeURIComponent(v.userId)}`, { method: "PATCH", body: { role: v.role }, schema: LabMembersResponseSchema }),
    onSuccess: () => {
      qc.invalidateQueries({ queryKey: labKeys.detail(labId) });
      qc.invalidateQueries({ queryKey: labKeys.audits(labId) });
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
      qc.invalidateQueries({ queryKey: labKeys.audits(labId) });
      qc.invalidateQueries({ queryKey: meKeys.all });
    },
  });
}

export function useCreateLab() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: LabCreateBody) => api("/api/labs", { method: "POST", body, schema: LabCreatedSchema }).then((r) => r.lab),
    onSuccess: () => qc.invalidateQueries({ queryKey: meKeys.all }),
  });
}

/** The audit trail, newest first, `pageSize` events a page (`loadMore` for older). */
export function useAudit(labId: string, enabled = true, pageSize = AUDIT_PAGE_SIZE) {
  return usePagedQuery<AuditEvent>({
    queryKey: labKeys.audit(labId, pageSize),
    path: `/api/labs/${labId}/audit`,
    params: { limit: String(pageSize) },
    schema: AuditPageSchema,
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
    mutationFn: (body: AcceptInvitationBody) => api("/api/invitations/accept", { method: "POST", body, schema: AcceptInvitationResponseSchema }),
    onSuccess: (r) => {
      qc.setQueryData(meKeys.all, { user: r.user, labs: r.labs });
      qc.invalidateQueries({ queryKey: labKeys.all });
    },
  });
}
