// The role matrix of the actions whose access depends on more than a role list in route(): workflow transitions,
// thread creation, comments, resolve/reopen, yield-run cancel, and the role-restricted domain routes called with
// real ids. Each action is prepared on a real revision in the state it needs; every member who may NOT do it gets
// 403 `forbidden` and no table changes; every member who may gets a 2xx. A member holding only `admin` is refused
// every designer, reviewer and approver action. A member of another workspace (holding every role) gets 404 on
// every route that names a resource of this workspace and sees none of it in the lists.
import { createHash } from "node:crypto";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { ENGINE_VERSION } from "@stackproof/optics";
import { createTestServer, type TestServer } from "../support/context.ts";
import { signedInMember, type MemberAgent } from "../support/auth.ts";
import { ROLES, yieldRuns } from "../../src/db/schema.ts";
import { newId } from "../../src/auth/tokens.ts";
import { routeRegistry } from "../../src/lib/route.ts";
import {
  API,
  ERROR_MODEL,
  createDesign,
  createProgram,
  createTeam,
  singleLayerAr,
  startEvidenceRun,
  twoLayerAr,
  waitForRun,
  type Team,
} from "../domain/fixtures.ts";

let server: TestServer;
let team: Team;
let programId: string;

type Who = "admin" | "designer" | "designer2" | "reviewer" | "approver";
const EVERYONE: readonly Who[] = ["admin", "designer", "designer2", "reviewer", "approver"];

interface Call {
  method: "get" | "post" | "patch" | "delete";
  path: string;
  body?: Record<string, unknown>;
  file?: { name: string; text: string };
}

const MEASUREMENT_CSV = "wavelength_nm,R\n500,1.4\n550,1.3\n600,1.45\n";

/** A digest of every row of every table. */
function databaseDigest(): string {
  const db = server.ctx.db.$client;
  const tables = db
    .prepare("SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' ORDER BY name")
    .all() as { name: string }[];
  const hash = createHash("sha256");
  for (const { name } of tables) {
    hash.update(`\u0000${name}\u0000`);
    const rows = db.prepare(`SELECT * FROM "${name.replace(/"/g, '""')}" ORDER BY rowid`).all();
    hash.update(JSON.stringify(rows));
  }
  return hash.digest("hex");
}

/** The digest once mail in flight has been stored (the capture store writes asynchronously). */
async function settledDigest(): Promise<string> {
  await server.ctx.mail.flush();
  let last = databaseDigest();
  for (let i = 0; i < 100; i++) {
    await new Promise((r) => setTimeout(r, 15));
    const now = databaseDigest();
    if (now === last) return now;
    last = now;
  }
  throw new Error("the database did not settle");
}

function send(agent: MemberAgent, call: Call) {
  const test = agent[call.method](API + call.path);
  if (call.file) return test.attach("file", Buffer.from(call.file.text), call.file.name);
  return call.method === "get" || call.method === "delete" ? test : test.send(call.body ?? {});
}

const agentOf = (who: Who) => team.members[who].agent;

async function transition(who: Who, revisionId: string, action: string, extra: Record<string, unknown> = {}) {
  const res = await agentOf(who)
    .post(`${API}/revisions/${revisionId}/transitions`)
    .send({ action, ...extra });
  expect(res.status, `${action}: ${JSON.stringify(res.body)}`).toBe(200);
  return res.body as { releaseId: string | null };
}

// States, each on a fresh design authored by `designer`.
async function draft(): Promise<string> {
  return (await createDesign(team, programId)).revision.id;
}
async function inReview(): Promise<string> {
  const id = await draft();
  await transition("designer", id, "submit");
  return id;
}
async function changesRequested(): Promise<string> {
  const id = await inReview();
  await transition("reviewer", id, "request_changes", { note: "tighten the peak" });
  return id;
}
async function inReviewWithVerifiedRun(): Promise<string> {
  const id = await inReview();
  const run = await startEvidenceRun(agentOf("designer"), id);
  const done = await waitForRun(agentOf("designer"), run.id);
  expect(done).toMatchObject({ status: "done", verified: true });
  return id;
}
async function approved(): Promise<string> {
  const id = await inReviewWithVerifiedRun();
  await transition("approver", id, "approve");
  return id;
}
async function released(): Promise<{ revisionId: string; releaseId: string }> {
  const revisionId = await approved();
  const { releaseId } = await transition("approver", revisionId, "release");
  if (!releaseId) throw new Error("no release id");
  return { revisionId, releaseId };
}
async function thread(revisionId: string, by: Who): Promise<string> {
  const res = await agentOf(by)
    .post(`${API}/revisions/${revisionId}/threads`)
    .send({
      anchor: { kind: "band", bandId: "peak" },
      severity: "blocking",
      body: "Peak too close to the limit.",
    });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body.id as string;
}
async function resolvedThread(revisionId: string, by: Who): Promise<string> {
  const id = await thread(revisionId, by);
  await agentOf("reviewer").post(`${API}/threads/${id}/resolve`).send({}).expect(200);
  return id;
}
/** A run stored as queued and not handed to the job service, so it stays queued while the matrix probes it. */
function queuedRun(revisionId: string, requestedBy: Who): string {
  const id = newId();
  server.ctx.db
    .insert(yieldRuns)
    .values({
      id,
      revisionId,
      requestedBy: team.members[requestedBy].user.id,
      status: "queued",
      trials: 40,
      seed: "matrix",
      errorModel: ERROR_MODEL,
      engineVersion: ENGINE_VERSION,
      createdAt: new Date(),
    })
    .run();
  return id;
}

interface ActionCase {
  label: string;
  /** Who may do it; everyone else of EVERYONE must get 403. */
  allowed: readonly Who[];
  /** Builds the state and answers the request to make (called afresh for every allowed member). */
  prepare: () => Promise<Call>;
}

const transitionCall = (revisionId: string, action: string): Call => ({
  method: "post",
  path: `/revisions/${revisionId}/transitions`,
  body: { action, note: "matrix" },
});

const CASES: ActionCase[] = [
  {
    label: "submit a draft",
    allowed: ["designer", "designer2"],
    prepare: async () => transitionCall(await draft(), "submit"),
  },
  {
    label: "submit again after changes were requested",
    allowed: ["designer", "designer2"],
    prepare: async () => transitionCall(await changesRequested(), "submit"),
  },
  {
    label: "request changes on a revision in review",
    allowed: ["reviewer", "approver"],
    prepare: async () => transitionCall(await inReview(), "request_changes"),
  },
  {
    label: "approve a revision in review whose gate passes",
    allowed: ["approver"],
    prepare: async () => transitionCall(await inReviewWithVerifiedRun(), "approve"),
  },
  {
    label: "release an approved revision",
    allowed: ["approver"],
    prepare: async () => transitionCall(await approved(), "release"),
  },
  {
    label: "withdraw a draft",
    allowed: ["designer", "approver"],
    prepare: async () => transitionCall(await draft(), "withdraw"),
  },
  {
    label: "withdraw a revision in review",
    allowed: ["designer", "approver"],
    prepare: async () => transitionCall(await inReview(), "withdraw"),
  },
  {
    label: "withdraw a revision with changes requested",
    allowed: ["designer", "approver"],
    prepare: async () => transitionCall(await changesRequested(), "withdraw"),
  },
  {
    label: "withdraw an approved revision",
    allowed: ["approver"],
    prepare: async () => transitionCall(await approved(), "withdraw"),
  },
  {
    label: "withdraw a released revision",
    allowed: ["approver"],
    prepare: async () => transitionCall((await released()).revisionId, "withdraw"),
  },
  {
    label: "open a thread",
    allowed: ["designer", "designer2", "reviewer", "approver"],
    prepare: async () => ({
      method: "post",
      path: `/revisions/${await inReview()}/threads`,
      body: { anchor: { kind: "design" }, severity: "advisory", body: "Consider a thinner top layer." },
    }),
  },
  {
    label: "comment on a thread",
    allowed: ["designer", "designer2", "reviewer", "approver"],
    prepare: async () => ({
      method: "post",
      path: `/threads/${await thread(await inReview(), "reviewer")}/comments`,
      body: { body: "Looked again: still close." },
    }),
  },
  {
    label: "resolve a reviewer's thread",
    allowed: ["reviewer", "approver"],
    prepare: async () => ({
      method: "post",
      path: `/threads/${await thread(await inReview(), "reviewer")}/resolve`,
      body: {},
    }),
  },
  {
    label: "resolve a thread opened by a designer (its author may)",
    allowed: ["designer2", "reviewer", "approver"],
    prepare: async () => ({
      method: "post",
      path: `/threads/${await thread(await inReview(), "designer2")}/resolve`,
      body: {},
    }),
  },
  {
    label: "reopen a reviewer's resolved thread",
    allowed: ["reviewer", "approver"],
    prepare: async () => ({
      method: "post",
      path: `/threads/${await resolvedThread(await inReview(), "reviewer")}/reopen`,
      body: { note: "Back again." },
    }),
  },
  {
    label: "reopen a resolved thread opened by a designer (its author may)",
    allowed: ["designer2", "reviewer", "approver"],
    prepare: async () => ({
      method: "post",
      path: `/threads/${await resolvedThread(await inReview(), "designer2")}/reopen`,
      body: {},
    }),
  },
  {
    label: "cancel a queued yield run started by another designer",
    allowed: ["designer2", "approver"],
    prepare: async () => ({
      method: "post",
      path: `/yield-runs/${queuedRun(await inReview(), "designer2")}/cancel`,
    }),
  },
  {
    label: "cancel a queued yield run started by a reviewer",
    allowed: ["reviewer", "approver"],
    prepare: async () => ({
      method: "post",
      path: `/yield-runs/${queuedRun(await inReview(), "reviewer")}/cancel`,
    }),
  },
  // Role-list routes, here with real ids (the generic matrix probes them with ids that do not exist).
  {
    label: "add a revision to a design",
    allowed: ["designer", "designer2"],
    prepare: async () => {
      const { design, revision } = await createDesign(team, programId);
      return {
        method: "post",
        path: `/designs/${design.id}/revisions`,
        body: { baseRevisionId: revision.id, stack: twoLayerAr(), note: "two layers" },
      };
    },
  },
  {
    label: "create a design in a program",
    allowed: ["designer", "designer2"],
    prepare: async () => ({
      method: "post",
      path: `/programs/${programId}/designs`,
      body: { name: "Matrix design", stack: singleLayerAr() },
    }),
  },
  {
    label: "edit a program",
    allowed: ["admin", "approver"],
    prepare: async () => ({
      method: "patch",
      path: `/programs/${programId}`,
      body: { description: "edited" },
    }),
  },
  {
    label: "start a yield run",
    allowed: ["designer", "designer2", "reviewer", "approver"],
    prepare: async () => ({
      method: "post",
      path: `/revisions/${await inReview()}/yield-runs`,
      body: { trials: 30 },
    }),
  },
  {
    label: "attach a measured spectrum",
    allowed: ["designer", "designer2"],
    prepare: async () => ({
      method: "post",
      path: `/revisions/${await draft()}/measurements`,
      file: { name: "witness.csv", text: MEASUREMENT_CSV },
    }),
  },
];

beforeAll(async () => {
  server = await createTestServer();
  team = await createTeam(server);
  programId = (await createProgram(team, { studyDefaults: { trials: 40, seed: "matrix" } })).id;
}, 60000);
afterAll(async () => {
  await server.close();
});

describe("role matrix of the actions checked inside their handlers", () => {
  it("refuses every member an action does not allow with 403, changing nothing; the allowed ones succeed", async () => {
    const failures: string[] = [];
    let refused = 0;
    let admitted = 0;
    for (const c of CASES) {
      const call = await c.prepare();
      for (const who of EVERYONE.filter((w) => !c.allowed.includes(w))) {
        const before = await settledDigest();
        const res = await send(agentOf(who), call);
        const after = await settledDigest();
        refused += 1;
        const label = `${c.label} as ${who}`;
        if (res.status !== 403 || res.body?.error?.code !== "forbidden") {
          failures.push(`${label}: ${res.status} ${JSON.stringify(res.body)}`);
        }
        if (before !== after) failures.push(`${label}: the database changed`);
      }
      for (const who of c.allowed) {
        const res = await send(agentOf(who), await c.prepare());
        admitted += 1;
        if (res.status < 200 || res.status >= 300) {
          failures.push(`${c.label} as ${who} (allowed): ${res.status} ${JSON.stringify(res.body)}`);
        }
        const runId = (res.body as { run?: { id?: string } })?.run?.id;
        if (runId) await server.ctx.jobs.settled(runId);
      }
    }
    expect(failures).toEqual([]);
    // Every case refuses someone, and the admin-only member is refused every designer/reviewer/approver action.
    expect(refused).toBeGreaterThanOrEqual(CASES.length);
    expect(admitted).toBeGreaterThanOrEqual(CASES.length);
  }, 180000);

  it("refuses a member holding only admin every designer, reviewer and approver action", () => {
    const notAdmin = CASES.filter((c) => c.label !== "edit a program");
    expect(notAdmin.every((c) => !c.allowed.includes("admin"))).toBe(true);
    expect(notAdmin.length).toBe(CASES.length - 1);
  });
});

describe("another workspace", () => {
  let outsider: MemberAgent;
  const ids: Record<string, string> = {};
  let ourIds: string[] = [];

  beforeAll(async () => {
    // A member of a different workspace holding every role, so only workspace scoping can stop them.
    outsider = (await signedInMember(server, { roles: [...ROLES] })).agent;
    const rel = await released();
    const later = await createDesign(team, programId);
    const thr = await thread(rel.revisionId, "reviewer");
    await team.members.admin.agent
      .post(`${API}/invitations`)
      .send({ email: "invited@halvorsen-thinfilm.test", roles: ["reviewer"] })
      .expect(201);
    const inv = await team.members.admin.agent.get(`${API}/invitations`).expect(200);
    const runs = await agentOf("approver").get(`${API}/revisions/${rel.revisionId}/yield-runs`).expect(200);
    const lot = await agentOf("designer")
      .post(`${API}/revisions/${rel.revisionId}/lots`)
      .field("scale", "percent")
      .field("quantity", "R")
      .field("runId", "R-1")
      .field("runDate", "2026-11-30")
      .attach("file", Buffer.from("wavelength_nm,P1\n450,1.4\n650,1.45\n"), "lot.csv")
      .expect(201);
    Object.assign(ids, {
      lots: lot.body.id as string,
      parts: (lot.body.parts[0] as { id: string }).id,
      programs: programId,
      designs: later.design.id,
      revisions: rel.revisionId,
      "yield-runs": queuedRun(rel.revisionId, "designer"),
      threads: thr,
      releases: rel.releaseId,
      members: team.members.designer.user.id,
      invitations: (inv.body.items[0] as { id: string }).id,
    });
    ourIds = [
      ...Object.values(ids),
      later.revision.id,
      (runs.body.items[0] as { id: string }).id,
      ...Object.values(team.members).map((m) => m.user.id),
    ];
  }, 60000);

  /** The request an outsider makes to `key` ("METHOD path") with this workspace's ids filled in. */
  function outsiderCalls(key: string): Call[] {
    const r = routeRegistry.get(key);
    if (!r) return [];
    const first = r.path.split("/")[1] ?? "";
    const id = ids[first];
    if (!id) throw new Error(`no id of this workspace for ${key}`);
    let path = r.path.replace(/:[A-Za-z0-9_]+/, id);
    if (r.path === "/revisions/:id/diff") path += `?against=${ids.revisions}`;
    const bodies: Record<string, Record<string, unknown>> = {
      "PATCH /programs/:id": { description: "taken over" },
      "POST /programs/:id/designs": { name: "Intruder", stack: singleLayerAr() },
      "POST /designs/:id/revisions": { baseRevisionId: ids.revisions, stack: twoLayerAr() },
      "POST /revisions/:id/threads": { anchor: { kind: "design" }, severity: "blocking", body: "x" },
      "POST /revisions/:id/yield-runs": { trials: 20 },
      "POST /revisions/:id/deviations": { reason: "Loosened by an outsider." },
      "POST /revisions/:id/deviations/:deviationId/decision": { accept: true },
      "POST /threads/:id/comments": { body: "hello" },
      "PATCH /members/:userId": { roles: ["reviewer"] },
    };
    if (key === "POST /revisions/:id/transitions") {
      return ["submit", "request_changes", "approve", "release", "withdraw"].map((action) => ({
        method: "post",
        path,
        body: { action },
      }));
    }
    if (r.multipart)
      return [{ method: r.method as Call["method"], path, file: { name: "m.csv", text: MEASUREMENT_CSV } }];
    return [{ method: r.method as Call["method"], path, body: bodies[key] ?? {} }];
  }

  it("gets 404 on every route naming a resource of this workspace, changing nothing", async () => {
    const keys = [...routeRegistry.values()]
      .filter((r) => r.access !== "public" && r.path.includes(":") && !r.path.startsWith("/outbox/"))
      .map((r) => `${r.method.toUpperCase()} ${r.path}`);
    expect(keys).toEqual(
      expect.arrayContaining([
        "POST /revisions/:id/transitions",
        "POST /threads/:id/resolve",
        "GET /releases/:id",
      ]),
    );
    const failures: string[] = [];
    for (const key of keys) {
      for (const call of outsiderCalls(key)) {
        const before = await settledDigest();
        const res = await send(outsider, call);
        const after = await settledDigest();
        const label = `${key} ${JSON.stringify(call.body ?? {})}`;
        if (res.status !== 404) failures.push(`${label}: ${res.status} ${JSON.stringify(res.body)}`);
        if (before !== after) failures.push(`${label}: the database changed`);
      }
    }
    expect(failures).toEqual([]);
  });

  it("sees none of this workspace in the lists", async () => {
    const failures: string[] = [];
    for (const path of [
      "/programs",
      "/overview",
      "/queue",
      "/releases",
      "/materials",
      "/members",
      "/invitations",
      "/audit",
    ]) {
      const res = await outsider.get(API + path);
      expect(res.status, path).toBe(200);
      const text = JSON.stringify(res.body);
      for (const id of ourIds) if (text.includes(id)) failures.push(`${path} shows ${id}`);
    }
    expect(failures).toEqual([]);
  });
});
