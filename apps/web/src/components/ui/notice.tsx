import type { ReactNode } from "react";
import { cx } from "./cx.ts";

export type NoticeTone = "info" | "success" | "warning" | "error";

const tones: Record<NoticeTone, string> = {
  info: "border-film-teal/35 bg-film-teal/8 text-ink-900",
  success: "border-verdict-pass/35 bg-verdict-pass/8 text-ink-900",
  warning: "border-film-amber/50 bg-film-amber/10 text-ink-900",
  error: "border-verdict-fail/35 bg-verdict-fail/6 text-ink-900",
};

const bars: Record<NoticeTone, string> = {
  info: "bg-film-teal",
  success: "bg-verdict-pass",
  warning: "bg-film-amber",
  error: "bg-verdict-fail",
};

export interface NoticeProps {
  tone?: NoticeTone;
  title?: ReactNode;
  children?: ReactNode;
  /** Shows a close button. */
  onDismiss?: () => void;
  className?: string;
}

/** An inline message. Errors and warnings are announced at once (role="alert"); others politely. */
export function Notice({ tone = "info", title, children, onDismiss, className }: NoticeProps) {
  return (
    <div
      role={tone === "error" || tone === "warning" ? "alert" : "status"}
      className={cx(
        "relative flex gap-3 overflow-hidden rounded-lg border py-3 pr-4 pl-4",
        tones[tone],
        className,
      )}
    >
      <span aria-hidden className={cx("absolute inset-y-0 left-0 w-1", bars[tone])} />
      <div className="min-w-0 flex-1 text-sm">
        {title && <p className="font-semibold">{title}</p>}
        {children && <div className={title ? "mt-0.5 text-ink-800" : "text-ink-800"}>{children}</div>}
      </div>
      {onDismiss && (
        <button
          type="button"
          onClick={onDismiss}
          aria-label="Dismiss"
          className="self-start rounded px-1 text-ink-500 hover:text-ink-900"
        >
          ×
        </button>
      )}
    </div>
  );
}
