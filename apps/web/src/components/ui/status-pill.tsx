import { cx } from "./cx.ts";

export type RevisionStatus =
  "draft" | "in_review" | "changes_requested" | "approved" | "released" | "withdrawn";

export const revisionStatuses: readonly RevisionStatus[] = [
  "draft",
  "in_review",
  "changes_requested",
  "approved",
  "released",
  "withdrawn",
];

/** Stackproof's words for revision states. */
export const revisionStatusLabel: Record<RevisionStatus, string> = {
  draft: "Drafting",
  in_review: "Under review",
  changes_requested: "Needs rework",
  approved: "Signed off",
  released: "Released",
  withdrawn: "Withdrawn",
};

/** One-line explanation of each state (used as the pill's title and in help text). */
export const revisionStatusHint: Record<RevisionStatus, string> = {
  draft: "The author is still working on this revision.",
  in_review: "Submitted; reviewers are checking it.",
  changes_requested: "A reviewer or approver sent it back to the author.",
  approved: "The program manager signed it off; it can be released.",
  released: "Released for production with a filed record.",
  withdrawn: "Taken out of the workflow; kept for the record.",
};

const styles: Record<RevisionStatus, { pill: string; mark: string }> = {
  draft: { pill: "border-ink-300 bg-white text-ink-700", mark: "border border-ink-500 bg-transparent" },
  in_review: { pill: "border-film-teal/40 bg-film-teal/10 text-film-teal", mark: "bg-film-teal" },
  changes_requested: { pill: "border-film-amber/50 bg-film-amber/15 text-[#8a5210]", mark: "bg-film-amber" },
  approved: { pill: "border-verdict-pass/40 bg-verdict-pass/10 text-verdict-pass", mark: "bg-verdict-pass" },
  released: { pill: "border-ink-900 bg-ink-900 text-paper", mark: "bg-film-amber-soft" },
  withdrawn: {
    pill: "border-ink-100 bg-ink-100 text-ink-500 line-through decoration-ink-300",
    mark: "bg-ink-300",
  },
};

export interface StatusPillProps {
  status: RevisionStatus;
  className?: string;
}

/** The state of a revision, in Stackproof's words and colours. */
export function StatusPill({ status, className }: StatusPillProps) {
  const s = styles[status];
  return (
    <span
      title={revisionStatusHint[status]}
      data-status={status}
      className={cx(
        "inline-flex items-center gap-1.5 rounded-full border px-2.5 py-0.5 text-xs font-semibold whitespace-nowrap",
        s.pill,
        className,
      )}
    >
      <span aria-hidden className={cx("h-2 w-2 rounded-full", s.mark)} />
      {revisionStatusLabel[status]}
    </span>
  );
}
