// Attacks on the rules a revision is judged by, each of which passed the gate before program versions and spec
// deviations existed: a loosened copy of the program's mask, a deviation accepted by its own author, lowering the
// target and then signing off (or creating the program with a low one), and changing the program between sign-off and release. Also: the audit entry of a
// program change holds the old and new values, and every stored release renders as a page and as a PDF.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestServer, type TestServer } from "../../apps/api/test/support/context.ts";
import { createMember, signIn } from "../../apps/api/test/support/auth.ts";
import { createTeam, type Team } from "../../apps/api/test/domain/fixtures.ts";
import {
  API,
  MEDIUM,
  act,
  avgMask,
  check,
  evidenceRun,
  gateOf,
  newDesign,
  newProgram,
} from "./evidence-support.ts";

let server: TestServer;
let team: Team;
beforeAll(async () => {
  server = await createTestServer();
  team = await createTeam(server);
});
afterAll(async () => {
  await server?.close();
});

function auditRows(subjectId: string) {
  return server.ctx.db.$client
    .prepare(
      "SELECT action, actor_id AS actorId, data FROM audit_log WHERE subject_id = ? ORDER BY at, rowid",
    )
    .all(subjectId) as { action: string; actorId: string | null; data: string | null }[];
}

describe("spec deviations", () => {
  it("fails the gate for a revision that carries a loosened copy of the program's mask until someone else accepts it", async () => {
    // Honest yield about 16 % against the program's mask; the designer's copy loosens the limit from 1.30 to 2 %.
    const program = await newProgram(team, {});
    const revision = await newDesign(team, program.id, avgMask(2));
    const designer = team.members.designer.agent;
    await act(designer, revision.id, "submit").expect(200);
    const run = await evidenceRun(designer, revision.id);
    expect(run.result.yield).toBe(1);

    const gate = await gateOf(team.members.approver.agent, revision.id);
    expect(gate.evidence.figures?.pass).toBe(true);
    expect(gate.deviation).toMatchObject({ required: true, accepted: false, current: null });
    expect(check(gate, "spec_deviation")).toMatchObject({
      ok: false,
      message: expect.stringMatching(/avg changed/),
    });
    const refused = await act(team.members.approver.agent, revision.id, "approve").expect(422);
    expect(refused.body.error.details.checks.map((c: { id: string }) => c.id)).toEqual(["spec_deviation"]);

    // The revision and the comparison say so too.
    const view = await team.members.reviewer.agent.get(`${API}/revisions/${revision.id}`).expect(200);
    expect(view.body.specDeviation).toMatchObject({
      required: true,
      status: null,
      bands: [{ id: "avg", change: "changed" }],
    });

    // A deviation needs a written reason; the designer asks, and cannot accept it (not an approver, and its author).
    await designer.post(`${API}/revisions/${revision.id}/deviations`).send({ reason: "" }).expect(400);
    const asked = await designer
      .post(`${API}/revisions/${revision.id}/deviations`)
      .send({ reason: "Customer agreed by phone to 2 % average for the prototype lot." })
      .expect(201);
    expect(asked.body).toMatchObject({ status: "pending", requestedBy: { name: "Ilse Varga" } });
    await designer
      .post(`${API}/revisions/${revision.id}/deviations`)
      .send({ reason: "Second try at the same thing." })
      .expect(409);
    await designer
      .post(`${API}/revisions/${revision.id}/deviations/${asked.body.id}/decision`)
      .send({ accept: true })
      .expect(403);
    const pending = await gateOf(team.members.approver.agent, revision.id);
    expect(check(pending, "spec_deviation")).toMatchObject({
      ok: false,
      message: expect.stringMatching(/awaits acceptance/),
    });

    const accepted = await team.members.approver2.agent
      .post(`${API}/revisions/${revision.id}/deviations/${asked.body.id}/decision`)
      .send({ accept: true, note: "Prototype lot only." })
      .expect(200);
    expect(accepted.body).toMatchObject({
      status: "accepted",
      decidedBy: { name: "Edvin Moss" },
      decidedAt: expect.any(String),
    });
    const ok = await gateOf(team.members.approver.agent, revision.id);
    expect(check(ok, "spec_deviation")).toMatchObject({
      ok: true,
      message: expect.stringMatching(/accepted by Edvin Moss/),
    });
    expect(ok.canApprove).toBe(true);
    await act(team.members.approver.agent, revision.id, "approve").expect(200);
    const released = await act(team.members.approver.agent, revision.id, "release").expect(200);
    const record = await team.members.reviewer.agent
      .get(`${API}/releases/${released.body.releaseId}`)
      .expect(200);
    expect(record.body.deviation).toMatchObject({
      required: true,
      current: {
        status: "accepted",
        reason: expect.stringContaining("2 % average"),
        decidedBy: { name: "Edvin Moss" },
      },
    });
    const print = await team.members.reviewer.agent
      .get(`${API}/releases/${released.body.releaseId}/print`)
      .expect(200);
    expect(print.text).toContain("Spec deviations");
    expect(print.text).toContain("Customer agreed by phone");
  });

  it("refuses a deviation accepted by its own author, even one holding the approver role", async () => {
    const dual = await createMember(server, {
      roles: ["designer", "approver"],
      name: "Dana Dual",
      workspaceId: team.workspaceId,
    });
    const dualAgent = await signIn(server, dual.email, dual.password);
    const program = await newProgram(team, {});
    // The revision is by the designer; the deviation is asked for by the dual-role member.
    const revision = await newDesign(team, program.id, avgMask(2));
    const asked = await dualAgent
      .post(`${API}/revisions/${revision.id}/deviations`)
      .send({ reason: "Loosened for a trial build, to be confirmed." })
      .expect(201);
    const self = await dualAgent
      .post(`${API}/revisions/${revision.id}/deviations/${asked.body.id}/decision`)
      .send({ accept: true })
      .expect(403);
    expect(self.body.error.message).toMatch(/someone else/);
    // The revision's author may not accept it either (here: a dual-role author of their own revision).
    const own = await newDesign(team, program.id, avgMask(2), {
      ...dual,
      agent: dualAgent,
    } as Team["members"]["designer"]);
    const askedOwn = await team.members.designer.agent
      .post(`${API}/revisions/${own.id}/deviations`)
      .send({ reason: "Asked for by a colleague on the author's behalf." })
      .expect(201);
    await dualAgent
      .post(`${API}/revisions/${own.id}/deviations/${askedOwn.body.id}/decision`)
      .send({ accept: true })
      .expect(403);
    const gate = await gateOf(team.members.approver.agent, revision.id);
    expect(gate.deviation.accepted).toBe(false);
  });
});

describe("program versions", () => {
  it("keeps whoever lowered the target from signing off against that version, and audits old and new values", async () => {
    const program = await newProgram(team, {});
    const revision = await newDesign(team, program.id);
    const designer = team.members.designer.agent;
    await act(designer, revision.id, "submit").expect(200);
    const run = await evidenceRun(designer, revision.id);
    expect(run.result.yield).toBeLessThan(0.3);
    await act(team.members.approver.agent, revision.id, "approve").expect(422);

    // The approver lowers the target to 5 %, below the evidence run's bound, and tries to approve.
    const patched = await team.members.approver.agent
      .patch(`${API}/programs/${program.id}`)
      .send({ targetYield: 0.05, note: "Relaxed for the pilot." })
      .expect(200);
    expect(patched.body).toMatchObject({ version: 2, targetYield: 0.05 });
    const own = await gateOf(team.members.approver.agent, revision.id);
    expect(own.evidence.figures?.pass).toBe(true);
    expect(check(own, "independent_approver")).toMatchObject({
      ok: false,
      message: expect.stringMatching(/You set the target yield/),
    });
    const refused = await act(team.members.approver.agent, revision.id, "approve").expect(422);
    expect(refused.body.error.details.checks.map((c: { id: string }) => c.id)).toEqual([
      "independent_approver",
    ]);

    // The audit entry says from what to what; the versions list keeps both.
    const entry = auditRows(program.id).find((a) => a.action === "program.updated");
    expect(entry?.actorId).toBe(team.members.approver.user.id);
    expect(JSON.parse(entry?.data ?? "{}")).toMatchObject({
      before: { targetYield: 0.9 },
      after: { targetYield: 0.05 },
      fromVersion: 1,
      version: 2,
    });
    const versions = await team.members.reviewer.agent
      .get(`${API}/programs/${program.id}/versions`)
      .expect(200);
    expect(versions.body.items).toHaveLength(2);
    expect(versions.body.items[1]).toMatchObject({
      version: 2,
      targetYield: 0.05,
      changes: { targetYield: { before: 0.9, after: 0.05 } },
      changedBy: { id: team.members.approver.user.id },
      note: "Relaxed for the pilot.",
    });
    // A change of a text field is audited but makes no new version.
    await team.members.approver.agent
      .patch(`${API}/programs/${program.id}`)
      .send({ description: "pilot" })
      .expect(200);
    expect(
      (await team.members.reviewer.agent.get(`${API}/programs/${program.id}`).expect(200)).body.version,
    ).toBe(2);

    // Another approver, who did not set the rules, may sign off; the decision records the version.
    const ok = await act(team.members.approver2.agent, revision.id, "approve").expect(200);
    expect(ok.body.decision).toMatchObject({ action: "approve", programVersion: 2 });
  });

  it("keeps an approver who created a program with a low target from signing off against it (creating sets every rule of version 1)", async () => {
    const program = await newProgram(team, { targetYield: 0.05 }, team.members.approver);
    const revision = await newDesign(team, program.id);
    const designer = team.members.designer.agent;
    await act(designer, revision.id, "submit").expect(200);
    await evidenceRun(designer, revision.id);
    const own = await gateOf(team.members.approver.agent, revision.id);
    expect(own.evidence.figures?.pass).toBe(true);
    expect(check(own, "independent_approver")).toMatchObject({
      ok: false,
      message: expect.stringMatching(/You set the .*target yield.* of program version 1/),
    });
    const refused = await act(team.members.approver.agent, revision.id, "approve").expect(422);
    expect(refused.body.error.details.checks.map((c: { id: string }) => c.id)).toEqual([
      "independent_approver",
    ]);
    // Someone who set none of the rules may sign off.
    await act(team.members.approver2.agent, revision.id, "approve").expect(200);
  });

  it("sends an approved revision back to review when the program changes before release, and refuses the release", async () => {
    const program = await newProgram(team, {
      specMask: avgMask(2),
      errorModel: MEDIUM,
      targetYield: 0.8,
      minEvidenceTrials: 150,
    });
    const revision = await newDesign(team, program.id);
    const designer = team.members.designer.agent;
    await act(designer, revision.id, "submit").expect(200);
    await evidenceRun(designer, revision.id);
    await act(team.members.approver.agent, revision.id, "approve").expect(200);

    // approver2 raises the minimum trials (a new version) between sign-off and release.
    await team.members.approver2.agent
      .patch(`${API}/programs/${program.id}`)
      .send({ minEvidenceTrials: 400 })
      .expect(200);
    const release = await act(team.members.approver.agent, revision.id, "release");
    expect(release.status).toBe(409);
    const view = await designer.get(`${API}/revisions/${revision.id}`).expect(200);
    expect(view.body.status).toBe("in_review");
    const decisions = await designer.get(`${API}/revisions/${revision.id}/decisions`).expect(200);
    expect(
      decisions.body.items.map((d: { action: string; programVersion: number | null }) => [
        d.action,
        d.programVersion,
      ]),
    ).toEqual([
      ["submit", 1],
      ["approve", 1],
      ["return_to_review", 2],
    ]);
    expect(decisions.body.items[2].note).toMatch(/minimum evidence trials 150 → 400/);

    // The old evidence run (150 trials) no longer meets the rules; a new one is needed, then a new sign-off.
    const gate = await gateOf(team.members.approver.agent, revision.id);
    expect(check(gate, "verified_yield")?.message).toMatch(/No evidence run .* 400 trials/);
    await evidenceRun(designer, revision.id);
    await act(team.members.approver.agent, revision.id, "approve").expect(200);
    const released = await act(team.members.approver.agent, revision.id, "release").expect(200);
    expect(released.body.decision.programVersion).toBe(2);
  });

  it("refuses a release whose approval was made against another program version (direct check)", async () => {
    const program = await newProgram(team, {
      specMask: avgMask(2),
      errorModel: MEDIUM,
      targetYield: 0.8,
      minEvidenceTrials: 120,
    });
    const revision = await newDesign(team, program.id);
    await act(team.members.designer.agent, revision.id, "submit").expect(200);
    await evidenceRun(team.members.designer.agent, revision.id);
    await act(team.members.approver.agent, revision.id, "approve").expect(200);
    // The version moves without the usual path (as a stored change from elsewhere would): the release still checks it.
    server.ctx.db.$client.prepare("UPDATE programs SET version = version + 1 WHERE id = ?").run(program.id);
    const res = await act(team.members.approver.agent, revision.id, "release").expect(409);
    expect(res.body.error).toMatchObject({ code: "program_changed" });
  });
});

describe("release record", () => {
  it("files the evidence, the plot and the decisions, downloads as a PDF, and renders an older stored release", async () => {
    const program = await newProgram(team, {
      specMask: avgMask(2),
      errorModel: MEDIUM,
      targetYield: 0.8,
      minEvidenceTrials: 150,
    });
    const revision = await newDesign(team, program.id);
    await act(team.members.designer.agent, revision.id, "submit").expect(200);
    const run = await evidenceRun(team.members.designer.agent, revision.id);
    await act(team.members.approver.agent, revision.id, "approve").expect(200);
    const released = await act(team.members.approver.agent, revision.id, "release").expect(200);
    const id = released.body.releaseId as string;
    const record = await team.members.reviewer.agent.get(`${API}/releases/${id}`).expect(200);
    expect(record.body.evidence).toMatchObject({
      kind: "evidence",
      programVersion: 1,
      seedRule: expect.stringContaining("content hash"),
      figures: { trials: 150, confidence: 0.95, targetYield: 0.8, pass: true },
    });
    expect(record.body.yieldRun).toMatchObject({
      id: run.id,
      seed: run.seed,
      engineVersion: expect.any(String),
    });
    expect(record.body.plot).toHaveLength(1);
    const plot = record.body.plot[0];
    expect(plot).toMatchObject({ quantity: "R", polarization: "u", angleDeg: 0, lowP: 5, highP: 95 });
    expect(plot.nominal).toHaveLength(plot.wavelengths.length);
    // The envelope brackets its own median and sits around the nominal curve (5th ≤ 95th percentile everywhere).
    plot.low.forEach((lo: number, i: number) => expect(lo).toBeLessThanOrEqual(plot.high[i]));
    const list = await team.members.reviewer.agent.get(`${API}/releases`).expect(200);
    expect(list.body.items.find((r: { id: string }) => r.id === id).yield).toMatchObject({
      trials: 150,
      confidence: 0.95,
    });

    const print = await team.members.reviewer.agent.get(`${API}/releases/${id}/print`).expect(200);
    expect(print.text).toContain("Lower bound");
    expect(print.text).toContain("<svg");
    const pdf = await team.members.reviewer.agent
      .get(`${API}/releases/${id}/pdf`)
      .buffer(true)
      .parse((res, cb) => {
        const parts: Buffer[] = [];
        res.on("data", (c: Buffer) => parts.push(c));
        res.on("end", () => cb(null, Buffer.concat(parts)));
      })
      .expect(200);
    expect(pdf.headers["content-type"]).toBe("application/pdf");
    expect(pdf.headers["content-disposition"]).toMatch(/attachment; filename="release-AR-window-rev1\.pdf"/);
    const bytes = pdf.body as Buffer;
    expect(bytes.subarray(0, 5).toString("latin1")).toBe("%PDF-");
    expect(bytes.length).toBeGreaterThan(3000);
    expect(bytes.subarray(-6).toString("latin1")).toMatch(/%%EOF/);

    // A release stored before evidence rules (no evidence, deviation or plot; a non-finite margin stored as null)
    // still renders as a page and as a PDF.
    const sqlite = server.ctx.db.$client;
    const stored = sqlite.prepare("SELECT snapshot FROM releases WHERE id = ?").get(id) as {
      snapshot: string;
    };
    const old = JSON.parse(stored.snapshot) as Record<string, unknown>;
    delete old.evidence;
    delete old.deviation;
    delete old.plot;
    (old.nominal as { bands: { margin: number | null }[] }).bands[0]!.margin = null;
    (old.yieldRun as { yield: number | null }).yield = null;
    sqlite.prepare("UPDATE releases SET snapshot = ? WHERE id = ?").run(JSON.stringify(old), id);
    const oldPrint = await team.members.reviewer.agent.get(`${API}/releases/${id}/print`).expect(200);
    expect(oldPrint.text).toContain("Released before evidence rules were recorded");
    const oldPdf = await team.members.reviewer.agent.get(`${API}/releases/${id}/pdf`).expect(200);
    expect(oldPdf.headers["content-type"]).toBe("application/pdf");
    // Even a snapshot reduced to nothing renders.
    sqlite.prepare("UPDATE releases SET snapshot = '{}' WHERE id = ?").run(id);
    await team.members.reviewer.agent.get(`${API}/releases/${id}/print`).expect(200);
    await team.members.reviewer.agent.get(`${API}/releases/${id}/pdf`).expect(200);
    await team.members.reviewer.agent.get(`${API}/releases/${id}`).expect(200);
  });
});
