// Lucia v3 on the Drizzle SQLite adapter: session ids, expiry with sliding renewal, the session cookie.
import { Lucia, TimeSpan } from "lucia";
import { DrizzleSQLiteAdapter } from "@lucia-auth/adapter-drizzle";
import type { Env } from "../env.ts";
import type { Db } from "../db/client.ts";
import { sessions, users } from "../db/schema.ts";

export const SESSION_COOKIE = "stackproof_session";
/** A session lives 14 days; lucia renews it (a "fresh" session) once less than half of that remains. */
export const SESSION_LIFETIME = new TimeSpan(14, "d");

/** Secure in production, unless PUBLIC_URL says the site is served over plain http (the cookie would never be kept). */
export function secureCookie(env: Env): boolean {
  return env.NODE_ENV === "production" && !env.PUBLIC_URL?.startsWith("http:");
}

export function createLucia(db: Db, env: Env) {
  const adapter = new DrizzleSQLiteAdapter(db, sessions, users);
  return new Lucia(adapter, {
    sessionExpiresIn: SESSION_LIFETIME,
    sessionCookie: {
      name: SESSION_COOKIE,
      expires: true,
      attributes: { sameSite: "lax", secure: secureCookie(env), path: "/" },
    },
    getSessionAttributes: (attributes) => ({ workspaceId: attributes.workspaceId }),
    getUserAttributes: (attributes) => ({ email: attributes.email, name: attributes.name }),
  });
}

export type StackproofLucia = ReturnType<typeof createLucia>;

declare module "lucia" {
  interface Register {
    Lucia: StackproofLucia;
    DatabaseSessionAttributes: { workspaceId: string | null };
    DatabaseUserAttributes: { email: string; name: string };
  }
}

const instances = new WeakMap<Db, StackproofLucia>();

/** One lucia instance per database (per context). */
export function luciaFor(db: Db, env: Env): StackproofLucia {
  let lucia = instances.get(db);
  if (!lucia) {
    lucia = createLucia(db, env);
    instances.set(db, lucia);
  }
  return lucia;
}
