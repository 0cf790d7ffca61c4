import { useState, memo } from "react";
import { Link, useNavigate } from "react-router";
import { paths } from "../../../config/paths.ts";
import { StatusPill } from "../../../components/ui/index.ts";
import type { RevisionStatus } from "../../../components/ui/index.ts";

export interface HistoryEntry {
  id: string;
  number: number;
  status: RevisionStatus;
  note?: string;
  authorName?: string;
  author?: { name: string };
  createdAt: string;
}

/** Revisions of a design, newest first, with a picker to compare any two. */
export const RevisionHistory = memo(function RevisionHistory({ designId, revisions, currentId }: { designId: string; revisions: readonly HistoryEntry[]; currentId: string }) {
  const sorted = [...revisions].sort((a, b) => b.number - a.number);
  const navigate = useNavigate();
  const [against, setAgainst] = useState(sorted.find((r) => r.id !== currentId)?.id ?? "");
  return (
    <section aria-labelledby="history-h" className="space-y-2">
      <h2 id="history-h" className="text-base font-semibold">
        Revisions
      </h2>
      <ol className="divide-y divide-ink-100 rounded-md border border-ink-100 bg-white text-sm">
        {sorted.map((r) => (
          <li key={r.id} className={`flex flex-wrap items-center gap-2 px-3 py-1.5 ${r.id === currentId ? "bg-film-teal/5" : ""}`}>
            <Link to={paths.revision(designId, r.id)} className="font-mono font-semibold text-ink-900 underline-offset-2 hover:underline" aria-current={r.id === currentId ? "page" : undefined}>
              r{r.number}
            </Link>
            <StatusPill status={r.status} />
            <span className="min-w-0 flex-1 truncate text-ink-700">{r.note}</span>
            <span className="text-xs text-ink-500">
              {r.author?.name ?? r.authorName ?? ""} · {new Date(r.createdAt).toLocaleDateString()}
            </span>
          </li>
        ))}
      </ol>
      {sorted.length > 1 ? (
        <form
          className="flex items-end gap-2 text-xs"
          onSubmit={(e) => {
            e.preventDefault();
            if (against) navigate(paths.compare(designId, against, currentId));
          }}
        >
          <label className="flex flex-col text-ink-700">
            Compare this revision with
            <select className="mt-0.5 rounded border border-ink-300 bg-white px-2 py-1 text-sm" value={against} onChange={(e) => setAgainst(e.target.value)}>
              {sorted
                .filter((r) => r.id !== currentId)
                .map((r) => (
                  <option key={r.id} value={r.id}>
                    r{r.number}
                  </option>
                ))}
            </select>
          </label>
          <button type="submit" className="rounded border border-ink-300 bg-white px-2 py-1 text-sm">
            Compare
          </button>
        </form>
      ) : null}
    </section>
  );
});
