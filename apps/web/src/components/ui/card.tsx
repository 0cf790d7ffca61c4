import type { HTMLAttributes, ReactNode } from "react";
import { cx } from "./cx.ts";

export interface CardProps extends Omit<HTMLAttributes<HTMLElement>, "title"> {
  /** Heading of the card (an h2 by default). */
  title?: ReactNode;
  /** Heading level for `title`. */
  titleAs?: "h2" | "h3" | "h4";
  /** Small text under the title. */
  description?: ReactNode;
  /** Controls shown at the right of the header. */
  actions?: ReactNode;
  /** Remove the inner padding (for tables that run edge to edge). */
  flush?: boolean;
}

/** A white sheet on the paper background; the basic panel of every page. */
export function Card({
  title,
  titleAs: H = "h2",
  description,
  actions,
  flush,
  className,
  children,
  ...rest
}: CardProps) {
  const hasHeader = title !== undefined || actions !== undefined || description !== undefined;
  return (
    <section className={cx("rounded-xl border border-ink-100 bg-white shadow-sm", className)} {...rest}>
      {hasHeader && (
        <header className={cx("flex flex-wrap items-start gap-3 border-b border-ink-100 px-5 py-3")}>
          <div className="min-w-0 flex-1">
            {title !== undefined && <H className="text-base font-semibold text-ink-900">{title}</H>}
            {description !== undefined && <p className="mt-0.5 text-sm text-ink-500">{description}</p>}
          </div>
          {actions !== undefined && <div className="flex flex-wrap items-center gap-2">{actions}</div>}
        </header>
      )}
      <div className={flush ? undefined : "p-5"}>{children}</div>
    </section>
  );
}
