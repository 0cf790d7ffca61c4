// Stackproof e-mails. Each template takes plain data (names, links) and returns the subject, a text part and HTML.
import type { Role } from "../db/schema.ts";

export interface MailContent {
  subject: string;
  text: string;
  html: string;
}

export function escapeHtml(s: string): string {
  return s.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c] ?? c);
}

const ROLE_NAMES: Record<Role, string> = {
  admin: "admin",
  designer: "designer",
  reviewer: "reviewer",
  approver: "approver",
};

function roleList(roles: readonly Role[]): string {
  const names = roles.map((r) => ROLE_NAMES[r]);
  if (names.length <= 1) return names.join("");
  return `${names.slice(0, -1).join(", ")} and ${names[names.length - 1]}`;
}

interface Compose {
  subject: string;
  greeting: string;
  paragraphs: string[];
  action: { label: string; url: string };
  /** Quoted text (a comment, a note), shown as a block. */
  quote?: string;
  footer?: string;
}

function compose(c: Compose): MailContent {
  const footer = c.footer ?? "You receive this because you are a member of a Stackproof workspace.";
  const text = [
    c.greeting,
    "",
    ...c.paragraphs.flatMap((p) => [p, ""]),
    ...(c.quote ? [c.quote.split("\n").map((l) => `> ${l}`).join("\n"), ""] : []),
    `${c.action.label}: ${c.action.url}`,
    "",
    "-- ",
    `Stackproof. ${footer}`,
  ].join("\n");
  const p = (s: string) => `<p style="margin:0 0 14px">${escapeHtml(s)}</p>`;
  const html = `<!doctype html>
<html><body style="margin:0;padding:24px;background:#f4f5f2;font-family:system-ui,-apple-system,'Segoe UI',sans-serif;color:#1d2521;font-size:15px;line-height:1.5">
<div style="max-width:560px;margin:0 auto;background:#ffffff;border-radius:8px;padding:28px">
<div style="font-weight:700;letter-spacing:.02em;margin-bottom:18px">Stackproof</div>
${p(c.greeting)}
${c.paragraphs.map(p).join("\n")}
${c.quote ? `<blockquote style="margin:0 0 14px;padding:8px 12px;border-left:3px solid #8aa39a;color:#3b4843;white-space:pre-wrap">${escapeHtml(c.quote)}</blockquote>` : ""}
<p style="margin:22px 0"><a href="${escapeHtml(c.action.url)}" style="background:#1f5c4a;color:#ffffff;text-decoration:none;padding:10px 16px;border-radius:6px;display:inline-block">${escapeHtml(c.action.label)}</a></p>
<p style="margin:0 0 14px;font-size:13px;color:#5a6661">Or open this link: <a href="${escapeHtml(c.action.url)}" style="color:#1f5c4a">${escapeHtml(c.action.url)}</a></p>
<p style="margin:18px 0 0;font-size:12px;color:#7a8580">${escapeHtml(footer)}</p>
</div></body></html>`;
  return { subject: c.subject, text, html };
}

const hello = (name: string | undefined) => (name ? `Hello ${name},` : "Hello,");

function revisionLabel(designName: string, revisionNumber: number) {
  return `${designName} rev ${revisionNumber}`;
}

export interface InvitationData {
  inviterName: string;
  workspaceName: string;
  roles: readonly Role[];
  link: string;
  expiresAt: Date;
}

export function invitation(d: InvitationData): MailContent {
  return compose({
    subject: `${d.inviterName} invited you to ${d.workspaceName} on Stackproof`,
    greeting: "Hello,",
    paragraphs: [
      `${d.inviterName} invited you to join the ${d.workspaceName} workspace on Stackproof as ${roleList(d.roles)}.`,
      `Stackproof is where the team reviews coating designs, checks their yield against the spec and signs off releases.`,
      `The link works once and until ${d.expiresAt.toUTCString()}.`,
    ],
    action: { label: "Accept the invitation", url: d.link },
    footer: "If you did not expect this invitation, you can ignore this message.",
  });
}

export interface PasswordResetData {
  name: string;
  link: string;
}

export function passwordReset(d: PasswordResetData): MailContent {
  return compose({
    subject: "Reset your Stackproof password",
    greeting: hello(d.name),
    paragraphs: [
      "Someone asked to reset the password of your Stackproof account. Choose a new one with the link below.",
      "The link works once and for one hour. Signing in with the new password ends all other sessions.",
    ],
    action: { label: "Choose a new password", url: d.link },
    footer: "If you did not ask for this, ignore this message: your password stays as it is.",
  });
}

export interface RevisionMailData {
  recipientName: string;
  programName: string;
  designName: string;
  revisionNumber: number;
  link: string;
}

export function reviewRequested(d: RevisionMailData & { authorName: string; note?: string }): MailContent {
  const rev = revisionLabel(d.designName, d.revisionNumber);
  return compose({
    subject: `Review requested: ${rev} (${d.programName})`,
    greeting: hello(d.recipientName),
    paragraphs: [`${d.authorName} submitted ${rev} of the ${d.programName} program for review.`],
    quote: d.note,
    action: { label: "Open the revision", url: d.link },
  });
}

export function mention(
  d: Omit<RevisionMailData, "revisionNumber"> & { revisionNumber?: number; authorName: string; excerpt: string },
): MailContent {
  const what = d.revisionNumber === undefined ? d.designName : revisionLabel(d.designName, d.revisionNumber);
  return compose({
    subject: `${d.authorName} mentioned you on ${what}`,
    greeting: hello(d.recipientName),
    paragraphs: [`${d.authorName} mentioned you in a review thread on ${what} (${d.programName}):`],
    quote: d.excerpt,
    action: { label: "Open the thread", url: d.link },
  });
}

export function changesRequested(d: RevisionMailData & { reviewerName: string; note?: string }): MailContent {
  const rev = revisionLabel(d.designName, d.revisionNumber);
  return compose({
    subject: `Changes requested on ${rev}`,
    greeting: hello(d.recipientName),
    paragraphs: [`${d.reviewerName} asked for changes to ${rev} of the ${d.programName} program.`],
    quote: d.note,
    action: { label: "See what to change", url: d.link },
  });
}

export function approved(d: RevisionMailData & { approverName: string; note?: string }): MailContent {
  const rev = revisionLabel(d.designName, d.revisionNumber);
  return compose({
    subject: `Approved: ${rev}`,
    greeting: hello(d.recipientName),
    paragraphs: [`${d.approverName} approved ${rev} of the ${d.programName} program. It can now be released.`],
    quote: d.note,
    action: { label: "Open the revision", url: d.link },
  });
}

export function released(
  d: RevisionMailData & { approverName: string; yieldText?: string; protective?: boolean },
): MailContent {
  const rev = revisionLabel(d.designName, d.revisionNumber);
  const paragraphs = [`${d.approverName} released ${rev} of the ${d.programName} program.`];
  if (d.yieldText) paragraphs.push(`Verified yield: ${d.yieldText}.`);
  if (d.protective) {
    paragraphs.push(
      "This filter protects eyes or sensors. The computed results in the release record are not a certification; " +
        "follow the applicable local standards and have the part tested by qualified people.",
    );
  }
  return compose({
    subject: `Released: ${rev}`,
    greeting: hello(d.recipientName),
    paragraphs,
    action: { label: "Open the release record", url: d.link },
  });
}

export const templates = { invitation, passwordReset, reviewRequested, mention, changesRequested, approved, released };
