import { cx } from "./cx.ts";

export interface SpinnerProps {
  /** Accessible text read by screen readers; also shown beside the spinner when `showLabel`. */
  label?: string;
  showLabel?: boolean;
  size?: "sm" | "md" | "lg";
  className?: string;
}

const sizes = { sm: "h-3.5 w-3.5 border-2", md: "h-5 w-5 border-2", lg: "h-8 w-8 border-[3px]" } as const;

/** A small turning ring, announced politely as a status. */
export function Spinner({ label = "Loading…", showLabel = false, size = "md", className }: SpinnerProps) {
  return (
    <span
      role="status"
      aria-live="polite"
      className={cx("inline-flex items-center gap-2 text-ink-500", className)}
    >
      <span
        aria-hidden
        className={cx(
          "inline-block animate-spin rounded-full border-current border-r-transparent",
          sizes[size],
        )}
      />
      {showLabel ? <span className="text-sm">{label}</span> : <span className="sr-only">{label}</span>}
    </span>
  );
}

/** A centred spinner for a page or panel that is waiting for its data. */
export function PageSpinner({ label = "Loading…" }: { label?: string }) {
  return (
    <div className="flex min-h-40 items-center justify-center">
      <Spinner label={label} showLabel size="lg" />
    </div>
  );
}
