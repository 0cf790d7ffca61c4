import { useForm } from "react-hook-form";
import { zodResolver } from "@hookform/resolvers/zod";
import { Link } from "react-router";
import { AuthLayout } from "../../../components/layout/auth-layout.tsx";
import { Button, Notice, TextField, errorMessage } from "../../../components/ui/index.ts";
import { useRequestPasswordReset } from "../../../features/auth/api/password-reset.ts";
import { forgotPasswordSchema, type ForgotPasswordValues } from "../../../features/auth/schemas.ts";
import { paths } from "../../../config/paths.ts";

export function Component() {
  const reset = useRequestPasswordReset();
  const {
    register,
    handleSubmit,
    getValues,
    formState: { errors },
  } = useForm<ForgotPasswordValues>({ resolver: zodResolver(forgotPasswordSchema) });

  return (
    <AuthLayout
      title="Reset your password"
      intro={<p>Give the e-mail address of your account. We send a link that works once, for one hour.</p>}
      footer={
        <Link to={paths.signIn} className="text-film-teal hover:underline">
          Back to sign-in
        </Link>
      }
    >
      {reset.isSuccess ? (
        <Notice tone="success" title="Check your inbox">
          If an account exists for <strong>{getValues("email")}</strong>, a reset link is on its way.
        </Notice>
      ) : (
        <form
          onSubmit={handleSubmit((v) => reset.mutate(v.email))}
          noValidate
          className="flex flex-col gap-4"
        >
          {reset.isError && <Notice tone="error">{errorMessage(reset.error)}</Notice>}
          <TextField
            label="E-mail"
            type="email"
            autoComplete="email"
            autoFocus
            error={errors.email?.message}
            {...register("email")}
          />
          <Button type="submit" size="lg" loading={reset.isPending}>
            Send reset link
          </Button>
        </form>
      )}
    </AuthLayout>
  );
}
