// Adversarial tests of sign-in limits, the origin check, password strength and the production defaults (issue 8,
// item 6). Real SQLite file and SMTP capture on loopback. Sources: OWASP Authentication Cheat Sheet (throttle per
// account, do not trust client-supplied addresses), OWASP CSRF Prevention Cheat Sheet (compare Origin with the
// configured target origin, not with Host), zxcvbn (Wheeler, USENIX Security 2016) for "password1234" being weak.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { createContext, loadEnv } from "@stackproof/api";
import { createTestServer, type TestServer } from "../../apps/api/test/support/context.ts";
import { loadDemoData } from "../../apps/api/src/demo/index.ts";
import { createMember, signIn, signedInMember, withOrigin } from "../../apps/api/test/support/auth.ts";
import { lastMailTo, tokenIn } from "../../apps/api/test/support/mail.ts";

const API = "/api/v1";

describe("sign-in limit and X-Forwarded-For", () => {
  let server: TestServer;
  let trusting: TestServer;
  beforeAll(async () => {
    server = await createTestServer();
    trusting = await createTestServer({ TRUST_PROXY: "loopback" });
  });
  afterAll(async () => {
    await server?.close();
    await trusting?.close();
  });

  const attempt = (s: TestServer, email: string, password: string, forwardedFor?: string) => {
    const req = withOrigin(request(s.app).post(`${API}/auth/sign-in`));
    if (forwardedFor) req.set("X-Forwarded-For", forwardedFor);
    return req.send({ email, password });
  };

  it("rotating X-Forwarded-For does not reset the limit when no proxy is trusted", async () => {
    const m = await createMember(server, { roles: ["designer"] });
    for (let i = 0; i < 5; i++)
      await attempt(server, m.email, `guess ${i}`, `203.0.113.${i + 1}`).expect(401);
    const limited = await attempt(server, m.email, m.password, "198.51.100.77").expect(429);
    expect(limited.body.error.code).toBe("too_many_attempts");
    expect(Number(limited.headers["retry-after"])).toBeGreaterThan(0);
    // Another account from the same socket is not locked out (5 failures are below the address-wide 50).
    const other = await createMember(server, { roles: ["designer"] });
    await attempt(server, other.email, other.password, "192.0.2.9").expect(200);
  });

  it("the account key ignores letter case and spaces in the e-mail", async () => {
    const m = await createMember(server, { roles: ["designer"] });
    for (let i = 0; i < 5; i++) {
      const spelled = i % 2 ? ` ${m.email.toUpperCase()} ` : m.email;
      await attempt(server, spelled, `guess ${i}`).expect(401);
    }
    await attempt(server, m.email, m.password).expect(429);
  });

  it("with TRUST_PROXY set, X-Forwarded-For from the trusted proxy names the client", async () => {
    const m = await createMember(trusting, { roles: ["designer"] });
    for (let i = 0; i < 5; i++) await attempt(trusting, m.email, `guess ${i}`, "203.0.113.50").expect(401);
    await attempt(trusting, m.email, m.password, "203.0.113.50").expect(429);
    // Another client behind the same proxy is another address.
    await attempt(trusting, m.email, m.password, "198.51.100.20").expect(200);
  });
});

describe("origin check from configuration", () => {
  let server: TestServer;
  beforeAll(async () => {
    // No PUBLIC_URL: the allowed origins are the listening address (127.0.0.1:5317, localhost:5317) and ALLOWED_ORIGINS.
    server = await createTestServer({ ALLOWED_ORIGINS: "" });
  });
  afterAll(async () => {
    await server?.close();
  });

  it("refuses a DNS-rebinding request (Host: evil.example, Origin: http://evil.example) with or without a cookie", async () => {
    const m = await createMember(server, { roles: ["admin"] });
    const rebound = await request(server.app)
      .post(`${API}/auth/sign-in`)
      .set("Host", "evil.example")
      .set("Origin", "http://evil.example")
      .send({ email: m.email, password: m.password })
      .expect(403);
    expect(rebound.body.error.code).toBe("bad_origin");
    const agent = request.agent(server.app).host("127.0.0.1:5317").set("Origin", "http://127.0.0.1:5317");
    await agent.post(`${API}/auth/sign-in`).send({ email: m.email, password: m.password }).expect(200);
    const withCookie = await agent
      .post(`${API}/invitations`)
      .set("Host", "evil.example")
      .set("Origin", "http://evil.example")
      .send({ email: "x@halvorsen-thinfilm.test", roles: ["designer"] })
      .expect(403);
    expect(withCookie.body.error.code).toBe("bad_origin");
    // Host matching Origin is not enough on any port either.
    await agent
      .post(`${API}/auth/sign-out`)
      .set("Host", "evil.example:5317")
      .set("Origin", "http://evil.example:5317")
      .expect(403);
    await agent.post(`${API}/auth/sign-out`).set("Origin", "http://localhost:5317").expect(204);
  });

  it("accepts PUBLIC_URL and every ALLOWED_ORIGINS entry, and nothing else", async () => {
    const configured = await createTestServer({
      PUBLIC_URL: "https://coatings.halvorsen-thinfilm.test/stackproof",
      ALLOWED_ORIGINS: "https://a.halvorsen-thinfilm.test, http://b.halvorsen-thinfilm.test:8080",
    });
    try {
      const m = await createMember(configured, { roles: ["designer"] });
      for (const origin of [
        "https://coatings.halvorsen-thinfilm.test",
        "https://a.halvorsen-thinfilm.test",
        "http://b.halvorsen-thinfilm.test:8080",
      ]) {
        await request(configured.app)
          .post(`${API}/auth/sign-in`)
          .set("Origin", origin)
          .send({ email: m.email, password: m.password })
          .expect(200);
      }
      for (const origin of [
        "http://127.0.0.1:5317",
        "http://coatings.halvorsen-thinfilm.test",
        "https://evil.example",
      ]) {
        await request(configured.app)
          .post(`${API}/auth/sign-in`)
          .set("Host", new URL(origin).host)
          .set("Origin", origin)
          .send({ email: m.email, password: m.password })
          .expect(403);
      }
    } finally {
      await configured.close();
    }
  });

  it("refuses an ALLOWED_ORIGINS entry that is not an origin", () => {
    expect(() => loadEnv({ NODE_ENV: "test", ALLOWED_ORIGINS: "not a url" })).toThrow(/ALLOWED_ORIGINS/);
  });
});

describe("password strength", () => {
  let server: TestServer;
  beforeAll(async () => {
    server = await createTestServer();
  });
  afterAll(async () => {
    await server?.close();
  });

  it("refuses short and long-but-guessable passwords on reset, and the link still works afterwards", async () => {
    const m = await createMember(server, { roles: ["designer"], name: "Ingrid Solberg" });
    await withOrigin(request(server.app).post(`${API}/auth/password-reset`))
      .send({ email: m.email })
      .expect(202);
    const token = tokenIn(
      await lastMailTo(server, m.email, /Reset your Stackproof password/),
      "/reset-password",
    );
    const confirm = (password: string) =>
      withOrigin(request(server.app).post(`${API}/auth/password-reset/confirm`)).send({ token, password });
    const short = await confirm("elevenchars").expect(400);
    expect(short.body.error.message).toMatch(/at least 12 characters/);
    for (const weak of ["password1234", "qwertyuiop123", "aaaaaaaaaaaaaaaa", "ingridsolberg1", m.email]) {
      const res = await confirm(weak).expect(400);
      expect(res.body.error.code, weak).toBe("weak_password");
      expect(res.body.error.message).toMatch(/too easy to guess/);
    }
    await confirm("amber kestrel lattice").expect(204);
    await signIn(server, m.email, "amber kestrel lattice");
  });

  it("refuses a guessable password when an invitation creates the account", async () => {
    const admin = await signedInMember(server, { roles: ["admin"] });
    await admin.agent
      .post(`${API}/invitations`)
      .send({ email: "weak.pw@halvorsen-thinfilm.test", roles: ["designer"] })
      .expect(201);
    const token = tokenIn(
      await lastMailTo(server, "weak.pw@halvorsen-thinfilm.test", /invited you/),
      "/accept-invitation",
    );
    const accept = (password: string) =>
      withOrigin(request(server.app).post(`${API}/invitations/accept`)).send({
        token,
        name: "Weak Person",
        password,
      });
    const weak = await accept("password1234").expect(400);
    expect(weak.body.error.code).toBe("weak_password");
    await accept("quartz meadow lantern").expect(200);
  });
});

describe("production defaults", () => {
  const dirs: string[] = [];
  afterAll(() => {
    for (const d of dirs) fs.rmSync(d, { recursive: true, force: true });
  });

  it("refuses to start in production with neither a mail server nor MAIL_CAPTURE=true", () => {
    expect(() => loadEnv({ NODE_ENV: "production" })).toThrow(
      /nowhere to send e-mail.*SMTP_HOST.*MAIL_CAPTURE=true/s,
    );
    expect(() => loadEnv({ NODE_ENV: "production", MAIL_CAPTURE: "false" })).toThrow(
      /nowhere to send e-mail/,
    );
    expect(() =>
      loadEnv({ NODE_ENV: "production", SMTP_HOST: "smtp.halvorsen-thinfilm.test", MAIL_CAPTURE: "true" }),
    ).toThrow(/choose/);
    const smtp = loadEnv({ NODE_ENV: "production", SMTP_HOST: "smtp.halvorsen-thinfilm.test" });
    expect(smtp.MAIL_CAPTURE).toBe(false);
    expect(smtp.DEMO_DATA).toBe(false);
    // Processes that send no mail (the Redis worker, the backup command) start without one; the server does not.
    expect(loadEnv({ NODE_ENV: "production" }, { sendsMail: false })).toMatchObject({ MAIL_CAPTURE: false });
    // Outside production the capture and the demo stay on by default.
    expect(loadEnv({ NODE_ENV: "development" })).toMatchObject({ MAIL_CAPTURE: true, DEMO_DATA: true });
  });

  it("creates no demo workspace in production unless DEMO_DATA is set, and flags it when it is", async () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "stackproof-prod-"));
    dirs.push(dir);
    const plain = await createContext(
      loadEnv({ NODE_ENV: "production", MAIL_CAPTURE: "true", DATA_DIR: dir, YIELD_WORKERS: "1" }),
    );
    try {
      expect(await loadDemoData(plain.env, plain.db)).toBeNull();
      expect(plain.mail.captureMode).toBe(true);
      const count = plain.db.$client.prepare("select count(*) as n from users").get() as { n: number };
      expect(count.n).toBe(0);
    } finally {
      await plain.close();
    }
    const demoDir = fs.mkdtempSync(path.join(os.tmpdir(), "stackproof-prod-demo-"));
    dirs.push(demoDir);
    // PUBLIC_URL plain http: the session cookie is not Secure, so supertest sends it back over http.
    const server = await createTestServer({
      NODE_ENV: "production",
      MAIL_CAPTURE: "true",
      DEMO_DATA: "true",
      DATA_DIR: demoDir,
      PUBLIC_URL: "http://stackproof.test",
    });
    try {
      expect(server.demo).not.toBeNull();
      const { DEMO_PASSWORD } = await import("../../apps/api/src/demo/index.ts");
      const admin = await signIn(server, "admin@halvorsen.example", DEMO_PASSWORD);
      const me = await admin.get(`${API}/auth/me`).expect(200);
      expect(me.body.workspace.demo).toBe(true);
      const mine = await signedInMember(server, { roles: ["admin"] });
      const other = await mine.agent.get(`${API}/auth/me`).expect(200);
      expect(other.body.workspace.demo).toBe(false);
    } finally {
      await server.close();
    }
  });
});
