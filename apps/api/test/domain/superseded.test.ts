// A revision superseded by a newer revision of its design cannot be submitted, approved or released (409
// `superseded`, nothing changes); the gate says so; withdrawing it and working on the latest revision still work.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestServer, type TestServer } from "../support/context.ts";
import {
  API,
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
  programId = (await createProgram(team, { studyDefaults: { trials: 40, seed: "sup" } })).id;
}, 60000);
afterAll(async () => {
  await server.close();
});

type Who = keyof Team["members"];
const transition = (who: Who, revisionId: string, action: string) =>
  team.members[who].agent.post(`${API}/revisions/${revisionId}/transitions`).send({ action });

async function ok(who: Who, revisionId: string, action: string) {
  const res = await transition(who, revisionId, action);
  expect(res.status, `${action}: ${JSON.stringify(res.body)}`).toBe(200);
}

async function verifiedRun(revisionId: string) {
  const run = await startEvidenceRun(team.members.designer.agent, revisionId);
  expect(await waitForRun(team.members.designer.agent, run.id)).toMatchObject({ verified: true });
}

async function addRevision(designId: string): Promise<string> {
  const baseRevisionId = await latestRevisionId(team.members.designer.agent, designId);
  const res = await team.members.designer.agent
    .post(`${API}/designs/${designId}/revisions`)
    .send({ baseRevisionId, stack: twoLayerAr(), note: "rev 2" })
    .expect(201);
  return res.body.id as string;
}

const statusOf = async (id: string) =>
  (await team.members.approver.agent.get(`${API}/revisions/${id}`).expect(200)).body.status as string;

describe("superseded revisions", () => {
  it("cannot be approved once a newer revision exists; the gate says why", async () => {
    const { design, revision } = await createDesign(team, programId);
    await ok("designer", revision.id, "submit");
    await verifiedRun(revision.id);
    const before = await team.members.approver.agent.get(`${API}/revisions/${revision.id}/gate`).expect(200);
    expect(before.body.canApprove).toBe(true);

    await addRevision(design.id);
    const gate = await team.members.approver.agent.get(`${API}/revisions/${revision.id}/gate`).expect(200);
    expect(gate.body.canApprove).toBe(false);
    expect(gate.body.checks.find((c: { id: string }) => c.id === "state")).toMatchObject({
      ok: false,
      message: expect.stringMatching(/superseded by revision 2/),
    });
    const res = await transition("approver", revision.id, "approve");
    expect(res.status).toBe(409);
    expect(res.body.error).toMatchObject({ code: "superseded", details: { latestNumber: 2 } });
    expect(await statusOf(revision.id)).toBe("in_review");
    const decisions = await team.members.approver.agent
      .get(`${API}/revisions/${revision.id}/decisions`)
      .expect(200);
    expect(decisions.body.items.map((d: { action: string }) => d.action)).toEqual(["submit"]);

    // Withdrawing the old one still works.
    await ok("designer", revision.id, "withdraw");
  });

  it("cannot be submitted again after changes were requested once a newer revision exists", async () => {
    const { design, revision } = await createDesign(team, programId);
    await ok("designer", revision.id, "submit");
    await ok("reviewer", revision.id, "request_changes");
    const rev2 = await addRevision(design.id);
    const res = await transition("designer", revision.id, "submit");
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe("superseded");
    expect(await statusOf(revision.id)).toBe("changes_requested");
    // The latest revision goes its own way.
    await ok("designer", rev2, "submit");
  });

  it("cannot be released once a newer revision exists", async () => {
    const { design, revision } = await createDesign(team, programId);
    await ok("designer", revision.id, "submit");
    await verifiedRun(revision.id);
    await ok("approver", revision.id, "approve");
    await addRevision(design.id);
    const gate = await team.members.approver.agent.get(`${API}/revisions/${revision.id}/gate`).expect(200);
    expect(gate.body.canRelease).toBe(false);
    const res = await transition("approver", revision.id, "release");
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe("superseded");
    expect(await statusOf(revision.id)).toBe("approved");
    const releases = await team.members.approver.agent.get(`${API}/releases`).expect(200);
    expect(releases.body.items).toEqual([]);
    await ok("approver", revision.id, "withdraw");
  });
});
