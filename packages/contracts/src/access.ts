// Request and response shapes of the access routes (also the OpenAPI components of these routes).
import { z } from "zod";
import { PersonRefSchema, pageSchema } from "./json.ts";

/** Membership roles (the API's database stores them as text). */
export const ROLES = ["admin", "designer", "reviewer", "approver"] as const;
export type Role = (typeof ROLES)[number];

/** Password length bounds (characters). */
export const PASSWORD_MIN = 10;
export const PASSWORD_MAX = 200;

export const RoleSchema = z.enum(ROLES);

export const RolesInput = z
  .array(RoleSchema)
  .min(1, "Give at least one role.")
  .max(ROLES.length)
  .refine((roles) => new Set(roles).size === roles.length, "Each role may appear once.");

export const EmailInput = z.string().trim().toLowerCase().pipe(z.email("Enter a valid e-mail address.").max(254));

export const NewPassword = z
  .string()
  .min(PASSWORD_MIN, `Use at least ${PASSWORD_MIN} characters.`)
  .max(PASSWORD_MAX, `Use at most ${PASSWORD_MAX} characters.`);

export const PersonName = z.string().trim().min(1, "Enter a name.").max(100);

export const TokenInput = z.string().min(20).max(200);

export const UserSchema = z.object({ id: z.string(), email: z.string(), name: z.string() });
export const WorkspaceSchema = z.object({ id: z.string(), name: z.string() });
export const SessionInfo = z.object({ user: UserSchema, workspace: WorkspaceSchema, roles: z.array(RoleSchema) });
export type SessionInfo = z.infer<typeof SessionInfo>;

export const UserIdParams = z.object({ userId: z.string().min(1).max(100) });
export type SessionUser = z.infer<typeof UserSchema>;

// ---- Members, invitations, audit, outbox ----

export const MemberSchema = z.object({ user: UserSchema, roles: z.array(RoleSchema), joinedAt: z.string() });
export type Member = z.infer<typeof MemberSchema>;
export const MemberListResponse = pageSchema(MemberSchema);
/** PATCH /members/:userId answers the member without the join date. */
export const MemberUpdateResponse = MemberSchema.omit({ joinedAt: true });

export const InvitationSchema = z.object({
  id: z.string(),
  email: z.string(),
  roles: z.array(RoleSchema),
  createdAt: z.string(),
  expiresAt: z.string(),
  invitedBy: PersonRefSchema.nullable(),
});
export type Invitation = z.infer<typeof InvitationSchema>;
export const InvitationListResponse = pageSchema(InvitationSchema);

/** GET /invitations/lookup/:token (public). */
export const InvitationLookupSchema = z.object({
  email: z.string(),
  workspaceName: z.string(),
  roles: z.array(RoleSchema),
  expiresAt: z.string(),
  existingAccount: z.boolean(),
});
export type InvitationLookup = z.infer<typeof InvitationLookupSchema>;

export const AuditItem = z.object({
  id: z.string(),
  at: z.string(),
  actor: PersonRefSchema.nullable(),
  action: z.string(),
  subjectType: z.string(),
  subjectId: z.string(),
  summary: z.string(),
  data: z.unknown(),
});
export type AuditEntry = z.infer<typeof AuditItem>;
export const AuditListResponse = pageSchema(AuditItem);

export const OutboxItem = z.object({ id: z.string(), to: z.string(), subject: z.string(), receivedAt: z.string() });
export type OutboxItem = z.infer<typeof OutboxItem>;
export const OutboxDetail = OutboxItem.extend({ from: z.string(), text: z.string(), html: z.string().nullable() });
export type OutboxMessage = z.infer<typeof OutboxDetail>;
export const OutboxListResponse = pageSchema(OutboxItem);
