import { ButtonLink, Card, EmptyState, ErrorState, PageSpinner } from "../../components/ui/index.ts";
import { overviewQueryOptions, useOverview } from "../../features/home/api/get-overview.ts";
import { queueQueryOptions } from "../../features/home/api/get-queue.ts";
import { MyQueue } from "../../features/home/components/my-queue.tsx";
import { OverviewTable } from "../../features/home/components/overview-table.tsx";
import { queryClient } from "../../lib/query-client.ts";
import { hasRole, useSession } from "../../lib/session.ts";
import { paths } from "../../config/paths.ts";
import { programsQueryOptions } from "../../features/programs/api/get-programs.ts";
import { ProgramList } from "../../features/programs/components/program-list.tsx";

/** Start both requests at once; the page renders its own loading and error states. */
export function loader() {
  void queryClient.prefetchQuery(overviewQueryOptions());
  void queryClient.prefetchQuery(queueQueryOptions());
  void queryClient.prefetchQuery(programsQueryOptions());
  return null;
}

export function Component() {
  const session = useSession();
  const overview = useOverview();
  return (
    <div className="flex flex-col gap-6">
      <title>Overview · Stackproof</title>
      <header>
        <h1 className="text-2xl font-semibold tracking-tight">Overview</h1>
        <p className="mt-1 text-sm text-ink-700">
          {session ? `${session.workspace.name} — ` : ""}every design, its latest revision and whether its
          verified yield meets the program's target.
        </p>
      </header>
      {session && <MyQueue session={session} />}
      <Card title="Designs" flush>
        {overview.isPending ? (
          <PageSpinner label="Loading designs…" />
        ) : overview.isError ? (
          <div className="p-5">
            <ErrorState error={overview.error} onRetry={() => void overview.refetch()} />
          </div>
        ) : overview.data.items.length === 0 ? (
          <div className="p-5">
            <EmptyState
              title="No designs yet"
              description="Designs appear here once a designer starts one in a program."
            />
          </div>
        ) : (
          <OverviewTable rows={overview.data.items} />
        )}
      </Card>
      <Card
        title="Programs"
        description="Each program sets the spec mask, the error model and the target yield its designs are held to."
        actions={
          hasRole(session, "admin", "approver") ? (
            <ButtonLink to={paths.newProgram} variant="primary" size="sm">
              New program
            </ButtonLink>
          ) : undefined
        }
      >
        <ProgramList />
      </Card>
    </div>
  );
}
