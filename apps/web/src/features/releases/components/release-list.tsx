import { Link } from "react-router";
import {
  ErrorState,
  Spinner,
  StatusPill,
  revisionStatuses,
  type RevisionStatus,
} from "../../../components/ui/index.ts";
import { paths } from "../../../config/paths.ts";
import { formatDate, formatYield } from "../../../lib/format.ts";
import { useReleases } from "../api/get-releases.ts";

export interface ReleaseListProps {
  /** Only the releases of this program. */
  programId?: string;
  /** Only the releases of this design. */
  designId?: string;
}

/** Release records as links, newest first. */
export function ReleaseList({ programId, designId }: ReleaseListProps) {
  const releases = useReleases();
  if (releases.isPending) return <Spinner label="Loading release records…" showLabel />;
  if (releases.isError) return <ErrorState error={releases.error} onRetry={() => void releases.refetch()} />;
  const items = releases.data.items.filter(
    (r) => (!programId || r.program.id === programId) && (!designId || r.design.id === designId),
  );
  if (items.length === 0) return <p className="text-sm text-ink-500">Nothing released yet.</p>;
  return (
    <ul className="-my-2 divide-y divide-ink-100">
      {items.map((r) => (
        <li key={r.id} className="flex flex-wrap items-center gap-x-3 gap-y-1 py-2">
          <Link
            to={paths.release(r.id)}
            className="font-medium text-ink-900 underline decoration-ink-300 underline-offset-3 hover:text-film-teal"
          >
            {r.design.name} r{r.revision.number}
          </Link>
          {(revisionStatuses as readonly string[]).includes(r.status) && (
            <StatusPill status={r.status as RevisionStatus} />
          )}
          <span className="text-xs text-ink-500">
            {formatDate(r.releasedAt)} by {r.releasedBy.name}
            {r.yield ? ` · ${formatYield(r.yield)}` : ""}
          </span>
        </li>
      ))}
    </ul>
  );
}
