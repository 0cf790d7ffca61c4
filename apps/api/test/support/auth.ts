// Members and signed-in supertest agents for API tests.
//
//   const admin = await createMember(server, { roles: ["admin"] });
//   const agent = await signIn(server, admin.email, admin.password);
//   await agent.post("/api/v1/programs").send({...}).expect(201);   // Origin is set for you
//
// Every request made through the returned agent carries the session cookie, `Host: stackproof.test` and
// `Origin: http://stackproof.test`, so mutations pass the origin check (Origin must equal the request's own origin).
// For a one-off request without a session use `withOrigin(request(server.app).post(...))`.
import request, { type Test } from "supertest";
import { eq } from "drizzle-orm";
import type { TestServer } from "./context.ts";
import { memberships, users, workspaces, type Role } from "../../src/db/schema.ts";
import { hashPassword, normalizeEmail } from "../../src/auth/password.ts";
import { newId } from "../../src/auth/tokens.ts";

export interface CreatedMember {
  user: { id: string; email: string; name: string };
  email: string;
  password: string;
  workspaceId: string;
}

export interface CreateMemberOptions {
  roles: Role[];
  email?: string;
  name?: string;
  password?: string;
  /** Workspace to join; a new one ("Halvorsen Thinfilm Works") is created when omitted. */
  workspaceId?: string;
}

let counter = 0;

/** Inserts a user (argon2id hash) and a membership; creates the workspace when none is given. */
export async function createMember(server: TestServer, opts: CreateMemberOptions): Promise<CreatedMember> {
  counter += 1;
  const tag = `${Date.now().toString(36)}${counter}`;
  const email = normalizeEmail(opts.email ?? `member-${tag}@halvorsen-thinfilm.test`);
  const name = opts.name ?? `Member ${tag}`;
  const password = opts.password ?? `pw-${tag}-correct-horse`;
  const db = server.ctx.db;
  let workspaceId = opts.workspaceId;
  if (!workspaceId) {
    workspaceId = newId();
    db.insert(workspaces).values({ id: workspaceId, name: "Halvorsen Thinfilm Works" }).run();
  }
  const existing = db.select().from(users).where(eq(users.email, email)).get();
  const id = existing?.id ?? newId();
  if (!existing) {
    db.insert(users)
      .values({ id, email, name, passwordHash: await hashPassword(password) })
      .run();
  }
  db.insert(memberships).values({ workspaceId, userId: id, roles: opts.roles }).run();
  return { user: { id, email, name: existing?.name ?? name }, email, password, workspaceId };
}

/** Host name the test requests are addressed to (supertest listens on a random port, so the host is fixed). */
export const TEST_HOST = "stackproof.test";
export const TEST_ORIGIN = `http://${TEST_HOST}`;

/** Addresses a one-off request to TEST_HOST with a matching Origin, so a mutation passes the origin check. */
export function withOrigin<T extends Test>(test: T): T {
  return test.set("Host", TEST_HOST).set("Origin", TEST_ORIGIN);
}

export type MemberAgent = ReturnType<typeof request.agent>;

/** A supertest agent that keeps cookies and sends Host TEST_HOST and Origin TEST_ORIGIN on every request. */
export function originAgent(server: TestServer): MemberAgent {
  return request.agent(server.app).host(TEST_HOST).set("Origin", TEST_ORIGIN);
}

/** Signs in through POST /api/v1/auth/sign-in; throws unless it succeeds. */
export async function signIn(server: TestServer, email: string, password: string): Promise<MemberAgent> {
  const agent = originAgent(server);
  const res = await agent.post("/api/v1/auth/sign-in").send({ email, password });
  if (res.status !== 200) {
    throw new Error(`sign-in of ${email} failed: ${res.status} ${JSON.stringify(res.body)}`);
  }
  return agent;
}

/** createMember followed by signIn. */
export async function signedInMember(
  server: TestServer,
  opts: CreateMemberOptions,
): Promise<CreatedMember & { agent: MemberAgent }> {
  const member = await createMember(server, opts);
  return { ...member, agent: await signIn(server, member.email, member.password) };
}
