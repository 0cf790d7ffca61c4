import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { eq } from "drizzle-orm";
import { createTestServer, type TestServer } from "../support/context.ts";
import { createMember, signIn, withOrigin } from "../support/auth.ts";
import { sessions, users } from "../../src/db/schema.ts";

let server: TestServer;
beforeAll(async () => {
  server = await createTestServer();
});
afterAll(async () => {
  await server.close();
});

describe("sign-in", () => {
  it("signs in with the right password and answers /auth/me", async () => {
    const m = await createMember(server, { roles: ["designer", "reviewer"], name: "Ingrid Solberg" });
    const stored = server.ctx.db.select().from(users).where(eq(users.id, m.user.id)).get();
    expect(stored?.passwordHash.startsWith("$argon2id$")).toBe(true);
    const res = await withOrigin(request(server.app).post("/api/v1/auth/sign-in"))
      .send({ email: m.email.toUpperCase(), password: m.password })
      .expect(200);
    expect(res.body).toEqual({
      user: { id: m.user.id, email: m.email, name: "Ingrid Solberg" },
      workspace: { id: m.workspaceId, name: "Halvorsen Thinfilm Works", demo: false },
      roles: ["designer", "reviewer"],
    });
    const cookie = res.headers["set-cookie"]?.[0] ?? "";
    expect(cookie).toMatch(/^stackproof_session=[^;]+/);
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
    expect(cookie).not.toMatch(/Secure/i);
    const agent = await signIn(server, m.email, m.password);
    const me = await agent.get("/api/v1/auth/me").expect(200);
    expect(me.body.user.id).toBe(m.user.id);
    expect(me.body.roles).toEqual(["designer", "reviewer"]);
  });

  it("refuses a wrong password and an unknown e-mail with the same 401", async () => {
    const m = await createMember(server, { roles: ["designer"] });
    const wrong = await withOrigin(request(server.app).post("/api/v1/auth/sign-in"))
      .send({ email: m.email, password: "not the password" })
      .expect(401);
    expect(wrong.body.error.code).toBe("invalid_credentials");
    expect(wrong.headers["set-cookie"]).toBeUndefined();
    const unknown = await withOrigin(request(server.app).post("/api/v1/auth/sign-in"))
      .send({ email: "nobody@halvorsen-thinfilm.test", password: "whatever-it-is" })
      .expect(401);
    expect(unknown.body.error).toEqual(wrong.body.error);
  });

  it("answers 401 without a session and 400 on a malformed body", async () => {
    const res = await request(server.app).get("/api/v1/auth/me").expect(401);
    expect(res.body.error.code).toBe("unauthorized");
    const bad = await withOrigin(request(server.app).post("/api/v1/auth/sign-in")).send({ email: "no-at-sign" }).expect(400);
    expect(bad.body.error.code).toBe("validation_failed");
  });

  it("signs out: the session row is gone and the cookie no longer works", async () => {
    const m = await createMember(server, { roles: ["approver"] });
    const agent = await signIn(server, m.email, m.password);
    expect(server.ctx.db.select().from(sessions).where(eq(sessions.userId, m.user.id)).all()).toHaveLength(1);
    const out = await agent.post("/api/v1/auth/sign-out").expect(204);
    expect(out.headers["set-cookie"]?.[0]).toMatch(/^stackproof_session=;/);
    expect(server.ctx.db.select().from(sessions).where(eq(sessions.userId, m.user.id)).all()).toHaveLength(0);
    await agent.get("/api/v1/auth/me").expect(401);
  });
});

describe("session cookie in production", () => {
  it("is Secure, and not when PUBLIC_URL is plain http", async () => {
    for (const [overrides, secure] of [
      [{ NODE_ENV: "production", MAIL_CAPTURE: "true" }, true],
      [{ NODE_ENV: "production", MAIL_CAPTURE: "true", PUBLIC_URL: "http://coatings-lab.halvorsen-thinfilm.test" }, false],
    ] as const) {
      const prod = await createTestServer(overrides);
      try {
        const m = await createMember(prod, { roles: ["designer"] });
        const res = await withOrigin(request(prod.app).post("/api/v1/auth/sign-in"))
          .send({ email: m.email, password: m.password })
          .expect(200);
        const cookie = res.headers["set-cookie"]?.[0] ?? "";
        expect(/;\s*Secure/i.test(cookie), cookie).toBe(secure);
        expect(cookie).toMatch(/HttpOnly/i);
      } finally {
        await prod.close();
      }
    }
  });
});
