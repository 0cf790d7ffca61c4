import { paths } from "../../config/paths.ts";
import { hasRole, type Session } from "../../lib/session.ts";

export interface NavItem {
  to: string;
  label: string;
  /** Matches only the exact path (for "/"). */
  end?: boolean;
}

/** The main navigation for a person: everyone sees overview and materials; the rest follows their roles. */
export function navItemsFor(session: Session | null, outboxAvailable: boolean): NavItem[] {
  const items: NavItem[] = [
    { to: paths.home, label: "Overview", end: true },
    { to: paths.materials, label: "Materials" },
  ];
  if (hasRole(session, "admin")) items.push({ to: paths.people, label: "People" });
  if (hasRole(session, "admin", "approver")) items.push({ to: paths.audit, label: "Audit log" });
  if (hasRole(session, "admin") && outboxAvailable) items.push({ to: paths.outbox, label: "Outbox" });
  return items;
}
