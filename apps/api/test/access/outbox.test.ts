import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { AddressInfo } from "node:net";
import { SMTPServer } from "smtp-server";
import { simpleParser, type ParsedMail } from "mailparser";
import request from "supertest";
import { createTestServer, type TestServer } from "../support/context.ts";
import { signedInMember, withOrigin } from "../support/auth.ts";
import { templates } from "../../src/mail/templates.ts";

describe("outbox (capture mode)", () => {
  let server: TestServer;
  beforeAll(async () => {
    server = await createTestServer();
  });
  afterAll(async () => {
    await server.close();
  });

  it("lists captured messages newest first and shows one with text and HTML", async () => {
    const admin = await signedInMember(server, { roles: ["admin"] });
    expect(server.ctx.mail.captureMode).toBe(true);
    expect(server.ctx.mail.capturePort).toBeGreaterThan(0);
    await admin.agent.post("/api/v1/invitations").send({ email: "first@halvorsen-thinfilm.test", roles: ["designer"] }).expect(201);
    await admin.agent.post("/api/v1/invitations").send({ email: "second@halvorsen-thinfilm.test", roles: ["reviewer"] }).expect(201);
    await request(server.app).get("/api/v1/outbox").expect(401);
    const list = await admin.agent.get("/api/v1/outbox").expect(200);
    expect(list.body.items.map((i: { to: string }) => i.to)).toEqual([
      "second@halvorsen-thinfilm.test",
      "first@halvorsen-thinfilm.test",
    ]);
    const page = await admin.agent.get("/api/v1/outbox?limit=1").expect(200);
    expect(page.body.items).toHaveLength(1);
    const next = await admin.agent.get(`/api/v1/outbox?limit=1&cursor=${page.body.nextCursor}`).expect(200);
    expect(next.body.items[0].to).toBe("first@halvorsen-thinfilm.test");
    expect(next.body.nextCursor).toBeNull();

    const one = await admin.agent.get(`/api/v1/outbox/${list.body.items[0].id}`).expect(200);
    expect(one.body).toMatchObject({
      to: "second@halvorsen-thinfilm.test",
      from: expect.stringContaining("no-reply@stackproof.local"),
      subject: expect.stringContaining("invited you"),
      // The invitation link is for the invitee only: the admin reads the message without it.
      text: expect.stringContaining("[single-use link hidden: only its addressee can see it]"),
      html: expect.stringContaining("<a href="),
    });
    expect(one.body.text).not.toMatch(/token=/);
    expect(one.body.html).not.toMatch(/token=/);
    await admin.agent.get("/api/v1/outbox/nope").expect(404);
  });

  it("keeps captured mail across a restart on the same database file", async () => {
    const count = server.ctx.mail.outbox?.all().length ?? 0;
    expect(count).toBeGreaterThan(0);
    const { createContext } = await import("../../src/context.ts");
    const again = await createContext(server.ctx.env);
    try {
      expect(again.mail.outbox?.all()).toHaveLength(count);
    } finally {
      await again.close();
    }
  });
});

describe("real SMTP host", () => {
  const received: ParsedMail[] = [];
  let smtp: SMTPServer;
  let server: TestServer;
  beforeAll(async () => {
    smtp = new SMTPServer({
      authOptional: true,
      disabledCommands: ["STARTTLS"],
      logger: false,
      onAuth(auth, _session, callback) {
        if (auth.username === "stackproof" && auth.password === "mail-secret") callback(null, { user: auth.username });
        else callback(new Error("Invalid username or password"));
      },
      onData(stream, _session, callback) {
        simpleParser(stream).then((m) => {
          received.push(m);
          callback();
        }, callback);
      },
    });
    await new Promise<void>((resolve) => smtp.listen(0, "127.0.0.1", resolve));
    const port = (smtp.server.address() as AddressInfo).port;
    server = await createTestServer({
      SMTP_HOST: "127.0.0.1",
      SMTP_PORT: String(port),
      SMTP_USER: "stackproof",
      SMTP_PASSWORD: "mail-secret",
      SMTP_SECURE: "false",
      MAIL_FROM: "Halvorsen Stackproof <stackproof@halvorsen-thinfilm.test>",
    });
  });
  afterAll(async () => {
    await server.close();
    await new Promise<void>((resolve) => smtp.close(resolve));
  });

  it("sends through the configured host and switches the outbox off (404)", async () => {
    const admin = await signedInMember(server, { roles: ["admin"] });
    expect(server.ctx.mail.captureMode).toBe(false);
    await admin.agent.post("/api/v1/invitations").send({ email: "remote@halvorsen-thinfilm.test", roles: ["approver"] }).expect(201);
    await withOrigin(request(server.app).post("/api/v1/auth/password-reset")).send({ email: admin.email }).expect(202);
    await server.ctx.mail.flush();
    expect(received.map((m) => m.subject)).toEqual([
      expect.stringContaining("invited you to Halvorsen Thinfilm Works"),
      "Reset your Stackproof password",
    ]);
    expect(received[0]?.from?.text).toContain("stackproof@halvorsen-thinfilm.test");
    const res = await admin.agent.get("/api/v1/outbox").expect(404);
    expect(res.body.error.code).toBe("outbox_disabled");
  });

  it("logs a failed send instead of failing the request", async () => {
    const before = received.length;
    await new Promise<void>((resolve) => smtp.close(resolve));
    const errors: unknown[] = [];
    const original = console.error;
    console.error = (...args: unknown[]) => errors.push(args);
    try {
      await server.ctx.mail.send({ to: "nobody@halvorsen-thinfilm.test", subject: "Lost", text: "x" });
    } finally {
      console.error = original;
    }
    expect(errors).toHaveLength(1);
    expect(received.length).toBe(before);
    // Reopen so afterAll can close it again.
    smtp = new SMTPServer({ logger: false, authOptional: true });
    await new Promise<void>((resolve) => smtp.listen(0, "127.0.0.1", resolve));
  });
});

describe("templates", () => {
  const base = { recipientName: "Ola Fjell", programName: "Night-vision notch", designName: "NV-532 notch", revisionNumber: 3, link: "https://stackproof.test/revisions/r3" };

  it("produce subject, text and escaped HTML for every message", () => {
    const all = [
      templates.invitation({ inviterName: "Astrid", workspaceName: "Halvorsen Thinfilm Works", roles: ["designer", "reviewer", "approver"], link: base.link, expiresAt: new Date("2026-12-08T12:00:00Z") }),
      templates.passwordReset({ name: "Ola Fjell", link: base.link }),
      templates.reviewRequested({ ...base, authorName: "Ingrid", note: "Ready <for> review" }),
      templates.mention({ ...base, authorName: "Ingrid", excerpt: "@ola check the 1064 nm band" }),
      templates.changesRequested({ ...base, reviewerName: "Leif", note: "Ripple too high" }),
      templates.approved({ ...base, approverName: "Mira" }),
      templates.released({ ...base, approverName: "Mira", yieldText: "96.1 % (95 % CI 95.2–96.9 %)", protective: true }),
    ];
    for (const m of all) {
      expect(m.subject.length).toBeGreaterThan(5);
      expect(m.text).toContain(base.link);
      expect(m.html).toContain(`href="${base.link}"`);
      expect(m.html).not.toMatch(/<for>/);
    }
    expect(all[0]?.text).toContain("as designer, reviewer and approver");
    expect(all[2]?.html).toContain("Ready &lt;for&gt; review");
    expect(all[2]?.subject).toBe("Review requested: NV-532 notch rev 3 (Night-vision notch)");
    expect(all[6]?.text).toContain("not a certification");
  });
});

describe("capture server start-up", () => {
  it("explains a busy capture port", async () => {
    const { createMailService } = await import("../../src/mail/index.ts");
    const { loadEnv } = await import("../../src/env.ts");
    const first = await createMailService(loadEnv({ NODE_ENV: "test", DATABASE_FILE: ":memory:" }));
    try {
      await expect(
        createMailService(loadEnv({ NODE_ENV: "test", DATABASE_FILE: ":memory:", CAPTURE_SMTP_PORT: String(first.capturePort) })),
      ).rejects.toThrow(/could not listen on 127\.0\.0\.1:\d+.*CAPTURE_SMTP_PORT/);
    } finally {
      await first.close();
    }
  });
});
