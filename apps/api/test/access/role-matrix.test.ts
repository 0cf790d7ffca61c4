// Every route declared with route() and restricted to roles refuses each role it does not name (403) without
// changing any table, and every non-public route answers 401 without a session. Generic over routeRegistry, so
// routes added later are covered as soon as createApp registers them.
import { createHash } from "node:crypto";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { createTestServer, type TestServer } from "../support/context.ts";
import { createMember, signIn, signedInMember, type MemberAgent } from "../support/auth.ts";
import { ROLES, type Role } from "../../src/db/schema.ts";
import { routeRegistry, type RegisteredRoute } from "../../src/lib/route.ts";

let server: TestServer;
const agents = new Map<Role, MemberAgent>();

/** A digest of every row of every table. */
function databaseDigest(): string {
  const db = server.ctx.db.$client;
  const tables = db
    .prepare("SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' ORDER BY name")
    .all() as { name: string }[];
  const hash = createHash("sha256");
  for (const { name } of tables) {
    hash.update(`\u0000${name}\u0000`);
    const rows = db.prepare(`SELECT * FROM "${name.replace(/"/g, '""')}" ORDER BY rowid`).all();
    hash.update(JSON.stringify(rows));
  }
  return hash.digest("hex");
}

function samplePath(r: RegisteredRoute): string {
  return "/api/v1" + r.path.replace(/:([A-Za-z0-9_]+)/g, (_m, name: string) => `matrix-probe-${name}`);
}

function call(agent: MemberAgent | null, r: RegisteredRoute) {
  const path = samplePath(r);
  const test = agent ? agent[r.method](path) : request(server.app)[r.method](path);
  return r.method === "get" || r.method === "delete" ? test : test.send({});
}

const restricted = () => [...routeRegistry.values()].filter((r) => Array.isArray(r.access));
const nonPublic = () => [...routeRegistry.values()].filter((r) => r.access !== "public");

beforeAll(async () => {
  server = await createTestServer();
  // Some state for a mutation to disturb: a workspace with an admin, a pending invitation, other members.
  const admin = await signedInMember(server, { roles: ["admin"] });
  await admin.agent.post("/api/v1/invitations").send({ email: "pending@halvorsen-thinfilm.test", roles: ["reviewer"] }).expect(201);
  for (const role of ROLES) {
    const m = await createMember(server, { roles: [role], workspaceId: admin.workspaceId });
    agents.set(role, await signIn(server, m.email, m.password));
  }
  await server.ctx.mail.flush();
});
afterAll(async () => {
  await server.close();
});

describe("role matrix", () => {
  it("knows the access routes (and any added later)", () => {
    const keys = [...routeRegistry.keys()];
    expect(keys).toEqual(
      expect.arrayContaining(["GET /members", "PATCH /members/:userId", "POST /invitations", "GET /audit"]),
    );
    expect(restricted().length).toBeGreaterThanOrEqual(6);
  });

  it("refuses each role a route does not name with 403, changing nothing", async () => {
    const failures: string[] = [];
    let checked = 0;
    for (const r of restricted()) {
      const allowed = r.access as readonly Role[];
      for (const role of ROLES.filter((x) => !allowed.includes(x))) {
        const agent = agents.get(role);
        if (!agent) throw new Error(`no agent for ${role}`);
        const before = databaseDigest();
        const res = await call(agent, r);
        const after = databaseDigest();
        checked += 1;
        const label = `${r.method.toUpperCase()} ${r.path} as ${role}`;
        if (res.status !== 403 || res.body?.error?.code !== "forbidden") {
          failures.push(`${label}: ${res.status} ${JSON.stringify(res.body)}`);
        }
        if (before !== after) failures.push(`${label}: the database changed`);
      }
    }
    expect(failures).toEqual([]);
    expect(checked).toBeGreaterThan(0);
  });

  it("answers 401 without a session on every route that is not public, changing nothing", async () => {
    const failures: string[] = [];
    const before = databaseDigest();
    for (const r of nonPublic()) {
      const res = await call(null, r);
      if (res.status !== 401 || res.body?.error?.code !== "unauthorized") {
        failures.push(`${r.method.toUpperCase()} ${r.path}: ${res.status} ${JSON.stringify(res.body)}`);
      }
    }
    expect(failures).toEqual([]);
    expect(databaseDigest()).toBe(before);
  });

  it("lets each role a route names past the role guard", async () => {
    const failures: string[] = [];
    for (const r of restricted()) {
      for (const role of r.access as readonly Role[]) {
        const agent = agents.get(role);
        if (!agent) continue;
        const res = await call(agent, r);
        const guard = res.status === 401 || (res.status === 403 && /^This needs the /.test(res.body?.error?.message ?? ""));
        if (guard) failures.push(`${r.method.toUpperCase()} ${r.path} as ${role}: ${res.status}`);
      }
    }
    expect(failures).toEqual([]);
  });
});
