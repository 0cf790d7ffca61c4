import { useForm } from "react-hook-form";
import { zodResolver } from "@hookform/resolvers/zod";
import { Link, useNavigate, useSearchParams } from "react-router";
import { AuthLayout } from "../../../components/layout/auth-layout.tsx";
import {
  Badge,
  Button,
  ErrorState,
  Notice,
  PageSpinner,
  TextField,
  errorMessage,
} from "../../../components/ui/index.ts";
import { useAcceptInvitation, useInvitationLookup } from "../../../features/auth/api/invitations.ts";
import {
  acceptInvitationSchema,
  MIN_PASSWORD,
  type AcceptInvitationValues,
} from "../../../features/auth/schemas.ts";
import { paths } from "../../../config/paths.ts";
import { roleLabel } from "../../../lib/session.ts";
import { formatDateTime } from "../../../lib/format.ts";
import { ApiError } from "../../../lib/api-client.ts";

export function Component() {
  const [params] = useSearchParams();
  const token = params.get("token") ?? "";
  const navigate = useNavigate();
  const lookup = useInvitationLookup(token);
  const accept = useAcceptInvitation();
  const {
    register,
    handleSubmit,
    formState: { errors },
  } = useForm<AcceptInvitationValues>({ resolver: zodResolver(acceptInvitationSchema) });

  const back = (
    <Link to={paths.signIn} className="text-film-teal hover:underline">
      I already have an account
    </Link>
  );

  if (!token) {
    return (
      <AuthLayout title="Join a workspace" footer={back}>
        <Notice tone="error" title="This link is incomplete">
          The address has no invitation token. Open the link from the invitation e-mail again.
        </Notice>
      </AuthLayout>
    );
  }
  if (lookup.isPending) {
    return (
      <AuthLayout title="Join a workspace">
        <PageSpinner label="Looking up the invitation…" />
      </AuthLayout>
    );
  }
  if (lookup.isError) {
    const gone = lookup.error instanceof ApiError && lookup.error.status === 404;
    return (
      <AuthLayout title="Join a workspace" footer={back}>
        <ErrorState
          error={lookup.error}
          title={gone ? "This invitation cannot be used" : undefined}
          onRetry={gone ? undefined : () => void lookup.refetch()}
        />
        {gone && (
          <p className="mt-3 text-sm text-ink-700">
            It was used already, revoked or it expired. Ask your administrator for a new one.
          </p>
        )}
      </AuthLayout>
    );
  }
  const inv = lookup.data;
  return (
    <AuthLayout
      title={`Join ${inv.workspaceName}`}
      intro={
        <div className="flex flex-col gap-2">
          <p>
            You were invited as <strong className="font-mono text-ink-900">{inv.email}</strong>. Valid until{" "}
            {formatDateTime(inv.expiresAt)}.
          </p>
          <p className="flex flex-wrap gap-1">
            {inv.roles.map((r) => (
              <Badge key={r} tone="teal">
                {roleLabel[r]}
              </Badge>
            ))}
          </p>
        </div>
      }
      footer={back}
    >
      <form
        onSubmit={handleSubmit((v) =>
          accept.mutate(
            { token, name: v.name, password: v.password },
            { onSuccess: () => navigate(paths.home, { replace: true }) },
          ),
        )}
        noValidate
        className="flex flex-col gap-4"
      >
        {accept.isError && (
          <Notice tone="error" title="You could not join">
            {errorMessage(accept.error)}
          </Notice>
        )}
        <TextField
          label="Your name"
          autoComplete="name"
          autoFocus
          error={errors.name?.message}
          {...register("name")}
        />
        <TextField
          label="Password"
          type="password"
          autoComplete="new-password"
          hint={`At least ${MIN_PASSWORD} characters and hard to guess: a few unrelated words work well.`}
          error={errors.password?.message}
          {...register("password")}
        />
        <TextField
          label="Repeat the password"
          type="password"
          autoComplete="new-password"
          error={errors.confirm?.message}
          {...register("confirm")}
        />
        <Button type="submit" size="lg" loading={accept.isPending}>
          Join and sign in
        </Button>
      </form>
    </AuthLayout>
  );
}
