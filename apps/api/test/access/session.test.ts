import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { eq } from "drizzle-orm";
import { createTestServer, type TestServer } from "../support/context.ts";
import { TEST_HOST, TEST_ORIGIN, createMember, signIn, signedInMember, withOrigin } from "../support/auth.ts";
import { sessions } from "../../src/db/schema.ts";

let server: TestServer;
beforeAll(async () => {
  server = await createTestServer({ PUBLIC_URL: "https://coatings.halvorsen-thinfilm.test/stackproof/" });
});
afterAll(async () => {
  await server.close();
});

const DAY = 86400;

describe("session lifetime", () => {
  it("renews a session past half its 14-day life and sends a new cookie", async () => {
    const m = await signedInMember(server, { roles: ["designer"] });
    const row = () => server.ctx.db.select().from(sessions).where(eq(sessions.userId, m.user.id)).get();
    const start = row()?.expiresAt ?? 0;
    const now = Math.floor(Date.now() / 1000);
    expect(start - now).toBeGreaterThan(14 * DAY - 60);

    // Early in its life: no renewal, no cookie.
    const early = await m.agent.get("/api/v1/auth/me").expect(200);
    expect(early.headers["set-cookie"]).toBeUndefined();

    server.ctx.db.update(sessions).set({ expiresAt: now + 3 * DAY }).where(eq(sessions.userId, m.user.id)).run();
    const renewed = await m.agent.get("/api/v1/auth/me").expect(200);
    expect(renewed.headers["set-cookie"]?.[0]).toMatch(/^stackproof_session=\w+/);
    expect((row()?.expiresAt ?? 0) - now).toBeGreaterThan(14 * DAY - 60);
  });

  it("rejects an expired session, deletes it and clears the cookie", async () => {
    const m = await signedInMember(server, { roles: ["designer"] });
    server.ctx.db
      .update(sessions)
      .set({ expiresAt: Math.floor(Date.now() / 1000) - 1 })
      .where(eq(sessions.userId, m.user.id))
      .run();
    const res = await m.agent.get("/api/v1/auth/me").expect(401);
    expect(res.headers["set-cookie"]?.[0]).toMatch(/^stackproof_session=;/);
    expect(server.ctx.db.select().from(sessions).where(eq(sessions.userId, m.user.id)).all()).toHaveLength(0);
  });

  it("ignores a made-up session cookie", async () => {
    await request(server.app).get("/api/v1/auth/me").set("Cookie", "stackproof_session=abcdefghijklmnop").expect(401);
  });
});

describe("origin check", () => {
  it("refuses a cookie-authenticated mutation without Origin or with another site's", async () => {
    const m = await signedInMember(server, { roles: ["admin"] });
    const none = await m.agent.post("/api/v1/auth/sign-out").unset("Origin").expect(403);
    expect(none.body.error.code).toBe("bad_origin");
    const evil = await m.agent.post("/api/v1/auth/sign-out").set("Origin", "https://evil.example").expect(403);
    expect(evil.body.error.code).toBe("bad_origin");
    const refererOnly = await m.agent
      .post("/api/v1/auth/sign-out")
      .unset("Origin")
      .set("Referer", "https://evil.example/page")
      .expect(403);
    expect(refererOnly.body.error.code).toBe("bad_origin");
    // Same host on another port or scheme is another origin.
    await m.agent.post("/api/v1/auth/sign-out").set("Origin", `${TEST_ORIGIN}:8080`).expect(403);
    await m.agent.get("/api/v1/auth/me").expect(200);
    // A Referer from the own origin is enough; so is PUBLIC_URL's origin.
    await m.agent.delete("/api/v1/invitations/none").unset("Origin").set("Referer", `${TEST_ORIGIN}/settings`).expect(404);
    await m.agent.delete("/api/v1/invitations/none").set("Origin", "https://coatings.halvorsen-thinfilm.test").expect(404);
    await m.agent.post("/api/v1/auth/sign-out").expect(204);
  });

  it("refuses a cross-site sign-in, and allows one without a cookie or Origin (non-browser clients)", async () => {
    const m = await createMember(server, { roles: ["designer"] });
    const res = await request(server.app)
      .post("/api/v1/auth/sign-in")
      .set("Host", TEST_HOST)
      .set("Origin", "https://evil.example")
      .send({ email: m.email, password: m.password })
      .expect(403);
    expect(res.body.error.code).toBe("bad_origin");
    await request(server.app).post("/api/v1/auth/sign-in").send({ email: m.email, password: m.password }).expect(200);
  });
});

describe("sign-in rate limit", () => {
  it("answers 429 with Retry-After after 5 failures for an address, even with the right password", async () => {
    const m = await createMember(server, { roles: ["reviewer"] });
    const attempt = (password: string) =>
      withOrigin(request(server.app).post("/api/v1/auth/sign-in")).send({ email: m.email, password });
    for (let i = 0; i < 5; i++) await attempt(`wrong guess ${i}`).expect(401);
    const limited = await attempt(m.password).expect(429);
    expect(limited.body.error.code).toBe("too_many_attempts");
    expect(limited.body.error.message).toMatch(/Too many failed sign-in attempts/);
    const retry = Number(limited.headers["retry-after"]);
    expect(retry).toBeGreaterThan(14 * 60);
    expect(retry).toBeLessThanOrEqual(15 * 60);
    // Another account from the same address is not locked out.
    const other = await createMember(server, { roles: ["reviewer"] });
    await signIn(server, other.email, other.password);
  });
});
