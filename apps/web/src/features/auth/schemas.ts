import { z } from "zod";

/** Same floor as the server (apps/api/src/auth/password.ts); the server also refuses easily guessed ones. */
export const MIN_PASSWORD = 12;

export const signInSchema = z.object({
  email: z
    .string()
    .trim()
    .min(1, "Enter your e-mail address.")
    .email("That does not look like an e-mail address."),
  password: z.string().min(1, "Enter your password."),
});
export type SignInValues = z.infer<typeof signInSchema>;

export const forgotPasswordSchema = z.object({
  email: z
    .string()
    .trim()
    .min(1, "Enter your e-mail address.")
    .email("That does not look like an e-mail address."),
});
export type ForgotPasswordValues = z.infer<typeof forgotPasswordSchema>;

const newPassword = z
  .string()
  .min(MIN_PASSWORD, `Use at least ${MIN_PASSWORD} characters.`)
  .max(200, "Use at most 200 characters.");

export const newPasswordSchema = z
  .object({ password: newPassword, confirm: z.string() })
  .refine((v) => v.password === v.confirm, { path: ["confirm"], message: "The two passwords differ." });
export type NewPasswordValues = z.infer<typeof newPasswordSchema>;

export const acceptInvitationSchema = z
  .object({
    name: z
      .string()
      .trim()
      .min(1, "Enter your name as colleagues will see it.")
      .max(120, "Use at most 120 characters."),
    password: newPassword,
    confirm: z.string(),
  })
  .refine((v) => v.password === v.confirm, { path: ["confirm"], message: "The two passwords differ." });
export type AcceptInvitationValues = z.infer<typeof acceptInvitationSchema>;
