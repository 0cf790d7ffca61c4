import type { ReactNode } from "react";
import { cx } from "./cx.ts";

export interface EmptyStateProps {
  title: ReactNode;
  /** What the person can do about it. */
  description?: ReactNode;
  /** A button or link. */
  action?: ReactNode;
  className?: string;
}

/** Shown where a list or panel has nothing in it yet. */
export function EmptyState({ title, description, action, className }: EmptyStateProps) {
  return (
    <div
      className={cx(
        "flex flex-col items-center gap-2 rounded-lg border border-dashed border-ink-300 px-6 py-10 text-center",
        className,
      )}
    >
      <svg aria-hidden viewBox="0 0 40 24" className="h-6 w-10 text-ink-300">
        <rect x="2" y="2" width="36" height="4" rx="1.5" fill="currentColor" opacity="0.5" />
        <rect x="2" y="10" width="36" height="4" rx="1.5" fill="currentColor" opacity="0.8" />
        <rect x="2" y="18" width="36" height="4" rx="1.5" fill="currentColor" opacity="0.5" />
      </svg>
      <p className="font-medium text-ink-800">{title}</p>
      {description && <p className="max-w-md text-sm text-ink-500">{description}</p>}
      {action && <div className="mt-2">{action}</div>}
    </div>
  );
}
