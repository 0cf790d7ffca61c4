import { cx } from "./ui/cx.ts";

export interface ProtectiveCautionProps {
  /** The program's application text, e.g. "laser eyewear filter" (optional, named in the banner). */
  application?: string | null;
  /** Smaller single-paragraph version for tight places (tables, side panels). */
  compact?: boolean;
  /** Server-provided caution text (release records carry one); shown in place of the default wording. */
  text?: string | null;
  className?: string;
}

export const protectiveCautionText =
  "A computed result is not a certification. A filter that protects eyes or sensors must be tested against the " +
  "standards that apply where it is used, by qualified people, before anyone relies on it.";

/** The caution shown wherever a program is flagged as protective (eye or sensor protection). */
export function ProtectiveCaution({ application, compact = false, text, className }: ProtectiveCautionProps) {
  return (
    <aside
      role="note"
      aria-label="Protective filter caution"
      className={cx(
        "protective-caution flex gap-3 rounded-lg border border-film-amber/60 bg-film-amber/10 text-ink-900 print:border-black print:bg-white",
        compact ? "px-3 py-2 text-xs" : "px-4 py-3 text-sm",
        className,
      )}
    >
      <svg
        aria-hidden
        viewBox="0 0 20 20"
        className={cx(
          "shrink-0 text-film-amber print:text-black",
          compact ? "mt-0.5 h-3.5 w-3.5" : "mt-0.5 h-5 w-5",
        )}
      >
        <path
          d="M10 1.5 18.5 17h-17L10 1.5Z"
          fill="none"
          stroke="currentColor"
          strokeWidth="1.8"
          strokeLinejoin="round"
        />
        <path d="M10 7.5v4.5M10 14.2v.3" stroke="currentColor" strokeWidth="1.8" strokeLinecap="round" />
      </svg>
      <div>
        {!compact && (
          <p className="font-semibold">
            Protective filter{application ? ` — ${application}` : ""}: not a certification
          </p>
        )}
        <p className={compact ? undefined : "mt-0.5 text-ink-800 print:text-black"}>
          {text ?? protectiveCautionText}
        </p>
      </div>
    </aside>
  );
}
