// docs/api.md is the route map the web app is built against; the "who" column must match each route's access.
import fs from "node:fs";
import path from "node:path";
import { beforeAll, afterAll, describe, expect, it } from "vitest";
import request from "supertest";
import { createTestServer, type TestServer } from "../support/context.ts";
import { repoRoot } from "../../src/env.ts";
import { ROLES } from "../../src/db/schema.ts";
import { routeRegistry, type Access } from "../../src/lib/route.ts";

interface DocRow {
  key: string;
  section: string;
  who: string;
}

const normalise = (method: string, p: string) =>
  `${method.toUpperCase()} ${p.split("?")[0]?.replace(/:[A-Za-z0-9_]+/g, ":p") ?? p}`;

function docRows(): DocRow[] {
  const text = fs.readFileSync(path.join(repoRoot, "docs/api.md"), "utf8");
  const rows: DocRow[] = [];
  let section = "";
  for (const line of text.split("\n")) {
    const heading = /^## (.+)/.exec(line);
    if (heading?.[1]) section = heading[1];
    const m = /^\|\s*(GET|POST|PUT|PATCH|DELETE)\s*\|\s*([^|]+?)\s*\|\s*([^|]+?)\s*\|/.exec(line);
    if (m?.[1] && m[2] && m[3]) rows.push({ key: normalise(m[1], m[2]), section, who: m[3] });
  }
  return rows;
}

/** The access a "who" cell states, or null when it names a rule beyond roles (author, by action, ...). */
function accessOf(who: string): "public" | "member" | string[] | null {
  if (who === "anyone") return "public";
  if (who.startsWith("signed in")) return "member";
  const parts = who.split(",").map((s) => s.trim());
  if (parts.every((p) => (ROLES as readonly string[]).includes(p))) return [...parts].sort();
  return null;
}

const shown = (a: Access) => (Array.isArray(a) ? [...a].sort() : a);

let server: TestServer;
beforeAll(async () => {
  server = await createTestServer();
});
afterAll(async () => {
  await server.close();
});

describe("route map", () => {
  it("declares every documented route with the documented access", () => {
    const registered = new Map([...routeRegistry.values()].map((r) => [normalise(r.method, r.path), r]));
    const mismatches: string[] = [];
    for (const row of docRows()) {
      const r = registered.get(row.key);
      if (row.key === "GET /openapi.json") continue; // served by the health router
      if (!r) {
        if (row.section.startsWith("Access")) mismatches.push(`${row.key}: documented but not declared`);
        continue;
      }
      const expected = accessOf(row.who);
      if (expected !== null && JSON.stringify(expected) !== JSON.stringify(shown(r.access))) {
        mismatches.push(`${row.key}: docs say "${row.who}", route declares ${JSON.stringify(r.access)}`);
      }
    }
    const documented = new Set(docRows().map((d) => d.key));
    for (const [key, r] of registered) {
      if (r.tag === "access" && !documented.has(key)) mismatches.push(`${key}: declared but not in docs/api.md`);
    }
    expect(mismatches).toEqual([]);
  });

  it("lists the access routes in the OpenAPI document with the session cookie scheme", async () => {
    const res = await request(server.app).get("/api/v1/openapi.json").expect(200);
    const doc = res.body as {
      paths: Record<string, Record<string, { security?: unknown; responses: Record<string, unknown> }>>;
      components: { securitySchemes: Record<string, { name: string }> };
    };
    for (const [p, method] of [
      ["/api/v1/auth/sign-in", "post"],
      ["/api/v1/auth/sign-out", "post"],
      ["/api/v1/auth/me", "get"],
      ["/api/v1/auth/password-reset", "post"],
      ["/api/v1/auth/password-reset/confirm", "post"],
      ["/api/v1/invitations", "get"],
      ["/api/v1/invitations", "post"],
      ["/api/v1/invitations/{id}", "delete"],
      ["/api/v1/invitations/lookup/{token}", "get"],
      ["/api/v1/invitations/accept", "post"],
      ["/api/v1/members", "get"],
      ["/api/v1/members/{userId}", "patch"],
      ["/api/v1/members/{userId}", "delete"],
      ["/api/v1/audit", "get"],
      ["/api/v1/outbox", "get"],
      ["/api/v1/outbox/{id}", "get"],
    ] as const) {
      expect(doc.paths[p]?.[method], `${method} ${p}`).toBeDefined();
    }
    expect(doc.paths["/api/v1/auth/sign-in"]?.post?.responses["429"]).toBeDefined();
    expect(doc.paths["/api/v1/members/{userId}"]?.patch?.responses["403"]).toBeDefined();
    expect(doc.paths["/api/v1/auth/me"]?.get?.security).toEqual([{ sessionCookie: [] }]);
    expect(doc.components.securitySchemes.sessionCookie?.name).toBe("stackproof_session");
  });
});
