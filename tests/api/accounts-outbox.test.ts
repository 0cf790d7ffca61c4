// Adversarial tests of the outbox and single-use links (issue 8, item 6): a designer, a second admin and the admin
// of another workspace each try to read someone else's reset or invitation link. Real SQLite file, real SMTP
// capture on loopback (apps/api/test/support). Rule source: OWASP Forgot Password Cheat Sheet ("the token is sent
// only to the user's e-mail address"); the workspace scope is the product's own rule.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { createTestServer, type TestServer } from "../../apps/api/test/support/context.ts";
import { createMember, signIn, signedInMember, withOrigin } from "../../apps/api/test/support/auth.ts";
import { capturedMail, lastMailTo, tokenIn } from "../../apps/api/test/support/mail.ts";

const API = "/api/v1";
let server: TestServer;

beforeAll(async () => {
  server = await createTestServer();
});
afterAll(async () => {
  await server?.close();
});

type Agent = Awaited<ReturnType<typeof signIn>>;

/** Every outbox text and HTML this agent can obtain, concatenated. */
async function everythingReadable(agent: Agent): Promise<string> {
  const list = await agent.get(`${API}/outbox?limit=100`);
  if (list.status !== 200) return "";
  const parts: string[] = [];
  for (const item of list.body.items as { id: string }[]) {
    const one = await agent.get(`${API}/outbox/${item.id}`).expect(200);
    parts.push(one.body.text, one.body.html ?? "");
  }
  return parts.join("\n");
}

describe("outbox: who may read captured mail", () => {
  it("refuses designers, reviewers and approvers (403): the outbox is for administrators", async () => {
    const admin = await signedInMember(server, { roles: ["admin"] });
    for (const roles of [
      ["designer"],
      ["reviewer"],
      ["approver"],
      ["designer", "reviewer", "approver"],
    ] as const) {
      const m = await createMember(server, { roles: [...roles], workspaceId: admin.workspaceId });
      const agent = await signIn(server, m.email, m.password);
      const list = await agent.get(`${API}/outbox`).expect(403);
      expect(list.body.error.code).toBe("forbidden");
      await agent.get(`${API}/outbox/anything`).expect(403);
    }
  });

  it("a designer cannot take over the admin of the same workspace through the reset mail", async () => {
    const admin = await signedInMember(server, { roles: ["admin"] });
    const designer = await signedInMember(server, { roles: ["designer"], workspaceId: admin.workspaceId });
    await withOrigin(request(server.app).post(`${API}/auth/password-reset`))
      .send({ email: admin.email })
      .expect(202);
    const token = tokenIn(
      await lastMailTo(server, admin.email, /Reset your Stackproof password/),
      "/reset-password",
    );
    await designer.agent.get(`${API}/outbox`).expect(403);
    expect(await everythingReadable(designer.agent)).not.toContain(token);
  });

  it("a second admin of the same workspace sees the reset mail but not its link; the addressee sees the link", async () => {
    const victim = await signedInMember(server, { roles: ["admin"] });
    const other = await signedInMember(server, { roles: ["admin"], workspaceId: victim.workspaceId });
    await withOrigin(request(server.app).post(`${API}/auth/password-reset`))
      .send({ email: victim.email })
      .expect(202);
    const mail = await lastMailTo(server, victim.email, /Reset your Stackproof password/);
    const token = tokenIn(mail, "/reset-password");

    const list = await other.agent.get(`${API}/outbox?limit=100`).expect(200);
    const item = (list.body.items as { id: string; to: string }[]).find((i) => i.id === mail.id);
    expect(item?.to).toBe(victim.email);
    const seen = await other.agent.get(`${API}/outbox/${mail.id}`).expect(200);
    expect(seen.body.text).toContain("[single-use link hidden: only its addressee can see it]");
    expect(`${seen.body.text}${seen.body.html}`).not.toContain(token);
    expect(await everythingReadable(other.agent)).not.toContain(token);
    // The token is useless without the link: guessing is not possible and the confirm route needs the whole token.
    await withOrigin(request(server.app).post(`${API}/auth/password-reset/confirm`))
      .send({
        token: "[single-use link hidden: only its addressee can see it]",
        password: "a brand new passphrase",
      })
      .expect(400);

    const own = await victim.agent.get(`${API}/outbox/${mail.id}`).expect(200);
    expect(own.body.text).toContain(token);
  });

  it("the admin of a second workspace sees none of the first workspace's mail and cannot take over its admin", async () => {
    const victim = await signedInMember(server, { roles: ["admin"] });
    const outsider = await signedInMember(server, { roles: ["admin"] });
    expect(outsider.workspaceId).not.toBe(victim.workspaceId);
    await withOrigin(request(server.app).post(`${API}/auth/password-reset`))
      .send({ email: victim.email })
      .expect(202);
    await victim.agent
      .post(`${API}/invitations`)
      .send({ email: "newcomer@halvorsen-thinfilm.test", roles: ["designer"] })
      .expect(201);
    const reset = await lastMailTo(server, victim.email, /Reset your Stackproof password/);
    const invitation = await lastMailTo(server, "newcomer@halvorsen-thinfilm.test", /invited you/);

    const list = await outsider.agent.get(`${API}/outbox?limit=100`).expect(200);
    const ids = (list.body.items as { id: string }[]).map((i) => i.id);
    expect(ids).not.toContain(reset.id);
    expect(ids).not.toContain(invitation.id);
    await outsider.agent.get(`${API}/outbox/${reset.id}`).expect(404);
    await outsider.agent.get(`${API}/outbox/${invitation.id}`).expect(404);
    const readable = await everythingReadable(outsider.agent);
    expect(readable).not.toContain(tokenIn(reset, "/reset-password"));
    expect(readable).not.toContain(tokenIn(invitation, "/accept-invitation"));

    // And the link, had it leaked, is the only way in: the outsider cannot reset the victim's password otherwise.
    await outsider.agent.post(`${API}/auth/password-reset`).send({ email: victim.email }).expect(202);
    await signIn(server, victim.email, victim.password);
  });

  it("mail sent for one workspace stays there even when its addressee also belongs to another workspace", async () => {
    const adminA = await signedInMember(server, { roles: ["admin"] });
    const adminB = await signedInMember(server, { roles: ["admin"] });
    const shared = await createMember(server, { roles: ["designer"], workspaceId: adminB.workspaceId });
    // Workspace A invites someone who is already a member of B: the mail is A's business.
    await adminA.agent
      .post(`${API}/invitations`)
      .send({ email: shared.email, roles: ["reviewer"] })
      .expect(201);
    const invitation = await lastMailTo(server, shared.email, /invited you/);
    const listB = await adminB.agent.get(`${API}/outbox?limit=100`).expect(200);
    expect((listB.body.items as { id: string }[]).map((i) => i.id)).not.toContain(invitation.id);
    await adminB.agent.get(`${API}/outbox/${invitation.id}`).expect(404);
    const listA = await adminA.agent.get(`${API}/outbox?limit=100`).expect(200);
    expect((listA.body.items as { id: string }[]).map((i) => i.id)).toContain(invitation.id);
    const seenByA = await adminA.agent.get(`${API}/outbox/${invitation.id}`).expect(200);
    expect(seenByA.body.text).not.toContain(tokenIn(invitation, "/accept-invitation"));
  });

  it("every captured message of this file was checked against the capture store, not a stub", async () => {
    const all = await capturedMail(server);
    expect(all.length).toBeGreaterThanOrEqual(5);
    expect(all.every((m) => m.to.length > 0)).toBe(true);
  });
});
