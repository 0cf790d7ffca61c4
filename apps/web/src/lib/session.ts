// Who is signed in. One query (['session']) read by the shell, the pages and the role checks.
import { queryOptions, useQuery } from "@tanstack/react-query";
import { redirect } from "react-router";
import { SessionInfo, type Role, type SessionUser } from "@stackproof/contracts";
import { api, ApiError } from "./api-client.ts";
import { queryClient as defaultQueryClient } from "./query-client.ts";
import type { QueryClient } from "@tanstack/react-query";

export type { Role, SessionUser };

export const allRoles: readonly Role[] = ["admin", "designer", "reviewer", "approver"];

/** Stackproof's names for the roles, as people read them. */
export const roleLabel: Record<Role, string> = {
  admin: "Administrator",
  designer: "Designer",
  reviewer: "Reviewer",
  approver: "Program manager",
};

/** GET /auth/me and the sign-in answer. */
export type Session = SessionInfo;

/** GET /auth/me; a 401 means "signed out" and resolves to null rather than failing. */
export async function getSession(): Promise<Session | null> {
  try {
    return await api.get("/auth/me", { schema: SessionInfo });
  } catch (error) {
    if (error instanceof ApiError && error.status === 401) return null;
    throw error;
  }
}

export const sessionQueryKey = ["session"] as const;

export const sessionQueryOptions = () =>
  queryOptions({ queryKey: sessionQueryKey, queryFn: getSession, staleTime: 60_000, retry: false });

/** The signed-in person, or null. Inside the shell the loader has already fetched it. */
export function useSession(): Session | null {
  return useQuery(sessionQueryOptions()).data ?? null;
}

/** True when the session holds at least one of the roles (any role when none are given). */
export function hasRole(session: Session | null | undefined, ...roles: Role[]): boolean {
  if (!session) return false;
  if (roles.length === 0) return true;
  return roles.some((r) => session.roles.includes(r));
}

/** Where sign-in should send the person afterwards: only same-site paths, never another origin. */
export function safeNext(next: string | null | undefined): string {
  if (!next || !next.startsWith("/") || next.startsWith("//") || next.startsWith("/\\")) return "/";
  return next;
}

export function signInPath(next?: string): string {
  return next && next !== "/" ? `/sign-in?next=${encodeURIComponent(next)}` : "/sign-in";
}

/**
 * For route loaders: returns the session, or throws a redirect to /sign-in?next=<this page>.
 * `loader: ({ request }) => requireSession(request)`.
 */
export async function requireSession(
  request: Request,
  client: QueryClient = defaultQueryClient,
): Promise<Session> {
  const session = await client.ensureQueryData(sessionQueryOptions());
  if (!session) {
    const url = new URL(request.url);
    throw redirect(signInPath(url.pathname + url.search));
  }
  return session;
}

/**
 * For route loaders of pages limited to some roles: signed-out people go to sign-in; people
 * without the role get a 403 response that the route's error element shows.
 */
export async function requireRole(
  request: Request,
  roles: Role[],
  client: QueryClient = defaultQueryClient,
): Promise<Session> {
  const session = await requireSession(request, client);
  if (!hasRole(session, ...roles)) {
    throw new Response(`This page is for: ${roles.map((r) => roleLabel[r]).join(", ")}.`, {
      status: 403,
      statusText: "Not allowed for your roles",
    });
  }
  return session;
}
