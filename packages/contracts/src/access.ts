// Request and response shapes of the access routes (also the OpenAPI components of these routes).
import { z } from "zod";
import { PageQuery, PersonRefSchema, pageSchema } from "./json.ts";

/** Membership roles (the API's database stores them as text). */
export const ROLES = ["admin", "designer", "reviewer", "approver"] as const;
export type Role = (typeof ROLES)[number];

/** Password length bounds (characters): at least 12 (OWASP ASVS 5.0 V6.2.1 asks for 8 at least; 12 is the
 * common-practice floor here). The API also asks for a zxcvbn score of 3 (apps/api/src/auth/password.ts). */
export const PASSWORD_MIN = 12;
export const PASSWORD_MAX = 200;

export const RoleSchema = z.enum(ROLES);

export const RolesInput = z
  .array(RoleSchema)
  .min(1, "Give at least one role.")
  .max(ROLES.length)
  .refine((roles) => new Set(roles).size === roles.length, "Each role may appear once.");

export const EmailInput = z
  .string()
  .trim()
  .toLowerCase()
  .pipe(z.email("Enter a valid e-mail address.").max(254));

export const NewPassword = z
  .string()
  .min(PASSWORD_MIN, `Use at least ${PASSWORD_MIN} characters.`)
  .max(PASSWORD_MAX, `Use at most ${PASSWORD_MAX} characters.`);

export const PersonName = z.string().trim().min(1, "Enter a name.").max(100);

export const TokenInput = z.string().min(20).max(200);

export const UserSchema = z.object({ id: z.string(), email: z.string(), name: z.string() });
export const WorkspaceSchema = z.object({
  id: z.string(),
  name: z.string(),
  /** The fictional demo workspace (its accounts have a published password): the web app shows a notice. */
  demo: z.boolean(),
});
export const SessionInfo = z.object({
  user: UserSchema,
  workspace: WorkspaceSchema,
  roles: z.array(RoleSchema),
});
export type SessionInfo = z.infer<typeof SessionInfo>;

export const UserIdParams = z.object({ userId: z.string().min(1).max(100) });
export type SessionUser = z.infer<typeof UserSchema>;

// ---- Request bodies, params and queries of the access routes ----

/** POST /auth/sign-in. */
export const SignInBody = z.object({
  email: EmailInput,
  password: z.string().min(1, "Enter your password.").max(1000),
});
export type SignInInput = z.input<typeof SignInBody>;
/** POST /auth/password-reset. */
export const PasswordResetBody = z.object({ email: EmailInput });
/** POST /auth/password-reset/confirm. */
export const PasswordResetConfirmBody = z.object({ token: TokenInput, password: NewPassword });
export type PasswordResetConfirmInput = z.input<typeof PasswordResetConfirmBody>;
/** GET /invitations/lookup/:token. */
export const TokenParams = z.object({ token: TokenInput });
/** POST /invitations. */
export const InvitationBody = z.object({ email: EmailInput, roles: RolesInput });
export type InvitationInput = z.input<typeof InvitationBody>;
/** POST /invitations/accept: `name` is needed when the address has no account yet. */
export const AcceptInvitationBody = z.object({
  token: TokenInput,
  name: PersonName.optional(),
  password: z.string().min(1).max(1000),
});
export type AcceptInvitationInput = z.input<typeof AcceptInvitationBody>;
/** PATCH /members/:userId. */
export const MemberRolesBody = z.object({ roles: RolesInput });
/** GET /audit: a page, filtered by subject or action. */
export const AuditListQuery = PageQuery.extend({
  subjectType: z.string().max(50).optional(),
  subjectId: z.string().max(100).optional(),
  action: z.string().max(100).optional(),
});

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

export const OutboxItem = z.object({
  id: z.string(),
  to: z.string(),
  subject: z.string(),
  receivedAt: z.string(),
});
export type OutboxItem = z.infer<typeof OutboxItem>;
export const OutboxDetail = OutboxItem.extend({
  from: z.string(),
  text: z.string(),
  html: z.string().nullable(),
});
export type OutboxMessage = z.infer<typeof OutboxDetail>;
export const OutboxListResponse = pageSchema(OutboxItem);
