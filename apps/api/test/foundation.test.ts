import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { createTestServer, type TestServer } from "./support/context.ts";

let server: TestServer;
beforeAll(async () => {
  server = await createTestServer();
});
afterAll(async () => {
  await server.close();
});

describe("foundation", () => {
  it("reports health with version, database and migration status", async () => {
    const res = await request(server.app).get("/api/health").expect(200);
    expect(res.body.status).toBe("ok");
    expect(res.body.version).toMatch(/^\d+\.\d+\.\d+/);
    expect(res.body.database).toBe("ok");
    expect(res.body.migrations.upToDate).toBe(true);
    expect(res.body.migrations.applied).toBeGreaterThan(0);
  });

  it("applies migrations to a new database file", () => {
    const tables = server.ctx.db.$client
      .prepare("SELECT name FROM sqlite_master WHERE type = 'table'")
      .all() as { name: string }[];
    const names = tables.map((t) => t.name);
    expect(names).toEqual(expect.arrayContaining(["users", "workspaces", "memberships", "sessions"]));
    const fk = server.ctx.db.$client.pragma("foreign_keys", { simple: true });
    expect(fk).toBe(1);
    const mode = server.ctx.db.$client.pragma("journal_mode", { simple: true });
    expect(mode).toBe("wal");
  });

  it("answers an unknown API route with a JSON 404", async () => {
    const res = await request(server.app).get("/api/v1/no-such-thing").expect(404);
    expect(res.body.error.code).toBe("not_found");
    expect(typeof res.body.error.message).toBe("string");
  });

  it("answers a malformed JSON body with 400 and the error shape", async () => {
    const res = await request(server.app)
      .post("/api/v1/anything")
      .set("Content-Type", "application/json")
      .send('{"broken": ')
      .expect(400);
    expect(res.body).toEqual({
      error: { code: "malformed_json", message: expect.any(String) },
    });
  });
});

describe("OpenAPI document", () => {
  it("is served at /api/v1/openapi.json", async () => {
    const res = await request(server.app).get("/api/v1/openapi.json").expect(200);
    expect(res.body.openapi).toBe("3.1.0");
    expect(res.body.info.title).toBe("Stackproof API");
  });
});
