// E-mails of the review workflow. Sent after the change is committed; a failed send is logged by the mail service.
import { appUrl, templates } from "../mail/index.ts";
import type { Env } from "../env.ts";
import type { DbOrTx } from "../lib/audit.ts";
import type { MailDeps } from "./deps.ts";
import type { Role } from "../db/schema.ts";
import { memberships, users } from "../db/schema.ts";
import { eq } from "drizzle-orm";
import type { RevisionContext } from "./load.ts";

export interface Recipient {
  id: string;
  name: string;
  email: string;
  roles: Role[];
}

export function membersWithRoles(db: DbOrTx, workspaceId: string): Recipient[] {
  return db
    .select({ id: users.id, name: users.name, email: users.email, roles: memberships.roles })
    .from(memberships)
    .innerJoin(users, eq(memberships.userId, users.id))
    .where(eq(memberships.workspaceId, workspaceId))
    .all();
}

export function revisionLink(env: Env, rc: RevisionContext): string {
  return appUrl(env, `/designs/${rc.design.id}/revisions/${rc.revision.id}`);
}

function base(deps: MailDeps, rc: RevisionContext, recipient: Recipient) {
  return {
    recipientName: recipient.name,
    programName: rc.program.name,
    designName: rc.design.name,
    revisionNumber: rc.revision.number,
    link: revisionLink(deps.env, rc),
  };
}

function send(
  deps: MailDeps,
  rc: RevisionContext,
  to: Recipient,
  content: { subject: string; text: string; html: string },
) {
  void deps.mail.send({
    to: to.email,
    subject: content.subject,
    text: content.text,
    html: content.html,
    workspaceId: rc.program.workspaceId,
  });
}

export function mailReviewRequested(
  deps: MailDeps,
  rc: RevisionContext,
  author: { id: string; name: string },
  note: string,
) {
  for (const r of membersWithRoles(deps.db, rc.program.workspaceId)) {
    if (r.id === author.id || !r.roles.includes("reviewer")) continue;
    send(
      deps,
      rc,
      r,
      templates.reviewRequested({ ...base(deps, rc, r), authorName: author.name, note: note || undefined }),
    );
  }
}

function authorOf(deps: MailDeps, rc: RevisionContext): Recipient | undefined {
  return membersWithRoles(deps.db, rc.program.workspaceId).find((m) => m.id === rc.revision.authorId);
}

export function mailChangesRequested(
  deps: MailDeps,
  rc: RevisionContext,
  reviewer: { id: string; name: string },
  note: string,
) {
  const author = authorOf(deps, rc);
  if (!author || author.id === reviewer.id) return;
  send(
    deps,
    rc,
    author,
    templates.changesRequested({
      ...base(deps, rc, author),
      reviewerName: reviewer.name,
      note: note || undefined,
    }),
  );
}

export function mailApproved(
  deps: MailDeps,
  rc: RevisionContext,
  approver: { id: string; name: string },
  note: string,
) {
  const author = authorOf(deps, rc);
  if (!author || author.id === approver.id) return;
  send(
    deps,
    rc,
    author,
    templates.approved({ ...base(deps, rc, author), approverName: approver.name, note: note || undefined }),
  );
}

/** To the author and the other approvers of the workspace. */
export function mailReleased(
  deps: MailDeps,
  rc: RevisionContext,
  approver: { id: string; name: string },
  releaseId: string,
  yieldText: string,
) {
  const link = appUrl(deps.env, `/releases/${releaseId}`);
  for (const r of membersWithRoles(deps.db, rc.program.workspaceId)) {
    if (r.id === approver.id) continue;
    if (r.id !== rc.revision.authorId && !r.roles.includes("approver")) continue;
    send(
      deps,
      rc,
      r,
      templates.released({
        ...base(deps, rc, r),
        link,
        approverName: approver.name,
        yieldText,
        protective: rc.program.protective,
      }),
    );
  }
}

export function mailMention(
  deps: MailDeps,
  rc: RevisionContext,
  to: Recipient | { id: string; name: string; email: string },
  authorName: string,
  body: string,
) {
  const excerpt = body.length > 400 ? `${body.slice(0, 397)}...` : body;
  const content = templates.mention({
    recipientName: to.name,
    programName: rc.program.name,
    designName: rc.design.name,
    revisionNumber: rc.revision.number,
    link: revisionLink(deps.env, rc),
    authorName,
    excerpt,
  });
  void deps.mail.send({
    to: to.email,
    subject: content.subject,
    text: content.text,
    html: content.html,
    workspaceId: rc.program.workspaceId,
  });
}
