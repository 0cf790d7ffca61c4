import { redirect, useNavigate, useSearchParams } from "react-router";
import { AuthLayout } from "../../../components/layout/auth-layout.tsx";
import { SignInForm } from "../../../features/auth/components/sign-in-form.tsx";
import { safeNext, sessionQueryOptions } from "../../../lib/session.ts";
import { queryClient } from "../../../lib/query-client.ts";

export function Component() {
  const [params] = useSearchParams();
  const navigate = useNavigate();
  const next = safeNext(params.get("next"));
  return (
    <AuthLayout
      title="Sign in to Stackproof"
      intro={
        next !== "/" ? (
          <p>Sign in to continue to the page you asked for.</p>
        ) : (
          <p>Use the account your workspace administrator set up for you.</p>
        )
      }
    >
      <SignInForm onSignedIn={() => navigate(next, { replace: true })} />
    </AuthLayout>
  );
}

/** Someone already signed in goes straight on. */
export async function loader({ request }: { request: Request }) {
  const session = await queryClient.ensureQueryData(sessionQueryOptions());
  if (session) return redirect(safeNext(new URL(request.url).searchParams.get("next")));
  return null;
}
