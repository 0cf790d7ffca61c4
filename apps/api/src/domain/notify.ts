// E-mails of the review workflow. Sent after the change is committed; a failed send is logged by the mail service.
import { appUrl, templates } from "../mail/index.ts";
import type { AppContext } from "../context.ts";
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

export function membersWithRoles(ctx: AppContext, workspaceId: string): Recipient[] {
  return ctx.db
    .select({ id: users.id, name: users.name, email: users.email, roles: memberships.roles })
    .from(memberships)
    .innerJoin(users, eq(memberships.userId, users.id))
    .where(eq(memberships.workspaceId, workspaceId))
    .all();
}

export function revisionLink(ctx: AppContext, rc: RevisionContext): string {
  return appUrl(ctx.env, `/designs/${rc.design.id}/revisions/${rc.revision.id}`);
}

function base(ctx: AppContext, rc: RevisionContext, recipient: Recipient) {
  return {
    recipientName: recipient.name,
    programName: rc.program.name,
    designName: rc.design.name,
    revisionNumber: rc.revision.number,
    link: revisionLink(ctx, rc),
  };
}

function send(
  ctx: AppContext,
  rc: RevisionContext,
  to: Recipient,
  content: { subject: string; text: string; html: string },
) {
  void ctx.mail.send({
    to: to.email,
    subject: content.subject,
    text: content.text,
    html: content.html,
    workspaceId: rc.program.workspaceId,
  });
}

export function mailReviewRequested(
  ctx: AppContext,
  rc: RevisionContext,
  author: { id: string; name: string },
  note: string,
) {
  for (const r of membersWithRoles(ctx, rc.program.workspaceId)) {
    if (r.id === author.id || !r.roles.includes("reviewer")) continue;
    send(
      ctx,
      rc,
      r,
      templates.reviewRequested({ ...base(ctx, rc, r), authorName: author.name, note: note || undefined }),
    );
  }
}

function authorOf(ctx: AppContext, rc: RevisionContext): Recipient | undefined {
  return membersWithRoles(ctx, rc.program.workspaceId).find((m) => m.id === rc.revision.authorId);
}

export function mailChangesRequested(
  ctx: AppContext,
  rc: RevisionContext,
  reviewer: { id: string; name: string },
  note: string,
) {
  const author = authorOf(ctx, rc);
  if (!author || author.id === reviewer.id) return;
  send(
    ctx,
    rc,
    author,
    templates.changesRequested({
      ...base(ctx, rc, author),
      reviewerName: reviewer.name,
      note: note || undefined,
    }),
  );
}

export function mailApproved(
  ctx: AppContext,
  rc: RevisionContext,
  approver: { id: string; name: string },
  note: string,
) {
  const author = authorOf(ctx, rc);
  if (!author || author.id === approver.id) return;
  send(
    ctx,
    rc,
    author,
    templates.approved({ ...base(ctx, rc, author), approverName: approver.name, note: note || undefined }),
  );
}

/** To the author and the other approvers of the workspace. */
export function mailReleased(
  ctx: AppContext,
  rc: RevisionContext,
  approver: { id: string; name: string },
  releaseId: string,
  yieldText: string,
) {
  const link = appUrl(ctx.env, `/releases/${releaseId}`);
  for (const r of membersWithRoles(ctx, rc.program.workspaceId)) {
    if (r.id === approver.id) continue;
    if (r.id !== rc.revision.authorId && !r.roles.includes("approver")) continue;
    send(
      ctx,
      rc,
      r,
      templates.released({
        ...base(ctx, rc, r),
        link,
        approverName: approver.name,
        yieldText,
        protective: rc.program.protective,
      }),
    );
  }
}

export function mailMention(
  ctx: AppContext,
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
    link: revisionLink(ctx, rc),
    authorName,
    excerpt,
  });
  void ctx.mail.send({
    to: to.email,
    subject: content.subject,
    text: content.text,
    html: content.html,
    workspaceId: rc.program.workspaceId,
  });
}
