import { useForm } from "react-hook-form";
import { zodResolver } from "@hookform/resolvers/zod";
import { Link } from "react-router";
import { Button, Notice, TextField } from "../../../components/ui/index.ts";
import { ApiError } from "../../../lib/api-client.ts";
import { paths } from "../../../config/paths.ts";
import type { Session } from "../../../lib/session.ts";
import { useSignIn } from "../api/sign-in.ts";
import { signInSchema, type SignInValues } from "../schemas.ts";

/** The words for a refused sign-in: the server's own, with a plain wait time when it is rate-limiting. */
export function signInErrorText(error: unknown): string {
  if (error instanceof ApiError) {
    if (error.status === 429) {
      const own = error.code !== "http_error" ? error.message : "Too many sign-in attempts for now.";
      // The server usually says how long to wait; add it from Retry-After when it does not.
      if (/\d/.test(own)) return own;
      const wait = error.retryAfter
        ? ` Try again in ${formatWait(error.retryAfter)}.`
        : " Wait a while before trying again.";
      return `${own}${wait}`;
    }
    return error.message;
  }
  return "Signing in failed. Try again.";
}

function formatWait(seconds: number): string {
  if (seconds < 90) return `${Math.ceil(seconds)} seconds`;
  return `${Math.ceil(seconds / 60)} minutes`;
}

export interface SignInFormProps {
  onSignedIn: (session: Session) => void;
  defaultEmail?: string;
}

export function SignInForm({ onSignedIn, defaultEmail = "" }: SignInFormProps) {
  const signIn = useSignIn();
  const {
    register,
    handleSubmit,
    formState: { errors },
  } = useForm<SignInValues>({
    resolver: zodResolver(signInSchema),
    defaultValues: { email: defaultEmail, password: "" },
  });

  const onSubmit = handleSubmit((values) => signIn.mutate(values, { onSuccess: onSignedIn }));

  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4" aria-label="Sign in">
      {signIn.isError && (
        <Notice
          tone="error"
          title={
            signIn.error instanceof ApiError && signIn.error.status === 429 ? "Slow down" : "Not signed in"
          }
        >
          {signInErrorText(signIn.error)}
        </Notice>
      )}
      <TextField
        label="E-mail"
        type="email"
        autoComplete="username"
        autoFocus
        error={errors.email?.message}
        {...register("email")}
      />
      <TextField
        label="Password"
        type="password"
        autoComplete="current-password"
        error={errors.password?.message}
        {...register("password")}
      />
      <Button type="submit" size="lg" loading={signIn.isPending} loadingLabel="Signing in…">
        Sign in
      </Button>
      <Link to={paths.forgotPassword} className="text-sm text-film-teal underline-offset-2 hover:underline">
        Forgot your password?
      </Link>
    </form>
  );
}
