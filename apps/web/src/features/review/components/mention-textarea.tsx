// A comment box with @mention autocomplete from the workspace's members (GET /members).
import { useId, useRef, useState } from "react";
import type { KeyboardEvent } from "react";
import { useMembers } from "../api/threads.ts";
import type { Member } from "../api/threads.ts";
import { mentionQuery } from "../lib/anchors.ts";

export function MentionTextarea({
  value,
  onChange,
  label,
  placeholder,
  rows = 3,
}: {
  value: string;
  onChange: (v: string) => void;
  label: string;
  placeholder?: string;
  rows?: number;
}) {
  const members = useMembers();
  const ref = useRef<HTMLTextAreaElement>(null);
  const [caret, setCaret] = useState(0);
  const [active, setActive] = useState(0);
  const [dismissed, setDismissed] = useState<number | null>(null);
  const id = useId();
  const q = mentionQuery(value, caret);
  const matches: Member[] =
    q && dismissed !== q.start
      ? (members.data ?? [])
          .filter((m) => {
            const s = q.query.toLowerCase();
            return m.user.name.toLowerCase().includes(s) || m.user.email.toLowerCase().includes(s);
          })
          .slice(0, 6)
      : [];
  const open = matches.length > 0;

  const pick = (m: Member) => {
    if (!q) return;
    const insert = `@${m.user.email} `;
    const next = value.slice(0, q.start) + insert + value.slice(caret);
    onChange(next);
    const pos = q.start + insert.length;
    requestAnimationFrame(() => {
      ref.current?.setSelectionRange(pos, pos);
      ref.current?.focus();
    });
    setCaret(pos);
    setActive(0);
  };

  const onKeyDown = (e: KeyboardEvent<HTMLTextAreaElement>) => {
    if (!open || !q) return;
    if (e.key === "ArrowDown") {
      e.preventDefault();
      setActive((a) => (a + 1) % matches.length);
    } else if (e.key === "ArrowUp") {
      e.preventDefault();
      setActive((a) => (a - 1 + matches.length) % matches.length);
    } else if (e.key === "Enter" || e.key === "Tab") {
      const m = matches[Math.min(active, matches.length - 1)];
      if (m) {
        e.preventDefault();
        pick(m);
      }
    } else if (e.key === "Escape") {
      e.preventDefault();
      e.stopPropagation();
      setDismissed(q.start);
    }
  };

  return (
    <div className="relative">
      <label htmlFor={id} className="text-xs text-ink-700">
        {label}
      </label>
      <textarea
        ref={ref}
        id={id}
        rows={rows}
        value={value}
        placeholder={placeholder}
        role="combobox"
        aria-expanded={open}
        aria-controls={`${id}-list`}
        aria-autocomplete="list"
        aria-activedescendant={open ? `${id}-opt-${active}` : undefined}
        onChange={(e) => {
          onChange(e.target.value);
          setCaret(e.target.selectionStart);
          setDismissed(null);
        }}
        onSelect={(e) => setCaret(e.currentTarget.selectionStart)}
        onKeyDown={onKeyDown}
        className="mt-0.5 w-full rounded border border-ink-300 bg-white px-2 py-1 text-sm"
      />
      {open ? (
        <ul id={`${id}-list`} role="listbox" aria-label="People to mention" className="absolute z-20 mt-1 w-72 rounded-md border border-ink-300 bg-white py-1 text-sm shadow-lg">
          {matches.map((m, i) => (
            <li
              key={m.user.id}
              id={`${id}-opt-${i}`}
              role="option"
              aria-selected={i === active}
              className={`cursor-pointer px-3 py-1 ${i === active ? "bg-film-teal/10" : ""}`}
              onMouseDown={(e) => {
                e.preventDefault();
                pick(m);
              }}
            >
              <span className="font-medium">{m.user.name}</span> <span className="text-xs text-ink-500">{m.user.email}</span>
            </li>
          ))}
        </ul>
      ) : null}
    </div>
  );
}
