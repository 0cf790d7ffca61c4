// Workspaces: creating one, and which one is the demo workspace.
import { and, eq } from "drizzle-orm";
import { memberships, users, workspaces } from "../db/schema.ts";
import { newId } from "../auth/tokens.ts";
import type { DbOrTx } from "../lib/audit.ts";

/**
 * The demo workspace is the one its demo administrator belongs to. The demo seeder (src/demo) creates that account
 * with this address; the domain does not import the seeder (imports go demo → domain, never back).
 */
export const DEMO_ADMIN_EMAIL = "admin@halvorsen.example";

/** True when `workspaceId` is the demo workspace (the web app then shows the demo banner). */
export function isDemoWorkspace(db: DbOrTx, workspaceId: string): boolean {
  const row = db
    .select({ id: users.id })
    .from(users)
    .innerJoin(memberships, and(eq(memberships.userId, users.id), eq(memberships.workspaceId, workspaceId)))
    .where(eq(users.email, DEMO_ADMIN_EMAIL))
    .get();
  return row !== undefined;
}

/** Creates a workspace (no route does: the demo seeder and deployments' set-up do), as of `at`; returns its id. */
export function createWorkspace(db: DbOrTx, input: { name: string; at?: Date }): string {
  const id = newId();
  db.insert(workspaces)
    .values({ id, name: input.name, createdAt: input.at ?? new Date() })
    .run();
  return id;
}
