import { useId, useRef, useState, type KeyboardEvent, type ReactNode } from "react";
import { cx } from "./cx.ts";

export interface TabItem {
  id: string;
  label: ReactNode;
  content: ReactNode;
  disabled?: boolean;
}

export interface TabsProps {
  items: TabItem[];
  /** Accessible name of the tab list. */
  label: string;
  /** Controlled selected tab id. */
  value?: string;
  /** Initially selected tab when uncontrolled (default: first). */
  defaultValue?: string;
  onValueChange?: (id: string) => void;
  className?: string;
}

/**
 * Tabs following the WAI-ARIA pattern: one tab stop, arrow keys / Home / End move and select,
 * each panel labelled by its tab. Only the selected panel is mounted.
 */
export function Tabs({ items, label, value, defaultValue, onValueChange, className }: TabsProps) {
  const base = useId();
  const [inner, setInner] = useState(defaultValue ?? items[0]?.id ?? "");
  const selected = value ?? inner;
  const refs = useRef(new Map<string, HTMLButtonElement>());

  function select(id: string) {
    if (value === undefined) setInner(id);
    onValueChange?.(id);
  }

  function onKeyDown(e: KeyboardEvent<HTMLDivElement>) {
    const enabled = items.filter((t) => !t.disabled);
    const i = enabled.findIndex((t) => t.id === selected);
    let next: TabItem | undefined;
    if (e.key === "ArrowRight") next = enabled[(i + 1) % enabled.length];
    else if (e.key === "ArrowLeft") next = enabled[(i - 1 + enabled.length) % enabled.length];
    else if (e.key === "Home") next = enabled[0];
    else if (e.key === "End") next = enabled[enabled.length - 1];
    if (!next) return;
    e.preventDefault();
    select(next.id);
    refs.current.get(next.id)?.focus();
  }

  const current = items.find((t) => t.id === selected) ?? items[0];
  return (
    <div className={className}>
      <div
        role="tablist"
        aria-label={label}
        onKeyDown={onKeyDown}
        className="flex gap-1 border-b border-ink-100"
      >
        {items.map((t) => {
          const active = t.id === current?.id;
          return (
            <button
              key={t.id}
              ref={(el) => {
                if (el) refs.current.set(t.id, el);
                else refs.current.delete(t.id);
              }}
              type="button"
              role="tab"
              id={`${base}-tab-${t.id}`}
              aria-selected={active}
              aria-controls={`${base}-panel-${t.id}`}
              tabIndex={active ? 0 : -1}
              disabled={t.disabled}
              onClick={() => select(t.id)}
              className={cx(
                "-mb-px border-b-2 px-3 py-2 text-sm font-medium transition-colors disabled:opacity-50",
                active
                  ? "border-film-amber text-ink-900"
                  : "border-transparent text-ink-500 hover:text-ink-900",
              )}
            >
              {t.label}
            </button>
          );
        })}
      </div>
      {current && (
        <div
          role="tabpanel"
          id={`${base}-panel-${current.id}`}
          aria-labelledby={`${base}-tab-${current.id}`}
          tabIndex={0}
          className="pt-4 outline-none"
        >
          {current.content}
        </div>
      )}
    </div>
  );
}
