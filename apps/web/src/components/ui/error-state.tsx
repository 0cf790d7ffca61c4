import type { ReactNode } from "react";
import { ApiError } from "../../lib/api-client.ts";
import { Button } from "./button.tsx";
import { cx } from "./cx.ts";

/** The message to show a person for any thrown value (an ApiError carries the server's own words). */
export function errorMessage(error: unknown): string {
  if (error instanceof ApiError) return error.message;
  if (error instanceof Error) return error.message;
  return "Something went wrong.";
}

export interface ErrorStateProps {
  /** Usually an ApiError; its message is the server's. */
  error: unknown;
  /** Heading; defaults to a plain one chosen by status. */
  title?: ReactNode;
  /** Shows a "Try again" button. */
  onRetry?: () => void;
  className?: string;
}

function defaultTitle(error: unknown): string {
  if (error instanceof ApiError) {
    if (error.status === 403) return "You do not have access to this";
    if (error.status === 404) return "Not found";
    if (error.status === 0 || error.status >= 500) return "The server could not answer";
  }
  return "This could not be loaded";
}

/** Shown in place of content that failed to load. */
export function ErrorState({ error, title, onRetry, className }: ErrorStateProps) {
  return (
    <div
      role="alert"
      className={cx("rounded-lg border border-verdict-fail/30 bg-verdict-fail/5 px-5 py-4", className)}
    >
      <p className="font-semibold text-verdict-fail">{title ?? defaultTitle(error)}</p>
      <p className="mt-1 text-sm text-ink-800">{errorMessage(error)}</p>
      {error instanceof ApiError && error.code !== "http_error" && (
        <p className="mt-1 font-mono text-xs text-ink-500">
          {error.status} · {error.code}
        </p>
      )}
      {onRetry && (
        <Button variant="secondary" size="sm" className="mt-3" onClick={onRetry}>
          Try again
        </Button>
      )}
    </div>
  );
}
