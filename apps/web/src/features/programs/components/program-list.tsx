import { Link } from "react-router";
import { Badge, EmptyState, ErrorState, Spinner } from "../../../components/ui/index.ts";
import { paths } from "../../../config/paths.ts";
import { formatTarget } from "../../../lib/format.ts";
import { usePrograms } from "../api/get-programs.ts";

/** Every program of the workspace with its target yield, as links to the program pages. */
export function ProgramList() {
  const programs = usePrograms();
  if (programs.isPending) return <Spinner label="Loading programs…" showLabel />;
  if (programs.isError) return <ErrorState error={programs.error} onRetry={() => void programs.refetch()} />;
  if (programs.data.items.length === 0)
    return (
      <EmptyState
        title="No programs yet"
        description="A program manager or administrator sets up programs."
      />
    );
  return (
    <ul className="grid gap-3 sm:grid-cols-2 xl:grid-cols-3">
      {programs.data.items.map((p) => (
        <li key={p.id}>
          <Link
            to={paths.program(p.id)}
            className="flex h-full flex-col gap-1 rounded-lg border border-ink-100 px-4 py-3 hover:border-film-teal hover:bg-paper/60"
          >
            <span className="font-medium text-ink-900">{p.name}</span>
            <span className="text-xs text-ink-500">{p.customer || p.application || "—"}</span>
            <span className="mt-auto flex flex-wrap items-center gap-2 pt-1">
              <span className="font-mono text-xs text-ink-700 tabular">
                target {formatTarget(p.targetYield)}
              </span>
              <span className="font-mono text-xs text-ink-500">{p.specMask.bands.length} bands</span>
              {p.protective && <Badge tone="amber">Protective</Badge>}
            </span>
          </Link>
        </li>
      ))}
    </ul>
  );
}
