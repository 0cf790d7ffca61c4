import { useId, useState } from "react";
import type { FormEvent } from "react";

/** "Save as new revision": a note and a button. A saved revision is immutable. */
export function SaveRevisionForm({
  dirty,
  pending,
  error,
  onSave,
  canSave,
}: {
  dirty: boolean;
  pending: boolean;
  error: string | null;
  onSave: (note: string) => void;
  canSave: boolean;
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
      {error ? (
        <p role="alert" className="w-full text-xs text-verdict-fail">
          {error}
        </p>
      ) : null}
    </form>
  );
}
