// What a signed-in request carries. Set by the session middleware in src/auth/session.ts.
import type { Role } from "../db/schema.ts";

export interface AuthContext {
  user: { id: string; email: string; name: string };
  sessionId: string;
  workspaceId: string;
  workspaceName: string;
  roles: Role[];
}

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    interface Request {
      auth?: AuthContext;
    }
  }
}
