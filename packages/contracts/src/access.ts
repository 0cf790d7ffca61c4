// Request and response shapes of the access routes (also the OpenAPI components of these routes).
import { z } from "zod";

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
