/** Labs, members, invitations and the audit trail. */
import { defineRoutes } from "./route-table";
import { auditPage } from "@/server/services/audit.service";
import { PAGE_SIZE, PAGE_SIZE_MAX, PageQuerySchema } from "@/shared/schemas/pagination";
import {
  changeRole,
  createLab,
  deleteLab,
  inviteMember,
  labDetail,
  labsPage,
  pendingInvitations,
  removeMember,
  renameLab,
  revokeInvitation,
} from "@/server/services/labs.service";
import {
  AuditQuerySchema,
  InviteBodySchema,
  LabCreateBodySchema,
  LabPatchBodySchema,
  RoleBodySchema,
  type AuditPage,
  type InvitationList,
  type InviteResponse,
  type LabCreated,
  type LabList,
  type LabMembersResponse,
  type LabResponse,
} from "@/shared/schemas/api-accounts";

export const labsRoutes = defineRoutes([
  {
    method: "get",
    path: "/labs",
    access: { kind: "signedIn" },
    query: PageQuerySchema,
    summary: `One page of the caller's labs with their role, by name: {items, nextCursor} (?cursor=, ?limit= up to ${PAGE_SIZE_MAX}, default ${PAGE_SIZE}).`,
    handler: ({ ctx, user, query }): LabList => labsPage(ctx, user!.id, query),
  },
  {
    method: "post",
    path: "/labs",
    access: { kind: "signedIn" },
    body: LabCreateBodySchema,
    summary: "Create a lab; the creator becomes its owner.",
    handler: ({ ctx, res, user, body }): LabCreated => {
      const lab = createLab(ctx, user!.id, body.name);
      res.status(201);
      return { lab };
    },
  },
  {
    method: "get",
    path: "/labs/:labId",
    access: { kind: "lab", role: "viewer" },
    summary: "A lab: name and members.",
    handler: ({ ctx, labId, role }): LabResponse => ({ lab: labDetail(ctx, labId), role: role! }),
  },
  {
    method: "patch",
    path: "/labs/:labId",
    access: { kind: "lab", role: "owner" },
    body: LabPatchBodySchema,
    summary: "Rename a lab.",
    handler: ({ ctx, user, labId, role, body }): LabResponse => {
      renameLab(ctx, user!.id, labId, body.name);
      return { lab: labDetail(ctx, labId), role: role! };
    },
  },
  {
    method: "delete",
    path: "/labs/:labId",
    access: { kind: "lab", role: "owner" },
    summary: "Delete a lab and everything in it.",
    handler: ({ ctx, user, labId }) => {
      deleteLab(ctx, user!.id, labId);
      return undefined;
    },
  },
  {
    method: "post",
    path: "/labs/:labId/invitations",
    access: { kind: "lab", role: "owner" },
    body: InviteBodySchema,
    summary: "Invite someone by e-mail with a role; the link expires in 7 days.",
    handler: async ({ ctx, res, user, labId, body }): Promise<InviteResponse> => {
      const invitation = await inviteMember(ctx, user!, labId, body.email, body.role);
      res.status(201);
      return { invitation };
    },
  },
  {
    method: "get",
    path: "/labs/:labId/invitations",
    access: { kind: "lab", role: "owner" },
    query: PageQuerySchema,
    summary: `One page of pending (unused, unexpired) invitations, oldest first: {items, nextCursor} (?cursor=, ?limit= up to ${PAGE_SIZE_MAX}, default ${PAGE_SIZE}).`,
    handler: ({ ctx, labId, query }): InvitationList => pendingInvitations(ctx, labId, query),
  },
  {
    method: "delete",
    path: "/labs/:labId/invitations/:invitationId",
    access: { kind: "lab", role: "owner" },
    summary: "Withdraw a pending invitation (the id from the list); its link stops working.",
    handler: ({ ctx, user, labId, params }) => {
      revokeInvitation(ctx, user!.id, labId, params.invitationId);
      return undefined;
    },
  },
  {
    method: "patch",
    path: "/labs/:labId/members/:userId",
    access: { kind: "lab", role: "owner" },
    body: RoleBodySchema,
    summary: "Change a member's role; a lab always keeps an owner (409 otherwise).",
    handler: ({ ctx, user, labId, params, body }): LabMembersResponse => {
      changeRole(ctx, user!.id, labId, params.userId, body.role);
      return { lab: labDetail(ctx, labId) };
    },
  },
  {
    method: "delete",
    path: "/labs/:labId/members/:userId",
    access: { kind: "lab", role: "viewer" },
    summary: "Remove a member (owner), or leave the lab (any member, own id); the last owner cannot leave (409).",
    handler: ({ ctx, user, labId, role, params }) => {
      removeMember(ctx, { id: user!.id, role: role! }, labId, params.userId);
      return undefined;
    },
  },
  {
    method: "get",
    path: "/labs/:labId/audit",
    access: { kind: "lab", role: "owner" },
    query: AuditQuerySchema,
    summary: `One page of the lab's audit trail, newest first: {items, nextCursor} (?cursor=, ?limit= up to ${PAGE_SIZE_MAX}, default ${PAGE_SIZE}).`,
    handler: ({ ctx, labId, query }): AuditPage => auditPage(ctx, labId, query),
  },
]);
