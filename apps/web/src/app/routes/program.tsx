import { Link, useParams, type LoaderFunctionArgs } from "react-router";
import {
  Badge,
  ButtonLink,
  Card,
  EmptyState,
  ErrorState,
  PageSpinner,
  StatusPill,
} from "../../components/ui/index.ts";
import { ProtectiveCaution } from "../../components/protective-caution.tsx";
import { SpecMaskTable } from "../../components/spec-mask-table.tsx";
import { ErrorModelSummary } from "../../components/error-model-summary.tsx";
import {
  programQueryOptions,
  useProgram,
  type ProgramDesignRow,
} from "../../features/programs/api/get-program.ts";
import { paths } from "../../config/paths.ts";
import { queryClient } from "../../lib/query-client.ts";
import { hasRole, useSession } from "../../lib/session.ts";
import { formatDate, formatTarget, formatYield } from "../../lib/format.ts";
import { cx } from "../../components/ui/cx.ts";
import { ReleaseList } from "../../features/releases/components/release-list.tsx";
import { YieldHistory } from "../../features/as-built/components/yield-history.tsx";

export function loader({ params }: LoaderFunctionArgs) {
  if (params.programId) void queryClient.prefetchQuery(programQueryOptions(params.programId));
  return null;
}

function DesignRow({ row, target }: { row: ProgramDesignRow; target: number }) {
  const y = row.latestVerifiedYield;
  const pass = y ? y.yield >= target : null;
  return (
    <li className="flex flex-wrap items-center gap-x-4 gap-y-1 py-3">
      <Link
        to={paths.design(row.design.id)}
        className="min-w-40 font-medium text-ink-900 hover:text-film-teal hover:underline"
      >
        {row.design.name}
      </Link>
      {row.latestRevision ? (
        <>
          <span className="font-mono text-sm text-ink-500">r{row.latestRevision.number}</span>
          <StatusPill status={row.latestRevision.status} />
          <span className="text-xs text-ink-500">
            {row.latestRevision.authorName} · {formatDate(row.latestRevision.createdAt)}
          </span>
        </>
      ) : (
        <span className="text-sm text-ink-500">no revision</span>
      )}
      <span
        className={cx(
          "ml-auto font-mono text-sm tabular",
          pass === null ? "text-ink-500" : pass ? "text-verdict-pass" : "text-verdict-fail",
        )}
      >
        {y ? formatYield(y) : "no verified run"}
      </span>
      {row.openBlockingThreads > 0 && <Badge tone="fail">{row.openBlockingThreads} blocking</Badge>}
    </li>
  );
}

export function Component() {
  const { programId = "" } = useParams();
  const session = useSession();
  const program = useProgram(programId);

  if (program.isPending) return <PageSpinner label="Loading the program…" />;
  if (program.isError) return <ErrorState error={program.error} onRetry={() => void program.refetch()} />;
  const p = program.data;
  const isDesigner = hasRole(session, "designer");
  const canEdit = hasRole(session, "admin", "approver");

  return (
    <div className="flex flex-col gap-6">
      <title>{`${p.name} · Stackproof`}</title>
      <nav aria-label="Breadcrumb" className="text-sm text-ink-500">
        <Link to={paths.home} className="hover:underline">
          Overview
        </Link>{" "}
        / <span aria-current="page">{p.name}</span>
      </nav>
      <header className="flex flex-wrap items-start gap-4">
        <div className="min-w-0 flex-1">
          <p className="text-xs font-semibold tracking-wider text-film-teal uppercase">Program</p>
          <h1 className="text-2xl font-semibold tracking-tight">{p.name}</h1>
          <p className="mt-1 text-sm text-ink-700">
            {[p.customer && `For ${p.customer}`, p.application].filter(Boolean).join(" · ") ||
              "No customer or application given."}
          </p>
        </div>
        {canEdit && (
          <ButtonLink to={paths.editProgram(p.id)} variant="secondary" size="sm" className="self-center">
            Edit program
          </ButtonLink>
        )}
        <div className="flex flex-col items-end gap-1 rounded-lg border border-ink-100 bg-white px-4 py-2 text-right shadow-sm">
          <span className="text-xs text-ink-500">Target yield</span>
          <span className="font-mono text-2xl font-semibold tabular">{formatTarget(p.targetYield)}</span>
          <span className="text-xs text-ink-500">
            default study: {p.studyDefaults.trials.toLocaleString("en-GB")} trials, seed{" "}
            <span className="font-mono">{p.studyDefaults.seed}</span>
          </span>
        </div>
      </header>

      {p.protective && <ProtectiveCaution application={p.application || null} />}
      {p.description && <p className="max-w-3xl text-ink-800">{p.description}</p>}

      <div className="grid items-start gap-6 xl:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
        <Card
          title="Designs"
          description={`${p.designs.length} in this program`}
          actions={
            isDesigner ? (
              <ButtonLink to={paths.newDesign(p.id)} variant="primary" size="sm">
                New design
              </ButtonLink>
            ) : undefined
          }
        >
          {p.designs.length === 0 ? (
            <EmptyState
              title="No designs yet"
              description={
                isDesigner
                  ? "Start the first design for this program."
                  : "A designer starts the first design for this program."
              }
            />
          ) : (
            <ul className="-my-3 divide-y divide-ink-100">
              {p.designs.map((d) => (
                <DesignRow key={d.design.id} row={d} target={p.targetYield} />
              ))}
            </ul>
          )}
        </Card>
        <div className="flex flex-col gap-6">
          <Card title="Release records" description="Filed when a signed-off revision is released.">
            <ReleaseList programId={p.id} />
          </Card>
          <Card title="Process error model" description="What the yield studies simulate for this program.">
            <ErrorModelSummary model={p.errorModel} />
          </Card>
        </div>
      </div>

      <Card
        title="Measured lots"
        description="Actual yield of built parts against the predicted yield, and the error model they imply."
      >
        <YieldHistory programId={p.id} canAdopt={canEdit} />
      </Card>

      <Card
        title="Spec mask"
        description="A design passes when every band and every colour requirement passes."
      >
        <SpecMaskTable mask={p.specMask} caption={`Spec mask of ${p.name}`} />
      </Card>
    </div>
  );
}
