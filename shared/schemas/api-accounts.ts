/**
 * Request and response shapes of the accounts, labs, invitations, audit and
 * site-admin API (server/routes/auth.routes.ts, labs.routes.ts,
 * admin.routes.ts). The server validates request bodies with these schemas and
 * types its answers with the inferred types; the web app parses the answers
 * with them (components/data/use-me.ts, labs.ts, account.ts, admin.ts).
 * Times are ISO 8601 strings.
 */
import { z } from "zod";
import { PASSWORD_MAX_LENGTH, PASSWORD_MIN_LENGTH } from "./auth";
import { PageQuerySchema, pageSchema } from "./pagination";

// ---------------------------------------------------------------- shared parts

export const LAB_ROLES = ["owner", "editor", "viewer"] as const;
export const LabRoleSchema = z.enum(LAB_ROLES);
export type LabRole = z.infer<typeof LabRoleSchema>;
const ROLE_RANK: Record<LabRole, number> = { viewer: 1, editor: 2, owner: 3 };
/** The signed-in user as the server's session knows it. */
export interface SessionUser {
  id: string;
  email: string;
  displayName: string;
  isSiteAdmin: boolean;
}

/** True when a member with role `have` (null: not a member) may act as `need`. */
export const roleAtLeast = (have: LabRole | null, need: LabRole) => have !== null && ROLE_RANK[have] >= ROLE_RANK[need];

const EmailSchema = z.string().trim().max(254).pipe(z.email("must be an e-mail address"));
const PasswordSchema = z
  .string()
  .min(PASSWORD_MIN_LENGTH, `must be at least ${PASSWORD_MIN_LENGTH} characters`)
  .max(PASSWORD_MAX_LENGTH, `must be at most ${PASSWORD_MAX_LENGTH} characters`);
const DisplayNameSchema = z.string().trim().min(1, "must not be empty").max(80, "must be at most 80 characters");
const LabNameSchema = z.string().trim().min(1, "must not be empty").max(80, "must be at most 80 characters");
const TokenSchema = z.string().min(1).max(200);

// ---------------------------------------------------------------- requests

export const SignInBodySchema = z.object({ email: z.string().max(254), password: z.string().max(PASSWORD_MAX_LENGTH) });
export type SignInBody = z.input<typeof SignInBodySchema>;
export const SignUpBodySchema = z.object({
  email: EmailSchema,
  password: PasswordSchema,
  displayName: DisplayNameSchema,
  invitationToken: z.string().max(200).optional(),
});
export type SignUpBody = z.input<typeof SignUpBodySchema>;
export const ResetRequestBodySchema = z.object({ email: z.string().trim().max(254) });
export type ResetRequestBody = z.input<typeof ResetRequestBodySchema>;
export const ResetConfirmBodySchema = z.object({ token: TokenSchema, password: PasswordSchema });
export type ResetConfirmBody = z.input<typeof ResetConfirmBodySchema>;
export const ChangePasswordBodySchema = z.object({
  currentPassword: z.string().max(PASSWORD_MAX_LENGTH),
  newPassword: PasswordSchema,
});
export type ChangePasswordBody = z.input<typeof ChangePasswordBodySchema>;
export const MePatchBodySchema = z.object({
  displayName: DisplayNameSchema.optional(),
  notifyOnRunEnd: z.boolean().optional(),
});
export type MePatchBody = z.input<typeof MePatchBodySchema>;
/** Signed in: the token alone. Signed out: password and displayName create the invited account. */
export const AcceptInvitationBodySchema = z.object({
  token: TokenSchema,
  password: PasswordSchema.optional(),
  displayName: DisplayNameSchema.optional(),
});
export type AcceptInvitationBody = z.input<typeof AcceptInvitationBodySchema>;

export const LabCreateBodySchema = z.object({ name: LabNameSchema });
export type LabCreateBody = z.input<typeof LabCreateBodySchema>;
export const LabPatchBodySchema = z.object({ name: LabNameSchema });
export type LabPatchBody = z.input<typeof LabPatchBodySchema>;
export const InviteBodySchema = z.object({ email: EmailSchema, role: LabRoleSchema });
export type InviteBody = z.input<typeof InviteBodySchema>;
export const RoleBodySchema = z.object({ role: LabRoleSchema });
export type RoleBody = z.input<typeof RoleBodySchema>;
/** `?limit` (1-500, default 100) and `?before=<event id>` to page back. */
/** The audit trail is paged like every list: `?cursor=`, `?limit=` (shared/schemas/pagination.ts). */
export const AuditQuerySchema = PageQuerySchema;
/** A page of the outbox (`?cursor=`, `?limit=`) and `?to=<address>`. */
export const OutboxQuerySchema = PageQuerySchema.extend({
  to: z.string().max(254).optional(),
});

// ---------------------------------------------------------------- the signed-in user

export const MeUserSchema = z.object({
  id: z.string(),
  email: z.string(),
  displayName: z.string(),
  isSiteAdmin: z.boolean(),
  notifyOnRunEnd: z.boolean(),
});
export type MeUser = z.infer<typeof MeUserSchema>;
export const MeLabSchema = z.object({ id: z.string(), name: z.string(), role: LabRoleSchema });
export type MeLab = z.infer<typeof MeLabSchema>;
/** GET and PATCH /api/me. */
export const MeSchema = z.object({ user: MeUserSchema, labs: z.array(MeLabSchema) });
export type Me = z.infer<typeof MeSchema>;
/** Sign-in and sign-up. */
export const SignedInSchema = z.object({ user: MeUserSchema });
export type SignedIn = z.infer<typeof SignedInSchema>;
/** Reset request and confirm, change password. */
export const OkSchema = z.object({ ok: z.literal(true), message: z.string().optional() });
/**
 * Sign-up answers {user} (signed in) with an invitation or on an instance without accounts, and otherwise
 * {ok, message} "check your mail", the same for a new and a known address.
 */
export const SignUpResponseSchema = z.union([SignedInSchema, OkSchema]);
export type SignUpResponse = z.infer<typeof SignUpResponseSchema>;
export const SignUpConfirmBodySchema = z.object({ token: TokenSchema });
export type SignUpConfirmBody = z.input<typeof SignUpConfirmBodySchema>;
export type Ok = z.infer<typeof OkSchema>;

// ---------------------------------------------------------------- labs and members

/** One of the caller's labs (GET /api/labs, POST /api/labs). */
export const LabSummarySchema = z.object({
  id: z.string(),
  name: z.string(),
  role: LabRoleSchema,
  memberCount: z.number().int(),
});
export type LabSummary = z.infer<typeof LabSummarySchema>;
/** GET /api/labs: one page of the caller's labs by name (ties by id). */
export const LabListSchema = pageSchema(LabSummarySchema);
export type LabList = z.infer<typeof LabListSchema>;
export const LabCreatedSchema = z.object({ lab: LabSummarySchema });
export type LabCreated = z.infer<typeof LabCreatedSchema>;

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
  isDemo: z.boolean(),
  createdAt: z.string(),
  members: z.array(LabMemberSchema),
});
export type LabDetail = z.infer<typeof LabDetailSchema>;
/** GET and PATCH /api/labs/:labId: the lab and the caller's role in it. */
export const LabResponseSchema = z.object({ lab: LabDetailSchema, role: LabRoleSchema });
export type LabResponse = z.infer<typeof LabResponseSchema>;
/** PATCH /api/labs/:labId/members/:userId. */
export const LabMembersResponseSchema = z.object({ lab: LabDetailSchema });
export type LabMembersResponse = z.infer<typeof LabMembersResponseSchema>;

// ---------------------------------------------------------------- invitations

/** POST /api/labs/:labId/invitations. */
export const InvitationSentSchema = z.object({ email: z.string(), role: LabRoleSchema, expiresAt: z.string() });
export type InvitationSent = z.infer<typeof InvitationSentSchema>;
export const InviteResponseSchema = z.object({ invitation: InvitationSentSchema });
export type InviteResponse = z.infer<typeof InviteResponseSchema>;

/** A pending invitation; `id` is a prefix of the token's hash (withdraw with it). */
export const PendingInvitationSchema = z.object({
  id: z.string(),
  email: z.string().nullable(),
  role: LabRoleSchema.nullable(),
  expiresAt: z.string(),
  createdAt: z.string(),
  invitedBy: z.string().nullable(),
});
export type PendingInvitation = z.infer<typeof PendingInvitationSchema>;
/** One page of pending invitations, oldest first. */
export const InvitationListSchema = pageSchema(PendingInvitationSchema);
export type InvitationList = z.infer<typeof InvitationListSchema>;

/** What a public invitation link offers (GET /api/invitations/:token). */
export const InvitationOfferSchema = z.object({
  labName: z.string(),
  role: LabRoleSchema,
  email: z.string(),
  expiresAt: z.string(),
  hasAccount: z.boolean(),
});
export type InvitationOffer = z.infer<typeof InvitationOfferSchema>;
export const InvitationOfferResponseSchema = z.object({ invitation: InvitationOfferSchema });
export type InvitationOfferResponse = z.infer<typeof InvitationOfferResponseSchema>;

/** Which lab an accepted invitation joined, with the role held there now (a higher existing role is kept). */
export const JoinedLabSchema = z.object({ labId: z.string(), role: LabRoleSchema });
export type JoinedLab = z.infer<typeof JoinedLabSchema>;
/** POST /api/invitations/accept: the joined lab and the (possibly new) signed-in user's /api/me. */
export const AcceptInvitationResponseSchema = MeSchema.extend(JoinedLabSchema.shape);
export type AcceptInvitationResponse = z.infer<typeof AcceptInvitationResponseSchema>;

// ---------------------------------------------------------------- audit trail

export const AuditEventSchema = z.object({
  id: z.number().int(),
  labId: z.string().nullable(),
  userId: z.string().nullable(),
  /** The actor's display name; null when the account is gone. */
  userName: z.string().nullable(),
  action: z.string(),
  targetType: z.string().nullable(),
  targetId: z.string().nullable(),
  detail: z.unknown(),
  at: z.string(),
});
export type AuditEvent = z.infer<typeof AuditEventSchema>;
/** GET /api/labs/:labId/audit: newest first. */
/** One page of the audit trail, newest first. */
export const AuditPageSchema = pageSchema(AuditEventSchema);
export type AuditPage = z.infer<typeof AuditPageSchema>;

// ---------------------------------------------------------------- site admin

export const OutboxMessageSchema = z.object({
  id: z.number().int(),
  to: z.string(),
  from: z.string(),
  subject: z.string(),
  text: z.string(),
  receivedAt: z.string(),
});
export type OutboxMessage = z.infer<typeof OutboxMessageSchema>;
/** GET /api/admin/outbox: newest first; `mailer` is "fake" for the local outbox. */
export const OutboxSchema = pageSchema(OutboxMessageSchema).extend({ mailer: z.string() });
export type Outbox = z.infer<typeof OutboxSchema>;

export const AdminUserSchema = z.object({
  id: z.string(),
  email: z.string(),
  displayName: z.string(),
  isSiteAdmin: z.boolean(),
  createdAt: z.string(),
  labCount: z.number().int(),
});
export type AdminUser = z.infer<typeof AdminUserSchema>;
/** GET /api/admin/users: one page of accounts, oldest first (ties by id). */
export const AdminUsersSchema = pageSchema(AdminUserSchema);
export type AdminUsers = z.infer<typeof AdminUsersSchema>;

/** POST /api/admin/backup: the file written in data/backups. */
export const BackupResultSchema = z.object({ file: z.string(), bytes: z.number().int() });
export type BackupResult = z.infer<typeof BackupResultSchema>;
