// Links in e-mails point at PUBLIC_URL, or the origin the server listens on. Never at a request's Host header,
// which a client controls.
import type { Env } from "../env.ts";

export function appOrigin(env: Env): string {
  if (env.PUBLIC_URL) return new URL(env.PUBLIC_URL).origin;
  const host = env.HOST === "0.0.0.0" || env.HOST === "::" ? "localhost" : env.HOST;
  return `http://${host.includes(":") ? `[${host}]` : host}:${env.PORT}`;
}

/** An absolute link into the web app, e.g. appUrl(env, "/accept-invitation", { token }). */
export function appUrl(env: Env, pathname: string, query: Record<string, string> = {}): string {
  const base = env.PUBLIC_URL ? env.PUBLIC_URL.replace(/\/+$/, "") : appOrigin(env);
  const url = new URL(base + (pathname.startsWith("/") ? pathname : `/${pathname}`));
  for (const [k, v] of Object.entries(query)) url.searchParams.set(k, v);
  return url.toString();
}
