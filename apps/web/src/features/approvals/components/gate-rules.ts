// Which workflow actions a person may see for a revision, and why one is held back.
// The server decides; this only keeps the page from offering what it would refuse.
import { hasRole, type Role, type Session } from "../../../lib/session.ts";
import type { RevisionStatus } from "@stackproof/contracts";
import type { Gate } from "../api/get-gate.ts";
import type { TransitionAction } from "../api/transition-revision.ts";

export interface ActionSpec {
  action: TransitionAction;
  label: string;
  /** Roles that may take it. */
  roles: Role[];
  /** States it starts from. */
  from: RevisionStatus[];
  variant: "primary" | "secondary" | "danger";
  /** What the confirmation dialog says. */
  confirm: string;
  /** The note is asked for (and required when `noteRequired`). */
  noteLabel: string;
  noteRequired?: boolean;
}

export const actionSpecs: ActionSpec[] = [
  {
    action: "submit",
    label: "Submit for review",
    roles: ["designer"],
    from: ["draft"],
    variant: "primary",
    confirm: "Reviewers are notified. The revision can no longer change; a rework is a new revision.",
    noteLabel: "Note for the reviewers (optional)",
  },
  {
    action: "request_changes",
    label: "Send back for rework",
    roles: ["reviewer", "approver"],
    from: ["in_review"],
    variant: "secondary",
    confirm: "The author is told what to change. Say what needs rework.",
    noteLabel: "What needs rework",
    noteRequired: true,
  },
  {
    action: "approve",
    label: "Sign off",
    roles: ["approver"],
    from: ["in_review"],
    variant: "primary",
    confirm:
      "Your sign-off is recorded with the revision's hash and the verified yield run. It cannot be edited later.",
    noteLabel: "Decision note (optional)",
  },
  {
    action: "release",
    label: "Release",
    roles: ["approver"],
    from: ["approved"],
    variant: "primary",
    confirm: "A release record is filed for this exact revision. The revision becomes the production design.",
    noteLabel: "Release note (optional)",
  },
  {
    action: "withdraw",
    label: "Withdraw",
    roles: ["designer", "approver"],
    from: ["draft", "in_review", "changes_requested", "approved", "released"],
    variant: "danger",
    confirm: "The revision leaves the workflow. It stays on record, marked withdrawn.",
    noteLabel: "Why it is withdrawn",
    noteRequired: true,
  },
];

export interface ActionState {
  spec: ActionSpec;
  /** Null when the button can be pressed; otherwise the reason it is held back. */
  blockedBy: string | null;
}

/** The actions this person sees for a revision in `status`, each with the reason it is disabled, if any. */
export function availableActions(
  session: Session | null,
  status: RevisionStatus,
  authorId: string,
  gate: Gate | undefined,
): ActionState[] {
  if (!session) return [];
  const out: ActionState[] = [];
  for (const spec of actionSpecs) {
    if (!spec.from.includes(status)) continue;
    if (!hasRole(session, ...spec.roles)) continue;
    // A designer withdraws only drafts and revisions under review; later states are the approver's.
    if (
      spec.action === "withdraw" &&
      !hasRole(session, "approver") &&
      status !== "draft" &&
      status !== "in_review"
    )
      continue;
    out.push({ spec, blockedBy: blockReason(spec.action, session, authorId, gate) });
  }
  return out;
}

function failing(gate: Gate | undefined, ...ids: string[]): string[] {
  return (gate?.checks ?? [])
    .filter((c) => !c.ok && (ids.length === 0 || ids.includes(c.id)))
    .map((c) => c.message);
}

function blockReason(
  action: TransitionAction,
  session: Session,
  authorId: string,
  gate: Gate | undefined,
): string | null {
  if (action === "approve") {
    if (session.user.id === authorId)
      return "You wrote this revision; another program manager has to sign it off.";
    if (!gate) return "Checking the sign-off conditions…";
    if (!gate.canApprove) return failing(gate).join(" ") || "The sign-off conditions are not met.";
  }
  if (action === "release") {
    if (!gate) return "Checking the release conditions…";
    if (!gate.canRelease) return failing(gate).join(" ") || "The release conditions are not met.";
  }
  return null;
}
