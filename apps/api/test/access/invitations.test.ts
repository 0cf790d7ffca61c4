import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { eq } from "drizzle-orm";
import { createTestServer, type TestServer } from "../support/context.ts";
import { createMember, originAgent, signedInMember, withOrigin, type MemberAgent } from "../support/auth.ts";
import { lastMailTo, linkIn, tokenIn } from "../support/mail.ts";
import { auditLog, invitations } from "../../src/db/schema.ts";
import { hashToken } from "../../src/auth/tokens.ts";

let server: TestServer;
let admin: Awaited<ReturnType<typeof signedInMember>>;
beforeAll(async () => {
  server = await createTestServer({ PUBLIC_URL: "https://stackproof.halvorsen-thinfilm.test" });
  admin = await signedInMember(server, { roles: ["admin"], name: "Astrid Halvorsen" });
});
afterAll(async () => {
  await server.close();
});

async function invite(agent: MemberAgent, email: string, roles: string[]) {
  const res = await agent.post("/api/v1/invitations").send({ email, roles }).expect(201);
  return res.body as { id: string; email: string; expiresAt: string };
}

describe("invitations", () => {
  it("runs end to end through the real e-mail: invite, look up, accept, signed in with the roles", async () => {
    const created = await invite(admin.agent, "Leif.Brekke@halvorsen-thinfilm.test", ["designer", "reviewer"]);
    expect(created.email).toBe("leif.brekke@halvorsen-thinfilm.test");
    const expires = new Date(created.expiresAt).getTime() - Date.now();
    expect(expires).toBeGreaterThan(7 * 86400_000 - 60_000);
    expect(expires).toBeLessThanOrEqual(7 * 86400_000);

    const mail = await lastMailTo(server, "leif.brekke@halvorsen-thinfilm.test");
    expect(mail.subject).toBe("Astrid Halvorsen invited you to Halvorsen Thinfilm Works on Stackproof");
    expect(mail.from).toContain("no-reply@stackproof.local");
    expect(mail.html).toContain("Accept the invitation");
    const link = linkIn(mail, "/accept-invitation");
    expect(link.origin).toBe("https://stackproof.halvorsen-thinfilm.test");
    const token = tokenIn(mail, "/accept-invitation");
    expect(Buffer.from(token, "base64url")).toHaveLength(32);
    // Only the hash is stored.
    const row = server.ctx.db.select().from(invitations).where(eq(invitations.id, created.id)).get();
    expect(row?.tokenHash).toBe(hashToken(token));
    expect(JSON.stringify(row)).not.toContain(token);

    const pending = await admin.agent.get("/api/v1/invitations").expect(200);
    expect(pending.body.items.map((i: { id: string }) => i.id)).toContain(created.id);

    const lookup = await request(server.app).get(`/api/v1/invitations/lookup/${token}`).expect(200);
    expect(lookup.body).toEqual({
      email: "leif.brekke@halvorsen-thinfilm.test",
      workspaceName: "Halvorsen Thinfilm Works",
      roles: ["designer", "reviewer"],
      expiresAt: created.expiresAt,
      existingAccount: false,
    });

    const agent = originAgent(server);
    const short = await agent.post("/api/v1/invitations/accept").send({ token, name: "Leif Brekke", password: "short" }).expect(400);
    expect(short.body.error.message).toMatch(/at least 12/);
    const guessable = await agent.post("/api/v1/invitations/accept").send({ token, name: "Leif Brekke", password: "password1234" }).expect(400);
    expect(guessable.body.error.code).toBe("weak_password");
    const accepted = await agent
      .post("/api/v1/invitations/accept")
      .send({ token, name: "Leif Brekke", password: "a long enough password" })
      .expect(200);
    expect(accepted.body.user.name).toBe("Leif Brekke");
    expect(accepted.body.roles).toEqual(["designer", "reviewer"]);
    const me = await agent.get("/api/v1/auth/me").expect(200);
    expect(me.body.workspace.id).toBe(admin.workspaceId);

    // Single use: the same link no longer works.
    await request(server.app).get(`/api/v1/invitations/lookup/${token}`).expect(404);
    const again = await withOrigin(request(server.app).post("/api/v1/invitations/accept"))
      .send({ token, name: "Someone Else", password: "another long password" })
      .expect(404);
    expect(again.body.error.code).toBe("invalid_invitation");

    const members = await admin.agent.get("/api/v1/members").expect(200);
    expect(members.body.items.map((m: { user: { name: string } }) => m.user.name)).toEqual(["Astrid Halvorsen", "Leif Brekke"]);

    const actions = server.ctx.db
      .select({ action: auditLog.action })
      .from(auditLog)
      .where(eq(auditLog.subjectId, created.id))
      .all()
      .map((a) => a.action);
    expect(actions).toEqual(["invitation.created", "invitation.accepted"]);
  });

  it("refuses an expired link", async () => {
    const created = await invite(admin.agent, "expired@halvorsen-thinfilm.test", ["reviewer"]);
    const token = tokenIn(await lastMailTo(server, "expired@halvorsen-thinfilm.test"), "/accept-invitation");
    server.ctx.db.update(invitations).set({ expiresAt: new Date(Date.now() - 1000) }).where(eq(invitations.id, created.id)).run();
    await request(server.app).get(`/api/v1/invitations/lookup/${token}`).expect(404);
    await withOrigin(request(server.app).post("/api/v1/invitations/accept"))
      .send({ token, name: "Late Person", password: "a long enough password" })
      .expect(404);
  });

  it("revokes, and a new invitation replaces a pending one", async () => {
    const first = await invite(admin.agent, "twice@halvorsen-thinfilm.test", ["reviewer"]);
    const firstToken = tokenIn(await lastMailTo(server, "twice@halvorsen-thinfilm.test"), "/accept-invitation");
    const second = await invite(admin.agent, "twice@halvorsen-thinfilm.test", ["approver"]);
    await request(server.app).get(`/api/v1/invitations/lookup/${firstToken}`).expect(404);
    const list = await admin.agent.get("/api/v1/invitations").expect(200);
    const ids = list.body.items.map((i: { id: string }) => i.id);
    expect(ids).toContain(second.id);
    expect(ids).not.toContain(first.id);

    await admin.agent.delete(`/api/v1/invitations/${second.id}`).expect(204);
    await admin.agent.delete(`/api/v1/invitations/${second.id}`).expect(404);
    const secondToken = tokenIn(await lastMailTo(server, "twice@halvorsen-thinfilm.test"), "/accept-invitation");
    await request(server.app).get(`/api/v1/invitations/lookup/${secondToken}`).expect(404);
  });

  it("adds an existing account from another workspace after checking its password", async () => {
    const other = await createMember(server, { roles: ["designer"], name: "Mira Dahl" });
    await invite(admin.agent, other.email, ["reviewer"]);
    const token = tokenIn(await lastMailTo(server, other.email), "/accept-invitation");
    const lookup = await request(server.app).get(`/api/v1/invitations/lookup/${token}`).expect(200);
    expect(lookup.body.existingAccount).toBe(true);
    const agent = originAgent(server);
    const wrong = await agent.post("/api/v1/invitations/accept").send({ token, password: "not her password" }).expect(401);
    expect(wrong.body.error.code).toBe("invalid_credentials");
    const ok = await agent.post("/api/v1/invitations/accept").send({ token, password: other.password }).expect(200);
    expect(ok.body.user).toEqual(other.user);
    expect(ok.body.workspace.id).toBe(admin.workspaceId);
    expect(ok.body.roles).toEqual(["reviewer"]);
  });

  it("refuses to invite a member again (409)", async () => {
    const res = await admin.agent.post("/api/v1/invitations").send({ email: admin.email, roles: ["designer"] }).expect(409);
    expect(res.body.error.code).toBe("already_member");
  });

  it("validates the roles", async () => {
    await admin.agent.post("/api/v1/invitations").send({ email: "x@halvorsen-thinfilm.test", roles: [] }).expect(400);
    await admin.agent.post("/api/v1/invitations").send({ email: "x@halvorsen-thinfilm.test", roles: ["owner"] }).expect(400);
    await admin.agent
      .post("/api/v1/invitations")
      .send({ email: "x@halvorsen-thinfilm.test", roles: ["designer", "designer"] })
      .expect(400);
  });

  it("lets only one of two simultaneous accepts of the same link through", async () => {
    await invite(admin.agent, "race@halvorsen-thinfilm.test", ["designer"]);
    const token = tokenIn(await lastMailTo(server, "race@halvorsen-thinfilm.test"), "/accept-invitation");
    const accept = (name: string) =>
      withOrigin(request(server.app).post("/api/v1/invitations/accept")).send({ token, name, password: "a long enough password" });
    const results = await Promise.all([accept("Racer One"), accept("Racer Two")]);
    expect(results.map((r) => r.status).sort()).toEqual([200, 404].sort());
    const members = await admin.agent.get("/api/v1/members").expect(200);
    const racers = members.body.items.filter((m: { user: { email: string } }) => m.user.email === "race@halvorsen-thinfilm.test");
    expect(racers).toHaveLength(1);
  });
});
