// A fetch stand-in for component tests: answers "METHOD /path" keys with JSON, records the calls.
import { vi } from "vitest";

export type StubAnswer = unknown | { status: number; body?: unknown; headers?: Record<string, string> };

export interface StubCall {
  method: string;
  path: string;
  body: unknown;
}

function isStatusAnswer(
  a: unknown,
): a is { status: number; body?: unknown; headers?: Record<string, string> } {
  return (
    typeof a === "object" &&
    a !== null &&
    "status" in a &&
    typeof (a as { status: unknown }).status === "number"
  );
}

/**
 * Routes: `{ "GET /api/v1/auth/me": {...}, "POST /api/v1/auth/sign-in": { status: 401, body: {error: ...} } }`.
 * A value may be a function of the call. Unknown routes answer 404.
 */
export function stubApi(routes: Record<string, StubAnswer | ((call: StubCall) => StubAnswer)>) {
  const calls: StubCall[] = [];
  const fetchMock = vi.fn(async (input: RequestInfo | URL, init?: RequestInit) => {
    const url = new URL(
      typeof input === "string" ? input : input instanceof URL ? input.href : input.url,
      "http://localhost",
    );
    const method = (init?.method ?? "GET").toUpperCase();
    let body: unknown = undefined;
    if (typeof init?.body === "string") body = JSON.parse(init.body);
    else if (init?.body instanceof FormData) body = init.body;
    const call = { method, path: url.pathname + url.search, body };
    calls.push(call);
    const entry = routes[`${method} ${url.pathname}${url.search}`] ?? routes[`${method} ${url.pathname}`];
    if (entry === undefined) {
      return new Response(
        JSON.stringify({ error: { code: "not_found", message: `No stub for ${method} ${url.pathname}` } }),
        { status: 404 },
      );
    }
    const answer = typeof entry === "function" ? (entry as (c: StubCall) => StubAnswer)(call) : entry;
    if (isStatusAnswer(answer)) {
      return new Response(answer.body === undefined ? null : JSON.stringify(answer.body), {
        status: answer.status,
        headers: answer.headers,
      });
    }
    return new Response(JSON.stringify(answer), {
      status: 200,
      headers: { "Content-Type": "application/json" },
    });
  });
  vi.stubGlobal("fetch", fetchMock);
  return { calls, fetchMock };
}

export const demoSession = {
  user: { id: "u-designer", email: "designer@halvorsen.example", name: "Ingrid Solberg" },
  workspace: { id: "w1", name: "Halvorsen Thinfilm Works", demo: true },
  roles: ["designer"],
};

export const healthyServer = {
  status: "ok",
  version: "0.1.0",
  engineVersion: "0.1.0",
  database: "ok",
  migrations: { applied: 1, available: 1, upToDate: true },
};
