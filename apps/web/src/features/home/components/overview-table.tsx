import { useMemo, useState } from "react";
import { Link } from "react-router";
import {
  createColumnHelper,
  flexRender,
  getCoreRowModel,
  getFilteredRowModel,
  getSortedRowModel,
  useReactTable,
  type ColumnFiltersState,
  type FilterFn,
  type SortingState,
} from "@tanstack/react-table";
import {
  Badge,
  EmptyState,
  SelectField,
  StatusPill,
  TextField,
  revisionStatusLabel,
  revisionStatuses,
  cx,
} from "../../../components/ui/index.ts";
import { paths } from "../../../config/paths.ts";
import { formatDate } from "../../../lib/format.ts";
import type { OverviewRow } from "../api/get-overview.ts";
import { YieldVersusTarget } from "./yield-versus-target.tsx";

const col = createColumnHelper<OverviewRow>();

// Columns that give way on a tablet (under 1024 px) so the table fits without sideways scrolling.
const wide = "hidden lg:table-cell";

function metaClass(meta: unknown): string | undefined {
  return (meta as { className?: string } | undefined)?.className;
}

/** Free text matches design, program and author names. */
const textFilter: FilterFn<OverviewRow> = (row, _columnId, value: string) => {
  const q = value.trim().toLowerCase();
  if (!q) return true;
  const r = row.original;
  return [r.design.name, r.program.name, r.latestRevision.authorName].some((s) =>
    s.toLowerCase().includes(q),
  );
};

const columns = [
  col.accessor((r) => r.design.name, {
    id: "design",
    header: "Design",
    cell: (c) => (
      <Link
        to={paths.design(c.row.original.design.id)}
        className="inline-block min-w-28 font-medium text-ink-900 underline decoration-ink-300 underline-offset-3 hover:text-film-teal hover:decoration-film-teal"
      >
        {c.getValue()}
      </Link>
    ),
  }),
  col.accessor((r) => r.program.name, {
    id: "program",
    header: "Program",
    cell: (c) => (
      <span className="inline-flex min-w-32 flex-wrap items-center gap-1.5">
        <Link
          to={paths.program(c.row.original.program.id)}
          className="text-ink-700 hover:text-film-teal hover:underline"
        >
          {c.getValue()}
        </Link>
        {c.row.original.program.protective && (
          <Badge tone="amber" title="Protective filter: computed results are not a certification">
            Protective
          </Badge>
        )}
      </span>
    ),
  }),
  col.accessor((r) => r.latestRevision.number, {
    id: "revision",
    header: "Rev.",
    meta: { className: wide },
    cell: (c) => <span className="font-mono tabular">r{c.getValue()}</span>,
  }),
  col.accessor((r) => r.latestRevision.status, {
    id: "status",
    header: "State",
    sortingFn: (a, b) =>
      revisionStatuses.indexOf(a.original.latestRevision.status) -
      revisionStatuses.indexOf(b.original.latestRevision.status),
    filterFn: (row, _id, value: string) => !value || row.original.latestRevision.status === value,
    cell: (c) => (
      <span className="inline-flex flex-wrap items-center gap-1.5">
        <span className="font-mono text-sm tabular lg:hidden">r{c.row.original.latestRevision.number}</span>
        <StatusPill status={c.getValue()} />
      </span>
    ),
  }),
  col.accessor((r) => r.latestRevision.authorName, {
    id: "author",
    header: "Author",
    meta: { className: wide },
  }),
  col.accessor((r) => r.latestVerifiedYield?.yield ?? -1, {
    id: "yield",
    header: "Verified yield",
    cell: (c) => (
      <YieldVersusTarget
        estimate={c.row.original.latestVerifiedYield}
        target={c.row.original.program.targetYield}
      />
    ),
  }),
  col.accessor((r) => r.openBlockingThreads * 1000 + r.openThreads, {
    id: "threads",
    header: "Open threads",
    cell: (c) => {
      const r = c.row.original;
      if (r.openThreads === 0) return <span className="text-sm text-ink-500">none</span>;
      return (
        <span className="inline-flex flex-wrap items-center gap-1.5 text-sm">
          {r.openBlockingThreads > 0 && <Badge tone="fail">{r.openBlockingThreads} blocking</Badge>}
          <span className="font-mono text-xs whitespace-nowrap text-ink-500 tabular">
            {r.openThreads} open
          </span>
        </span>
      );
    },
  }),
  col.accessor((r) => r.latestRevision.createdAt, {
    id: "updated",
    header: "Last revision",
    meta: { className: wide },
    cell: (c) => <span className="text-sm whitespace-nowrap text-ink-500">{formatDate(c.getValue())}</span>,
  }),
];

export interface OverviewTableProps {
  rows: OverviewRow[];
}

/** Every design of the workspace with its latest revision: sortable, filtered by text and state. */
export function OverviewTable({ rows }: OverviewTableProps) {
  const [sorting, setSorting] = useState<SortingState>([{ id: "updated", desc: true }]);
  const [text, setText] = useState("");
  const [status, setStatus] = useState("");
  const columnFilters = useMemo<ColumnFiltersState>(
    () => (status ? [{ id: "status", value: status }] : []),
    [status],
  );

  const table = useReactTable({
    data: rows,
    columns,
    state: { sorting, globalFilter: text, columnFilters },
    onSortingChange: setSorting,
    globalFilterFn: textFilter,
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getFilteredRowModel: getFilteredRowModel(),
  });
  const visible = table.getRowModel().rows;

  return (
    <div>
      <div className="flex flex-wrap items-end gap-3 border-b border-ink-100 px-5 py-3">
        <TextField
          label="Filter designs"
          type="search"
          placeholder="Design, program or author"
          value={text}
          onChange={(e) => setText(e.target.value)}
          wrapperClassName="w-72 max-w-full"
        />
        <SelectField
          label="State"
          value={status}
          onChange={(e) => setStatus(e.target.value)}
          placeholder="All states"
          options={revisionStatuses.map((s) => ({ value: s, label: revisionStatusLabel[s] }))}
          wrapperClassName="w-48"
        />
        <p className="ml-auto pb-2 text-sm text-ink-500" aria-live="polite">
          {visible.length === rows.length
            ? `${rows.length} designs`
            : `${visible.length} of ${rows.length} designs`}
        </p>
      </div>
      {visible.length === 0 ? (
        <div className="p-5">
          <EmptyState
            title="No design matches"
            description="Clear the filter text or choose another state."
          />
        </div>
      ) : (
        <div className="overflow-x-auto">
          <table className="w-full min-w-[44rem] border-collapse text-left">
            <caption className="sr-only">
              Designs and their latest revisions. Column headers sort the table.
            </caption>
            <thead>
              {table.getHeaderGroups().map((hg) => (
                <tr key={hg.id} className="border-b border-ink-100 bg-paper/70">
                  {hg.headers.map((h) => {
                    const dir = h.column.getIsSorted();
                    return (
                      <th
                        key={h.id}
                        scope="col"
                        aria-sort={dir === "asc" ? "ascending" : dir === "desc" ? "descending" : "none"}
                        className={cx(
                          "px-3 py-2 text-xs font-semibold tracking-wide text-ink-500 uppercase",
                          metaClass(h.column.columnDef.meta),
                        )}
                      >
                        <button
                          type="button"
                          onClick={h.column.getToggleSortingHandler()}
                          className="inline-flex items-center gap-1 whitespace-nowrap uppercase hover:text-ink-900"
                        >
                          {flexRender(h.column.columnDef.header, h.getContext())}
                          <span
                            aria-hidden
                            className={cx("font-mono", dir ? "text-film-amber" : "text-ink-300")}
                          >
                            {dir === "asc" ? "▲" : dir === "desc" ? "▼" : "↕"}
                          </span>
                        </button>
                      </th>
                    );
                  })}
                </tr>
              ))}
            </thead>
            <tbody>
              {visible.map((row) => (
                <tr key={row.id} className="border-b border-ink-100 last:border-0 hover:bg-paper/60">
                  {row.getVisibleCells().map((cell) => (
                    <td
                      key={cell.id}
                      className={cx(
                        "px-3 py-2.5 align-middle text-sm",
                        metaClass(cell.column.columnDef.meta),
                      )}
                    >
                      {flexRender(cell.column.columnDef.cell, cell.getContext())}
                    </td>
                  ))}
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
    </div>
  );
}
