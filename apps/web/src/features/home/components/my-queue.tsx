import { Link } from "react-router";
import { Card, ErrorState, Spinner, StatusPill } from "../../../components/ui/index.ts";
import { paths } from "../../../config/paths.ts";
import { formatDate } from "../../../lib/format.ts";
import { hasRole, type Role, type Session } from "../../../lib/session.ts";
import type { RevisionSummary } from "@stackproof/contracts";
import { useQueue, type Queue } from "../api/get-queue.ts";

interface Lane {
  key: keyof Queue;
  roles: Role[];
  title: string;
  empty: string;
}

/** Which lists each role works from. */
export const queueLanes: Lane[] = [
  {
    key: "changesRequested",
    roles: ["designer"],
    title: "Sent back for rework",
    empty: "No revision of yours needs rework.",
  },
  {
    key: "reviewRequested",
    roles: ["reviewer"],
    title: "Waiting for your review",
    empty: "Nothing is waiting for review.",
  },
  {
    key: "readyForDecision",
    roles: ["approver"],
    title: "Ready for your decision",
    empty: "No reviewed revision is waiting for sign-off.",
  },
  {
    key: "readyForRelease",
    roles: ["approver"],
    title: "Signed off, ready to release",
    empty: "Nothing is waiting to be released.",
  },
];

function QueueItem({ r }: { r: RevisionSummary }) {
  const to = paths.revision(r.designId, r.id);
  const name = r.designName ?? "Design";
  const label = (
    <span className="font-medium text-ink-900">
      {name} <span className="font-mono text-ink-500">r{r.number}</span>
    </span>
  );
  return (
    <li className="flex flex-wrap items-center gap-x-3 gap-y-1 py-2">
      <Link to={to} className="hover:underline">
        {label}
      </Link>
      <StatusPill status={r.status} />
      <span className="text-xs text-ink-500">
        {r.programName ? `${r.programName} · ` : ""}
        {r.author?.name ?? r.authorName ?? ""}
        {r.createdAt ? ` · ${formatDate(r.createdAt)}` : ""}
      </span>
    </li>
  );
}

/** The signed-in person's work lists, one per role they hold. */
export function MyQueue({ session }: { session: Session }) {
  const queue = useQueue();
  const lanes = queueLanes.filter((l) => hasRole(session, ...l.roles));
  if (lanes.length === 0) return null;
  return (
    <Card title="Your queue" description="Revisions that wait on you, by role." aria-label="Your queue">
      {queue.isPending ? (
        <Spinner label="Loading your queue…" showLabel />
      ) : queue.isError ? (
        <ErrorState error={queue.error} onRetry={() => void queue.refetch()} />
      ) : (
        <div className="grid gap-5 md:grid-cols-2">
          {lanes.map((lane) => {
            const items = queue.data[lane.key] ?? [];
            return (
              <section key={lane.key} aria-labelledby={`lane-${lane.key}`} data-lane={lane.key}>
                <h3
                  id={`lane-${lane.key}`}
                  className="flex items-center gap-2 text-sm font-semibold text-ink-800"
                >
                  {lane.title}
                  <span className="rounded-full bg-ink-100 px-2 font-mono text-xs text-ink-700 tabular">
                    {items.length}
                  </span>
                </h3>
                {items.length === 0 ? (
                  <p className="mt-2 text-sm text-ink-500">{lane.empty}</p>
                ) : (
                  <ul className="mt-1 divide-y divide-ink-100">
                    {items.map((r) => (
                      <QueueItem key={r.id} r={r} />
                    ))}
                  </ul>
                )}
              </section>
            );
          })}
        </div>
      )}
    </Card>
  );
}
