// GET /queue semantics (only the latest revision of each design; reviewers see others' revisions in review;
// approvers see revisions whose gate passes and approved ones) and a fixed number of queries for /overview,
// /programs/:id and /queue whatever the number of designs (and for a revision's threads whatever their number).
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestServer, type TestServer } from "../support/context.ts";
import { ENGINE_VERSION } from "@stackproof/optics";
import { createMember, signIn, type MemberAgent } from "../support/auth.ts";
import { yieldRuns } from "../../src/db/schema.ts";
import { newId } from "../../src/auth/tokens.ts";
import {
  API,
  ERROR_MODEL,
  createDesign,
  createProgram,
  createTeam,
  startEvidenceRun,
  twoLayerAr,
  waitForRun,
  type Team,
  latestRevisionId,
} from "./fixtures.ts";

let server: TestServer;
let team: Team;
let programId: string;

beforeAll(async () => {
  server = await createTestServer();
  team = await createTeam(server);
  programId = (await createProgram(team, { studyDefaults: { trials: 40, seed: "queue" } })).id;
}, 60000);
afterAll(async () => {
  await server.close();
});

type Who = keyof Team["members"];
const agentOf = (who: Who) => team.members[who].agent;

async function act(who: Who, revisionId: string, action: string) {
  const res = await agentOf(who).post(`${API}/revisions/${revisionId}/transitions`).send({ action });
  expect(res.status, `${action}: ${JSON.stringify(res.body)}`).toBe(200);
}

async function newRevision(who: Who, designId: string): Promise<string> {
  const baseRevisionId = await latestRevisionId(agentOf(who), designId);
  const res = await agentOf(who)
    .post(`${API}/designs/${designId}/revisions`)
    .send({ baseRevisionId, stack: twoLayerAr() });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body.id as string;
}

async function verifiedRun(revisionId: string) {
  const run = await startEvidenceRun(agentOf("designer"), revisionId);
  expect(await waitForRun(agentOf("designer"), run.id)).toMatchObject({ status: "done", verified: true });
}

interface Queue {
  changesRequested: { id: string }[];
  reviewRequested: { id: string }[];
  readyForDecision: { id: string }[];
  readyForRelease: { id: string }[];
}
async function queueOf(agent: MemberAgent): Promise<Record<keyof Queue, string[]>> {
  const res = await agent.get(`${API}/queue`).expect(200);
  const q = res.body as Queue;
  return {
    changesRequested: q.changesRequested.map((r) => r.id),
    reviewRequested: q.reviewRequested.map((r) => r.id),
    readyForDecision: q.readyForDecision.map((r) => r.id),
    readyForRelease: q.readyForRelease.map((r) => r.id),
  };
}

describe("GET /queue", () => {
  it("drops a changes-requested revision from the designer's list once a newer revision of the design exists", async () => {
    const { design, revision } = await createDesign(team, programId);
    await act("designer", revision.id, "submit");
    await act("reviewer", revision.id, "request_changes");
    expect((await queueOf(agentOf("designer"))).changesRequested).toContain(revision.id);
    // Another designer's queue never shows it.
    expect((await queueOf(agentOf("designer2"))).changesRequested).not.toContain(revision.id);
    const rev2 = await newRevision("designer", design.id);
    const q = await queueOf(agentOf("designer"));
    expect(q.changesRequested).not.toContain(revision.id);
    expect(q.changesRequested).not.toContain(rev2);
  });

  it("shows reviewers the latest revisions in review that they did not author", async () => {
    const both = await createMember(server, {
      roles: ["designer", "reviewer"],
      name: "Runa Falck",
      workspaceId: team.workspaceId,
    });
    const bothAgent = await signIn(server, both.email, both.password);
    const others = await createDesign(team, programId);
    await act("designer", others.revision.id, "submit");
    const own = await bothAgent
      .post(`${API}/programs/${programId}/designs`)
      .send({ name: "Own AR", stack: twoLayerAr() })
      .expect(201);
    const ownId = own.body.revision.id as string;
    await bothAgent.post(`${API}/revisions/${ownId}/transitions`).send({ action: "submit" }).expect(200);

    const q = await queueOf(bothAgent);
    expect(q.reviewRequested).toContain(others.revision.id);
    expect(q.reviewRequested).not.toContain(ownId);
    expect((await queueOf(agentOf("reviewer"))).reviewRequested).toEqual(
      expect.arrayContaining([others.revision.id, ownId]),
    );
    // A designer alone has no review list.
    expect((await queueOf(agentOf("designer"))).reviewRequested).toEqual([]);

    // Superseded: rev 1 still in review, rev 2 a draft; neither is waiting for a reviewer.
    await newRevision("designer", others.design.id);
    expect((await queueOf(agentOf("reviewer"))).reviewRequested).not.toContain(others.revision.id);
  });

  it("shows approvers revisions in review whose gate passes, and approved ones not yet superseded", async () => {
    const ready = await createDesign(team, programId);
    await act("designer", ready.revision.id, "submit");
    await verifiedRun(ready.revision.id);

    const noRun = await createDesign(team, programId);
    await act("designer", noRun.revision.id, "submit");

    const blocked = await createDesign(team, programId);
    await act("designer", blocked.revision.id, "submit");
    await verifiedRun(blocked.revision.id);
    await agentOf("reviewer")
      .post(`${API}/revisions/${blocked.revision.id}/threads`)
      .send({ anchor: { kind: "design" }, severity: "blocking", body: "Not yet." })
      .expect(201);

    const approved = await createDesign(team, programId);
    await act("designer", approved.revision.id, "submit");
    await verifiedRun(approved.revision.id);
    await act("approver", approved.revision.id, "approve");

    const q = await queueOf(agentOf("approver"));
    expect(q.readyForDecision).toContain(ready.revision.id);
    expect(q.readyForDecision).not.toContain(noRun.revision.id);
    expect(q.readyForDecision).not.toContain(blocked.revision.id);
    expect(q.readyForDecision).not.toContain(approved.revision.id);
    expect(q.readyForRelease).toContain(approved.revision.id);
    // Each entry agrees with the gate of that revision for the same approver.
    for (const id of [ready.revision.id, noRun.revision.id, blocked.revision.id]) {
      const gate = await agentOf("approver").get(`${API}/revisions/${id}/gate`).expect(200);
      expect(q.readyForDecision.includes(id), id).toBe(gate.body.canApprove);
    }
    // Reviewers and designers have no approver lists.
    const r = await queueOf(agentOf("reviewer"));
    expect(r.readyForDecision).toEqual([]);
    expect(r.readyForRelease).toEqual([]);

    // Once a newer revision exists, the old approved one is no longer waiting for release, nor the old ready one.
    await newRevision("designer", approved.design.id);
    await newRevision("designer", ready.design.id);
    const after = await queueOf(agentOf("approver"));
    expect(after.readyForRelease).not.toContain(approved.revision.id);
    expect(after.readyForDecision).not.toContain(ready.revision.id);
  });
});

describe("query count", () => {
  /** Number of SQL statements prepared while `fn` runs (every query Drizzle runs prepares one). */
  async function statements(fn: () => Promise<unknown>): Promise<number> {
    const client = server.ctx.db.$client;
    const original = client.prepare;
    let n = 0;
    client.prepare = function (this: typeof client, ...args: Parameters<typeof original>) {
      n += 1;
      return original.apply(this, args);
    } as typeof original;
    try {
      await fn();
    } finally {
      client.prepare = original;
    }
    return n;
  }

  async function addDesigns(count: number, pid: string) {
    for (let i = 0; i < count; i++) {
      const { revision } = await createDesign(team, pid);
      await act("designer", revision.id, "submit");
      await agentOf("reviewer")
        .post(`${API}/revisions/${revision.id}/threads`)
        .send({ anchor: { kind: "design" }, severity: i % 2 ? "blocking" : "advisory", body: "Check." })
        .expect(201);
    }
  }

  it("stays the same for /overview, /programs/:id and /queue with three times the designs", async () => {
    const pid = (await createProgram(team, { name: "Count program" })).id;
    await addDesigns(2, pid);
    const run = await startEvidenceRun(agentOf("designer"), (await createDesign(team, pid)).revision.id);
    await waitForRun(agentOf("designer"), run.id);
    const measure = async () => ({
      overview: await statements(() => agentOf("approver").get(`${API}/overview`).expect(200)),
      program: await statements(() => agentOf("approver").get(`${API}/programs/${pid}`).expect(200)),
      queue: await statements(() => agentOf("approver").get(`${API}/queue`).expect(200)),
      reviewerQueue: await statements(() => agentOf("reviewer").get(`${API}/queue`).expect(200)),
    });
    const small = await measure();
    await addDesigns(4, pid);
    const large = await measure();
    expect(large).toEqual(small);
    expect(small.overview).toBeGreaterThan(0);
  }, 60000);

  it("stays the same for a revision's yield runs with three times the runs", async () => {
    const { revision } = await createDesign(team, programId);
    const people: Who[] = ["designer", "designer2", "reviewer", "approver"];
    let k = 0;
    // Stored as queued and not handed to the job service: only the listing is measured.
    const add = (n: number) => {
      for (let i = 0; i < n; i++, k++) {
        server.ctx.db
          .insert(yieldRuns)
          .values({
            id: newId(),
            revisionId: revision.id,
            requestedBy: team.members[people[k % people.length] as Who].user.id,
            status: "queued",
            trials: 40,
            seed: `list-${k}`,
            errorModel: ERROR_MODEL,
            engineVersion: ENGINE_VERSION,
            createdAt: new Date(Date.now() + k),
          })
          .run();
      }
    };
    const measure = () =>
      statements(() => agentOf("approver").get(`${API}/revisions/${revision.id}/yield-runs`).expect(200));
    add(2);
    const small = await measure();
    add(4);
    const res = await agentOf("approver").get(`${API}/revisions/${revision.id}/yield-runs`).expect(200);
    expect(res.body.items).toHaveLength(6);
    expect(
      new Set(res.body.items.map((r: { requestedBy: { name: string } }) => r.requestedBy.name)).size,
    ).toBe(4);
    expect(await measure()).toBe(small);
  });

  it("stays the same for a revision's threads with three times the threads", async () => {
    const { revision } = await createDesign(team, programId);
    const open = async (n: number) => {
      for (let i = 0; i < n; i++) {
        const t = await agentOf("reviewer")
          .post(`${API}/revisions/${revision.id}/threads`)
          .send({ anchor: { kind: "design" }, severity: "advisory", body: `Point ${i}` })
          .expect(201);
        await agentOf("designer")
          .post(`${API}/threads/${t.body.id}/comments`)
          .send({ body: "Noted." })
          .expect(201);
      }
    };
    const measure = () =>
      statements(() => agentOf("approver").get(`${API}/revisions/${revision.id}/threads`).expect(200));
    await open(2);
    const small = await measure();
    await open(4);
    const res = await agentOf("approver").get(`${API}/revisions/${revision.id}/threads`).expect(200);
    expect(res.body.items).toHaveLength(6);
    for (const t of res.body.items as { comments: { body: string }[] }[]) {
      expect(t.comments.map((c) => c.body)).toEqual([expect.stringMatching(/^Point \d$/), "Noted."]);
    }
    expect(await measure()).toBe(small);
  });
});
