import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestServer, type TestServer } from "../support/context.ts";
import { createMember, signIn, signedInMember } from "../support/auth.ts";

let server: TestServer;
let admin: Awaited<ReturnType<typeof signedInMember>>;
beforeAll(async () => {
  server = await createTestServer();
  admin = await signedInMember(server, { roles: ["admin"], name: "Astrid Halvorsen" });
});
afterAll(async () => {
  await server.close();
});

describe("members and roles", () => {
  it("lists members for everyone, changes roles, and the change takes effect on the next request", async () => {
    const m = await signedInMember(server, { roles: ["designer"], name: "Bjørn Lien", workspaceId: admin.workspaceId });
    const list = await m.agent.get("/api/v1/members").expect(200);
    expect(list.body.items).toEqual([
      { user: admin.user, roles: ["admin"], joinedAt: expect.any(String) },
      { user: m.user, roles: ["designer"], joinedAt: expect.any(String) },
    ]);
    expect(list.body.nextCursor).toBeNull();

    await m.agent.get("/api/v1/audit").expect(403);
    const changed = await admin.agent.patch(`/api/v1/members/${m.user.id}`).send({ roles: ["designer", "approver"] }).expect(200);
    expect(changed.body).toEqual({ user: m.user, roles: ["designer", "approver"] });
    const me = await m.agent.get("/api/v1/auth/me").expect(200);
    expect(me.body.roles).toEqual(["designer", "approver"]);
    await m.agent.get("/api/v1/audit").expect(200);

    await admin.agent.patch("/api/v1/members/not-a-member").send({ roles: ["designer"] }).expect(404);
    await admin.agent.patch(`/api/v1/members/${m.user.id}`).send({ roles: [] }).expect(400);
  });

  it("keeps the last admin (409) and allows stepping down once another admin exists", async () => {
    const demote = await admin.agent.patch(`/api/v1/members/${admin.user.id}`).send({ roles: ["approver"] }).expect(409);
    expect(demote.body.error.code).toBe("last_admin");
    const remove = await admin.agent.delete(`/api/v1/members/${admin.user.id}`).expect(409);
    expect(remove.body.error.code).toBe("last_admin");

    const second = await createMember(server, { roles: ["admin", "reviewer"], workspaceId: admin.workspaceId });
    await admin.agent.patch(`/api/v1/members/${admin.user.id}`).send({ roles: ["admin", "approver"] }).expect(200);
    await admin.agent.patch(`/api/v1/members/${second.user.id}`).send({ roles: ["reviewer"] }).expect(200);
    await admin.agent.patch(`/api/v1/members/${admin.user.id}`).send({ roles: ["approver"] }).expect(409);
  });

  it("removes a member: their session ends and the audit log records who did it", async () => {
    const m = await signedInMember(server, { roles: ["reviewer"], name: "Kari Nygaard", workspaceId: admin.workspaceId });
    await admin.agent.delete(`/api/v1/members/${m.user.id}`).expect(204);
    await m.agent.get("/api/v1/auth/me").expect(401);
    await admin.agent.delete(`/api/v1/members/${m.user.id}`).expect(404);
    // The account stays, but belongs to no workspace.
    await expect(signIn(server, m.email, m.password)).rejects.toThrow(/403.*no_membership/);

    const audit = await admin.agent.get("/api/v1/audit").expect(200);
    const removal = audit.body.items.find((i: { action: string }) => i.action === "member.removed");
    expect(removal).toMatchObject({
      actor: { id: admin.user.id, name: "Astrid Halvorsen" },
      subjectType: "member",
      subjectId: m.user.id,
      summary: expect.stringContaining("removed Kari Nygaard"),
    });
    expect(audit.body.items[0].action).toBe("member.removed");
  });

  it("pages through the audit log newest first without repeats", async () => {
    const all = await admin.agent.get("/api/v1/audit?limit=200").expect(200);
    expect(all.body.items.length).toBeGreaterThanOrEqual(4);
    const seen: string[] = [];
    let cursor: string | null = null;
    do {
      const page: { body: { items: { id: string }[]; nextCursor: string | null } } = await admin.agent
        .get(`/api/v1/audit?limit=2${cursor ? `&cursor=${cursor}` : ""}`)
        .expect(200);
      expect(page.body.items.length).toBeLessThanOrEqual(2);
      seen.push(...page.body.items.map((i) => i.id));
      cursor = page.body.nextCursor;
    } while (cursor);
    expect(seen).toEqual(all.body.items.map((i: { id: string }) => i.id));
    const filtered = await admin.agent.get("/api/v1/audit?action=member.roles_changed").expect(200);
    expect(filtered.body.items.every((i: { action: string }) => i.action === "member.roles_changed")).toBe(true);
    const bad = await admin.agent.get("/api/v1/audit?cursor=not-a-cursor").expect(400);
    expect(bad.body.error.code).toBe("invalid_cursor");
    await admin.agent.get("/api/v1/audit?limit=201").expect(400);
  });

  it("keeps workspaces apart", async () => {
    const stranger = await signedInMember(server, { roles: ["admin"] });
    const list = await stranger.agent.get("/api/v1/members").expect(200);
    expect(list.body.items).toHaveLength(1);
    await stranger.agent.patch(`/api/v1/members/${admin.user.id}`).send({ roles: ["designer"] }).expect(404);
    await stranger.agent.delete(`/api/v1/members/${admin.user.id}`).expect(404);
  });

  it("keeps one admin when two admins demote each other at the same moment", async () => {
    const a = await signedInMember(server, { roles: ["admin"] });
    const b = await signedInMember(server, { roles: ["admin"], workspaceId: a.workspaceId });
    const results = await Promise.all([
      a.agent.patch(`/api/v1/members/${b.user.id}`).send({ roles: ["reviewer"] }),
      b.agent.patch(`/api/v1/members/${a.user.id}`).send({ roles: ["reviewer"] }),
    ]);
    // The second request finds its caller no longer admin (403) or the last admin (409).
    expect(results.filter((r) => r.status === 200)).toHaveLength(1);
    expect(results.filter((r) => r.status === 403 || r.status === 409)).toHaveLength(1);
    const list = await a.agent.get("/api/v1/members").expect(200);
    expect(list.body.items.filter((m: { roles: string[] }) => m.roles.includes("admin"))).toHaveLength(1);
  });
});
