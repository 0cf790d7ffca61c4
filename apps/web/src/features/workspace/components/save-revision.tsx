import { useId, useState } from "react";
import type { FormEvent } from "react";
import { Link } from "react-router";

/** "Save as new revision": a note and a button. A saved revision is immutable. */
export function SaveRevisionForm({
  dirty,
  pending,
  error,
  onSave,
  canSave,
  stale,
}: {
  dirty: boolean;
  pending: boolean;
  error: string | null;
  onSave: (note: string) => void;
  canSave: boolean;
  /** Set when the save was refused because someone saved a newer revision from the same base (409 stale_base). */
  stale?: { baseNumber: number | null; latestNumber: number; latestHref: string } | null;
}) {
  const [note, setNote] = useState("");
  const id = useId();
  const submit = (e: FormEvent) => {
    e.preventDefault();
    if (note.trim() && dirty) onSave(note.trim());
  };
  if (!canSave) return null;
  return (
    <form onSubmit={submit} className="flex flex-wrap items-end gap-2" aria-label="Save as new revision">
      <label htmlFor={id} className="flex min-w-56 flex-1 flex-col text-xs text-ink-700">
        Note for the new revision
        <input
          id={id}
          value={note}
          onChange={(e) => setNote(e.target.value)}
          placeholder={dirty ? "What changed and why" : "Edit the stack first"}
          disabled={!dirty || pending}
          className="mt-0.5 rounded border border-ink-300 bg-white px-2 py-1 text-sm disabled:bg-ink-100/50"
          maxLength={500}
        />
      </label>
      <button
        type="submit"
        disabled={!dirty || pending || note.trim() === ""}
        className="rounded bg-film-teal px-3 py-1.5 text-sm font-semibold text-white hover:bg-film-teal/90 disabled:cursor-not-allowed disabled:opacity-40"
      >
        {pending ? "Saving…" : "Save as new revision"}
      </button>
      {stale ? (
        <div
          role="alert"
          data-testid="stale-save"
          className="w-full rounded border border-verdict-fail/40 bg-verdict-fail/5 p-2 text-xs text-ink-900"
        >
          <p className="font-semibold text-verdict-fail">
            Not saved: rev {stale.latestNumber} was saved while you were editing.
          </p>
          <p className="mt-0.5">
            Your edits start from {stale.baseNumber === null ? "no revision" : `rev ${stale.baseNumber}`}, so
            saving them would silently undo rev {stale.latestNumber}. Your edits are still here.{" "}
            <Link
              to={stale.latestHref}
              target="_blank"
              rel="noopener"
              className="font-semibold text-film-teal underline"
            >
              Open rev {stale.latestNumber} in a new tab
            </Link>
            , carry your changes over there and save from it.
          </p>
        </div>
      ) : error ? (
        <p role="alert" className="w-full text-xs text-verdict-fail">
          {error}
        </p>
      ) : null}
    </form>
  );
}
