import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { eq } from "drizzle-orm";
import { createTestServer, type TestServer } from "../support/context.ts";
import { createMember, signIn, withOrigin } from "../support/auth.ts";
import { capturedMail, lastMailTo, linkIn, tokenIn } from "../support/mail.ts";
import { auditLog, passwordResets } from "../../src/db/schema.ts";

let server: TestServer;
beforeAll(async () => {
  server = await createTestServer();
});
afterAll(async () => {
  await server.close();
});

const ask = (email: string) => withOrigin(request(server.app).post("/api/v1/auth/password-reset")).send({ email });
const confirm = (token: string, password: string) =>
  withOrigin(request(server.app).post("/api/v1/auth/password-reset/confirm")).send({ token, password });

describe("password reset", () => {
  it("runs end to end through the e-mail and ends the old sessions", async () => {
    const m = await createMember(server, { roles: ["designer"], name: "Sigrid Moen" });
    const oldAgent = await signIn(server, m.email, m.password);
    await ask(m.email.toUpperCase()).expect(202);
    const mail = await lastMailTo(server, m.email, /Reset your Stackproof password/);
    expect(mail.text).toContain("Hello Sigrid Moen,");
    // Links use the listening origin when PUBLIC_URL is not set (never the request's Host header).
    expect(linkIn(mail, "/reset-password").origin).toBe("http://127.0.0.1:5317");
    const token = tokenIn(mail, "/reset-password");

    const weak = await confirm(token, "short").expect(400);
    expect(weak.body.error.code).toBe("validation_failed");
    await confirm(token, "a brand new passphrase").expect(204);

    await oldAgent.get("/api/v1/auth/me").expect(401);
    await withOrigin(request(server.app).post("/api/v1/auth/sign-in")).send({ email: m.email, password: m.password }).expect(401);
    await signIn(server, m.email, "a brand new passphrase");

    const again = await confirm(token, "yet another passphrase").expect(400);
    expect(again.body.error.code).toBe("invalid_token");

    const audit = server.ctx.db.select().from(auditLog).where(eq(auditLog.subjectId, m.user.id)).all();
    expect(audit.map((a) => a.action)).toEqual(["user.password_reset"]);
    expect(audit[0]?.workspaceId).toBe(m.workspaceId);
  });

  it("answers 202 for an unknown address and sends nothing", async () => {
    const before = (await capturedMail(server)).length;
    await ask("nobody-here@halvorsen-thinfilm.test").expect(202);
    expect((await capturedMail(server)).length).toBe(before);
  });

  it("refuses an expired link", async () => {
    const m = await createMember(server, { roles: ["reviewer"] });
    await ask(m.email).expect(202);
    const token = tokenIn(await lastMailTo(server, m.email), "/reset-password");
    const row = server.ctx.db.select().from(passwordResets).where(eq(passwordResets.userId, m.user.id)).get();
    const life = (row?.expiresAt.getTime() ?? 0) - (row?.createdAt.getTime() ?? 0);
    expect(life).toBe(60 * 60_000);
    server.ctx.db.update(passwordResets).set({ expiresAt: new Date(Date.now() - 1) }).where(eq(passwordResets.userId, m.user.id)).run();
    const res = await confirm(token, "a brand new passphrase").expect(400);
    expect(res.body.error.code).toBe("invalid_token");
    await confirm("x".repeat(43), "a brand new passphrase").expect(400);
  });
});
