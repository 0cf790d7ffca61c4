// The release gate counts only the evidence run, made with the program's own error model: a verified run with a
// looser what-if error model does not satisfy `verified_yield`, neither as the newest run nor when named with ?yieldRunId.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestServer, type TestServer } from "../support/context.ts";
import {
  API,
  ERROR_MODEL,
  createDesign,
  createProgram,
  createTeam,
  startEvidenceRun,
  startRun,
  waitForRun,
  type Team,
} from "./fixtures.ts";

let server: TestServer;
let team: Team;

beforeAll(async () => {
  server = await createTestServer();
  team = await createTeam(server);
}, 60000);
afterAll(async () => {
  await server.close();
});

const yieldCheck = (body: { checks: { id: string; ok: boolean; message: string }[] }) =>
  body.checks.find((c) => c.id === "verified_yield");

describe("gate and error model", () => {
  it("does not accept a verified run made with another error model than the program's", async () => {
    // A program with a rough error model and a high target; a what-if run with a gentle model reaches the target.
    const rough = { thickness: { relativePct: 40, absoluteNm: 20, distribution: "normal" } };
    const program = await createProgram(team, { errorModel: rough, targetYield: 0.99 });
    const { revision } = await createDesign(team, program.id);
    const designer = team.members.designer.agent;
    const approver = team.members.approver.agent;
    await designer.post(`${API}/revisions/${revision.id}/transitions`).send({ action: "submit" }).expect(200);

    // What-if run with the fixtures' gentle 1 % model: verified by the server, and above the target.
    const whatIf = await startRun(designer, revision.id, { trials: 40, errorModel: ERROR_MODEL });
    const done = await waitForRun(designer, whatIf.id);
    expect(done).toMatchObject({ status: "done", verified: true });
    expect(done.result.yield).toBeGreaterThanOrEqual(0.99);

    const gate = await approver.get(`${API}/revisions/${revision.id}/gate`).expect(200);
    expect(gate.body.canApprove).toBe(false);
    expect(yieldCheck(gate.body)).toMatchObject({
      ok: false,
      message: expect.stringMatching(/No evidence run/),
    });
    const pinned = await approver
      .get(`${API}/revisions/${revision.id}/gate?yieldRunId=${whatIf.id}`)
      .expect(200);
    expect(yieldCheck(pinned.body)).toMatchObject({
      ok: false,
      message: expect.stringMatching(/what-if study/),
    });

    const refused = await approver
      .post(`${API}/revisions/${revision.id}/transitions`)
      .send({ action: "approve", yieldRunId: whatIf.id });
    expect(refused.status).toBe(422);
    expect(refused.body.error.code).toBe("gate_failed");
    const queue = await approver.get(`${API}/queue`).expect(200);
    expect(queue.body.readyForDecision.map((r: { id: string }) => r.id)).not.toContain(revision.id);
  });

  it("still accepts a run with the program's error model", async () => {
    const program = await createProgram(team);
    const { revision } = await createDesign(team, program.id);
    const designer = team.members.designer.agent;
    await designer.post(`${API}/revisions/${revision.id}/transitions`).send({ action: "submit" }).expect(200);
    const run = await startEvidenceRun(designer, revision.id);
    await waitForRun(designer, run.id);
    const gate = await team.members.approver.agent.get(`${API}/revisions/${revision.id}/gate`).expect(200);
    expect(yieldCheck(gate.body)?.ok).toBe(true);
  });
});
