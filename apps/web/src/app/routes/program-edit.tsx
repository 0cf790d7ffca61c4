import { Link, useNavigate, useParams, type LoaderFunctionArgs } from "react-router";
import { ErrorState, Notice, PageSpinner } from "../../components/ui/index.ts";
import { programQueryOptions, useProgram } from "../../features/programs/api/get-program.ts";
import { ProgramForm } from "../../features/programs/components/program-form.tsx";
import { paths } from "../../config/paths.ts";
import { queryClient } from "../../lib/query-client.ts";
import { hasRole, useSession } from "../../lib/session.ts";

export function loader({ params }: LoaderFunctionArgs) {
  if (params.programId) void queryClient.prefetchQuery(programQueryOptions(params.programId));
  return null;
}

/** Said up front to people whose roles cannot save; the server refuses them with a 403 too. */
function RoleNotice({ editing }: { editing: boolean }) {
  return (
    <Notice tone="warning" title="You cannot save this form">
      Only program managers and administrators can {editing ? "edit" : "create"} programs. The server will
      refuse the request for your roles.
    </Notice>
  );
}

function NewProgram() {
  const navigate = useNavigate();
  const session = useSession();
  return (
    <div className="flex flex-col gap-6">
      <title>New program · Stackproof</title>
      <nav aria-label="Breadcrumb" className="text-sm text-ink-500">
        <Link to={paths.home} className="hover:underline">
          Overview
        </Link>{" "}
        / <span aria-current="page">New program</span>
      </nav>
      <header>
        <h1 className="text-2xl font-semibold tracking-tight">New program</h1>
        <p className="mt-1 text-sm text-ink-700">
          The spec mask, error model and target yield every design of the program is held to.
        </p>
      </header>
      {session && !hasRole(session, "admin", "approver") && <RoleNotice editing={false} />}
      <ProgramForm
        onSaved={(p) => void navigate(paths.program(p.id))}
        onCancel={() => void navigate(paths.home)}
      />
    </div>
  );
}

function EditProgram({ programId }: { programId: string }) {
  const navigate = useNavigate();
  const session = useSession();
  const program = useProgram(programId);
  if (program.isPending) return <PageSpinner label="Loading the program…" />;
  if (program.isError) return <ErrorState error={program.error} onRetry={() => void program.refetch()} />;
  const p = program.data;
  const back = () => void navigate(paths.program(p.id));
  return (
    <div className="flex flex-col gap-6">
      <title>{`Edit ${p.name} · Stackproof`}</title>
      <nav aria-label="Breadcrumb" className="text-sm text-ink-500">
        <Link to={paths.home} className="hover:underline">
          Overview
        </Link>{" "}
        /{" "}
        <Link to={paths.program(p.id)} className="hover:underline">
          {p.name}
        </Link>{" "}
        / <span aria-current="page">Edit</span>
      </nav>
      <header>
        <h1 className="text-2xl font-semibold tracking-tight">Edit {p.name}</h1>
      </header>
      {session && !hasRole(session, "admin", "approver") && <RoleNotice editing />}
      <ProgramForm key={p.id} program={p} onSaved={back} onCancel={back} />
    </div>
  );
}

export function Component() {
  const { programId } = useParams();
  return programId ? <EditProgram programId={programId} /> : <NewProgram />;
}
