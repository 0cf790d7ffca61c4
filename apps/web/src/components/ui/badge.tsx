import type { HTMLAttributes } from "react";
import { cx } from "./cx.ts";

export type BadgeTone = "neutral" | "amber" | "teal" | "violet" | "pass" | "fail" | "warn" | "ink";

const tones: Record<BadgeTone, string> = {
  neutral: "bg-ink-100 text-ink-800 border-ink-100",
  ink: "bg-ink-900 text-paper border-ink-900",
  amber: "bg-film-amber/15 text-[#8a5210] border-film-amber/40",
  teal: "bg-film-teal/12 text-film-teal border-film-teal/35",
  violet: "bg-film-violet/12 text-film-violet border-film-violet/35",
  pass: "bg-verdict-pass/12 text-verdict-pass border-verdict-pass/35",
  fail: "bg-verdict-fail/10 text-verdict-fail border-verdict-fail/35",
  warn: "bg-verdict-warn/12 text-verdict-warn border-verdict-warn/35",
};

export interface BadgeProps extends HTMLAttributes<HTMLSpanElement> {
  tone?: BadgeTone;
}

/** A small rounded label (roles, counts, tags). */
export function Badge({ tone = "neutral", className, ...rest }: BadgeProps) {
  return (
    <span
      className={cx(
        "inline-flex items-center gap-1 rounded-full border px-2 py-0.5 text-xs font-medium whitespace-nowrap",
        tones[tone],
        className,
      )}
      {...rest}
    />
  );
}
