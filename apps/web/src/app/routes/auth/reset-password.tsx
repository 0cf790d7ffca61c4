import { useForm } from "react-hook-form";
import { zodResolver } from "@hookform/resolvers/zod";
import { Link, useSearchParams } from "react-router";
import { AuthLayout } from "../../../components/layout/auth-layout.tsx";
import { Button, ButtonLink, Notice, TextField, errorMessage } from "../../../components/ui/index.ts";
import { useConfirmPasswordReset } from "../../../features/auth/api/password-reset.ts";
import { MIN_PASSWORD, newPasswordSchema, type NewPasswordValues } from "../../../features/auth/schemas.ts";
import { paths } from "../../../config/paths.ts";

export function Component() {
  const [params] = useSearchParams();
  const token = params.get("token") ?? "";
  const confirm = useConfirmPasswordReset();
  const {
    register,
    handleSubmit,
    formState: { errors },
  } = useForm<NewPasswordValues>({ resolver: zodResolver(newPasswordSchema) });

  const back = (
    <Link to={paths.signIn} className="text-film-teal hover:underline">
      Back to sign-in
    </Link>
  );

  if (!token) {
    return (
      <AuthLayout title="Choose a new password" footer={back}>
        <Notice tone="error" title="This link is incomplete">
          The address has no reset token. Open the link from the e-mail again, or{" "}
          <Link to={paths.forgotPassword} className="underline">
            ask for a new one
          </Link>
          .
        </Notice>
      </AuthLayout>
    );
  }

  return (
    <AuthLayout
      title="Choose a new password"
      intro={<p>The link works once. Setting a new password signs your account out everywhere.</p>}
      footer={back}
    >
      {confirm.isSuccess ? (
        <div className="flex flex-col gap-4">
          <Notice tone="success" title="Password changed">
            You were signed out on every device. Sign in with your new password.
          </Notice>
          <ButtonLink to={paths.signIn} variant="primary">
            Sign in
          </ButtonLink>
        </div>
      ) : (
        <form
          onSubmit={handleSubmit((v) => confirm.mutate({ token, password: v.password }))}
          noValidate
          className="flex flex-col gap-4"
        >
          {confirm.isError && (
            <Notice tone="error" title="The password was not changed">
              {errorMessage(confirm.error)}{" "}
              <Link to={paths.forgotPassword} className="underline">
                Ask for a new link
              </Link>
            </Notice>
          )}
          <TextField
            label="New password"
            type="password"
            autoComplete="new-password"
            autoFocus
            hint={`At least ${MIN_PASSWORD} characters and hard to guess: a few unrelated words work well.`}
            error={errors.password?.message}
            {...register("password")}
          />
          <TextField
            label="Repeat the new password"
            type="password"
            autoComplete="new-password"
            error={errors.confirm?.message}
            {...register("confirm")}
          />
          <Button type="submit" size="lg" loading={confirm.isPending}>
            Set password
          </Button>
        </form>
      )}
    </AuthLayout>
  );
}
