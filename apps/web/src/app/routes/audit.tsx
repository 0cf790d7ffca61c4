import { useState } from "react";
import type { LoaderFunctionArgs } from "react-router";
import { Button, Card, EmptyState, ErrorState, PageSpinner, SelectField } from "../../components/ui/index.ts";
import { useAudit } from "../../features/admin/api/get-audit.ts";
import { requireRole } from "../../lib/session.ts";
import { formatDateTime } from "../../lib/format.ts";

export async function loader({ request }: LoaderFunctionArgs) {
  await requireRole(request, ["admin", "approver"]);
  return null;
}

// Exact action names the server records (the filter is an exact match).
const actionFilters = [
  { value: "", label: "Everything" },
  { value: "revision.submitted", label: "Submitted for review" },
  { value: "revision.changes_requested", label: "Sent back for rework" },
  { value: "revision.approved", label: "Signed off" },
  { value: "revision.released", label: "Released" },
  { value: "revision.withdrawn", label: "Withdrawn" },
  { value: "revision.created", label: "New revisions" },
  { value: "yield_run.started", label: "Yield runs started" },
  { value: "thread.opened", label: "Threads opened" },
  { value: "member.roles_changed", label: "Role changes" },
  { value: "member.removed", label: "People removed" },
  { value: "invitation.created", label: "Invitations sent" },
  { value: "material.created", label: "Materials added" },
  { value: "program.updated", label: "Program changes" },
];

export function Component() {
  const [action, setAction] = useState("");
  const audit = useAudit(action);
  const entries = audit.data?.pages.flatMap((p) => p.items) ?? [];

  return (
    <div className="flex flex-col gap-6">
      <title>Audit log · Stackproof</title>
      <header>
        <h1 className="text-2xl font-semibold tracking-tight">Audit log</h1>
        <p className="mt-1 text-sm text-ink-700">
          Everything that changed in the workspace, newest first. Entries cannot be edited or removed.
        </p>
      </header>
      <Card
        flush
        title="Entries"
        actions={
          <SelectField
            label="Show"
            hideLabel
            value={action}
            onChange={(e) => setAction(e.target.value)}
            options={actionFilters}
            wrapperClassName="w-56"
          />
        }
      >
        {audit.isPending ? (
          <PageSpinner label="Loading the audit log…" />
        ) : audit.isError ? (
          <div className="p-5">
            <ErrorState error={audit.error} onRetry={() => void audit.refetch()} />
          </div>
        ) : entries.length === 0 ? (
          <div className="p-5">
            <EmptyState
              title="Nothing recorded"
              description={
                action ? "No entry of this kind yet." : "Nothing has happened in this workspace yet."
              }
            />
          </div>
        ) : (
          <>
            <div className="overflow-x-auto">
              <table className="w-full border-collapse text-left text-sm">
                <caption className="sr-only">Audit log entries, newest first</caption>
                <thead>
                  <tr className="border-b border-ink-100 bg-paper/70 text-xs tracking-wide text-ink-500 uppercase">
                    <th scope="col" className="px-4 py-2 font-semibold">
                      When
                    </th>
                    <th scope="col" className="px-2 py-2 font-semibold">
                      Who
                    </th>
                    <th scope="col" className="px-2 py-2 font-semibold">
                      What
                    </th>
                    <th scope="col" className="px-4 py-2 font-semibold">
                      Action
                    </th>
                  </tr>
                </thead>
                <tbody>
                  {entries.map((e) => (
                    <tr key={e.id} className="border-b border-ink-100 last:border-0">
                      <td className="px-4 py-2 font-mono text-xs whitespace-nowrap text-ink-700 tabular">
                        {formatDateTime(e.at)}
                      </td>
                      <td className="px-2 py-2 whitespace-nowrap">
                        {e.actor?.name ?? <span className="text-ink-500">system</span>}
                      </td>
                      <td className="px-2 py-2">{e.summary}</td>
                      <td className="px-4 py-2 font-mono text-xs text-ink-500">
                        {e.action}
                        <span className="block text-[11px] text-ink-500">
                          {e.subjectType} {e.subjectId.slice(0, 10)}
                        </span>
                      </td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
            <div className="flex items-center gap-3 border-t border-ink-100 px-4 py-3">
              <span className="text-sm text-ink-500">{entries.length} entries shown</span>
              {audit.hasNextPage ? (
                <Button
                  variant="secondary"
                  size="sm"
                  className="ml-auto"
                  loading={audit.isFetchingNextPage}
                  onClick={() => void audit.fetchNextPage()}
                >
                  Load older entries
                </Button>
              ) : (
                <span className="ml-auto text-sm text-ink-500">This is the start of the log.</span>
              )}
            </div>
          </>
        )}
      </Card>
    </div>
  );
}
