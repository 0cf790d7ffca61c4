// Review threads (anchors, carry-forward, mentions), the release gate, transitions, races, decisions and releases.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { PROTECTIVE_CAUTION } from "@stackproof/optics";
import { createTestServer, type TestServer } from "../support/context.ts";
import { createMember, signIn } from "../support/auth.ts";
import {
  API,
  AR_MASK,
  IMPOSSIBLE_MASK,
  createDesign,
  createProgram,
  createTeam,
  singleLayerAr,
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
});
afterAll(async () => {
  await server.close();
});

async function mails() {
  await server.ctx.mail.flush();
  return server.ctx.mail.outbox?.all() ?? [];
}

const transition = (
  agent: Team["members"]["designer"]["agent"],
  revisionId: string,
  action: string,
  extra: Record<string, unknown> = {},
) => agent.post(`${API}/revisions/${revisionId}/transitions`).send({ action, ...extra });

/** A design whose revision 1 is in review with a verified yield run above the program target. */
async function inReviewWithYield(programOverrides: Record<string, unknown> = {}) {
  const program = await createProgram(team, programOverrides);
  const { design, revision } = await createDesign(team, program.id);
  await transition(team.members.designer.agent, revision.id, "submit").expect(200);
  const run = await startEvidenceRun(team.members.designer.agent, revision.id);
  const done = await waitForRun(team.members.designer.agent, run.id);
  return { program, design, revision, run: done };
}

describe("review threads", () => {
  it("opens anchored threads, carries them forward, and evaluates the anchor on the requested revision", async () => {
    const program = await createProgram(team);
    const { design, revision: r1 } = await createDesign(team, program.id);
    const reviewer = team.members.reviewer.agent;
    const band = await reviewer
      .post(`${API}/revisions/${r1.id}/threads`)
      .send({
        anchor: { kind: "band", bandId: "avg" },
        severity: "blocking",
        body: "Average is close to the limit.",
      })
      .expect(201);
    expect(band.body).toMatchObject({
      revisionNumber: 1,
      severity: "blocking",
      status: "open",
      anchorPasses: true,
      author: { name: "Tobiah Renwick" },
    });
    await reviewer
      .post(`${API}/revisions/${r1.id}/threads`)
      .send({
        anchor: { kind: "range", start: 540, stop: 560 },
        severity: "advisory",
        body: "Check the centre.",
      })
      .expect(201);
    await reviewer
      .post(`${API}/revisions/${r1.id}/threads`)
      .send({
        anchor: { kind: "range", start: 700, stop: 800 },
        severity: "advisory",
        body: "Outside every band.",
      })
      .expect(201);
    await reviewer
      .post(`${API}/revisions/${r1.id}/threads`)
      .send({ anchor: { kind: "layer", index: 0 }, severity: "advisory", body: "Critical layer." })
      .expect(201);
    await team.members.designer.agent
      .post(`${API}/revisions/${r1.id}/threads`)
      .send({ anchor: { kind: "design" }, severity: "advisory", body: "Note to self." })
      .expect(201);

    // Revision 2: same stack, tighter mask (average ≤ 1 %) that the single layer fails.
    const tight = { bands: AR_MASK.bands.map((b) => (b.id === "avg" ? { ...b, value: 1 } : b)) };
    const r2 = await team.members.designer.agent
      .post(`${API}/designs/${design.id}/revisions`)
      .send({ baseRevisionId: r1.id, stack: singleLayerAr(), specMask: tight })
      .expect(201);
    expect(r2.body.nominal.pass).toBe(false);
    const later = await reviewer
      .post(`${API}/revisions/${r2.body.id}/threads`)
      .send({ anchor: { kind: "design" }, severity: "advisory", body: "On rev 2 only." })
      .expect(201);

    const onR2 = await reviewer.get(`${API}/revisions/${r2.body.id}/threads`).expect(200);
    const byBody = (items: { comments: { body: string }[] }[], text: string) =>
      items.find((t) => t.comments[0]?.body === text) as
        { anchorPasses: boolean | null; revisionNumber: number } | undefined;
    expect(onR2.body.items).toHaveLength(6);
    expect(byBody(onR2.body.items, "Average is close to the limit.")).toMatchObject({
      revisionNumber: 1,
      anchorPasses: false,
    });
    expect(byBody(onR2.body.items, "Check the centre.")?.anchorPasses).toBe(false);
    expect(byBody(onR2.body.items, "Outside every band.")?.anchorPasses).toBeNull();
    expect(byBody(onR2.body.items, "Critical layer.")?.anchorPasses).toBeNull();
    expect(byBody(onR2.body.items, "Note to self.")?.anchorPasses).toBe(false);
    const onR1 = await reviewer.get(`${API}/revisions/${r1.id}/threads`).expect(200);
    expect(onR1.body.items).toHaveLength(5);
    expect(onR1.body.items.map((t: { id: string }) => t.id)).not.toContain(later.body.id);
    expect(byBody(onR1.body.items, "Average is close to the limit.")?.anchorPasses).toBe(true);
    expect(byBody(onR1.body.items, "Check the centre.")?.anchorPasses).toBe(true);
    expect(byBody(onR1.body.items, "Note to self.")?.anchorPasses).toBe(true);

    // the blocking thread from rev 1 counts against rev 2
    const gate = await team.members.approver.agent.get(`${API}/revisions/${r2.body.id}/gate`).expect(200);
    expect(gate.body.checks.find((c: { id: string }) => c.id === "blocking_threads")).toMatchObject({
      ok: false,
    });
  });

  it("refuses anchors the revision does not have (422), bad bodies (400), admins alone (403), unknown ids (404)", async () => {
    const program = await createProgram(team);
    const { revision } = await createDesign(team, program.id);
    const reviewer = team.members.reviewer.agent;
    const noBand = await reviewer
      .post(`${API}/revisions/${revision.id}/threads`)
      .send({ anchor: { kind: "band", bandId: "nope" }, severity: "blocking", body: "x" })
      .expect(422);
    expect(noBand.body.error.code).toBe("unknown_anchor");
    await reviewer
      .post(`${API}/revisions/${revision.id}/threads`)
      .send({ anchor: { kind: "layer", index: 5 }, severity: "blocking", body: "x" })
      .expect(422);
    await reviewer
      .post(`${API}/revisions/${revision.id}/threads`)
      .send({ anchor: { kind: "range", start: 600, stop: 500 }, severity: "blocking", body: "x" })
      .expect(400);
    await reviewer
      .post(`${API}/revisions/${revision.id}/threads`)
      .send({ anchor: { kind: "design" }, severity: "urgent", body: "x" })
      .expect(400);
    await reviewer
      .post(`${API}/revisions/${revision.id}/threads`)
      .send({ anchor: { kind: "design" }, severity: "advisory", body: "   " })
      .expect(400);
    await team.members.admin.agent
      .post(`${API}/revisions/${revision.id}/threads`)
      .send({ anchor: { kind: "design" }, severity: "advisory", body: "x" })
      .expect(403);
    await reviewer
      .post(`${API}/revisions/nope/threads`)
      .send({ anchor: { kind: "design" }, severity: "advisory", body: "x" })
      .expect(404);
    await reviewer.get(`${API}/revisions/nope/threads`).expect(404);
    await reviewer.post(`${API}/threads/nope/comments`).send({ body: "x" }).expect(404);
    await reviewer.post(`${API}/threads/nope/resolve`).send({}).expect(404);
    await request(server.app).get(`${API}/revisions/${revision.id}/threads`).expect(401);
    const t = await reviewer
      .post(`${API}/revisions/${revision.id}/threads`)
      .send({ anchor: { kind: "design" }, severity: "advisory", body: "x" })
      .expect(201);
    await team.members.admin.agent
      .post(`${API}/threads/${t.body.id}/comments`)
      .send({ body: "admins do not review" })
      .expect(403);
  });

  it("mails members mentioned by e-mail, full name or unique first name", async () => {
    const program = await createProgram(team, { name: "Mentions" });
    const { revision } = await createDesign(team, program.id);
    const thread = await team.members.reviewer.agent
      .post(`${API}/revisions/${revision.id}/threads`)
      .send({
        anchor: { kind: "design" },
        severity: "advisory",
        body: `@Ilse Varga please check. cc @${team.members.approver.email}.`,
      })
      .expect(201);
    expect(thread.body.comments[0].mentions.map((m: { name: string }) => m.name).sort()).toEqual([
      "Ilse Varga",
      "Sunniva Achterberg",
    ]);
    const reply = await team.members.designer.agent
      .post(`${API}/threads/${thread.body.id}/comments`)
      .send({ body: "Done, @Tobiah. And @nobody-here" })
      .expect(201);
    expect(reply.body.comments).toHaveLength(2);
    expect(reply.body.comments[1].mentions).toEqual([
      { id: team.members.reviewer.user.id, name: "Tobiah Renwick" },
    ]);
    const sent = await mails();
    const mentionMails = sent.filter((m) => m.subject.includes("mentioned you"));
    expect(mentionMails.map((m) => m.to)).toEqual(
      expect.arrayContaining([
        team.members.designer.email,
        team.members.approver.email,
        team.members.reviewer.email,
      ]),
    );
    const toIlse = mentionMails.find((m) => m.to === team.members.designer.email);
    expect(toIlse?.text).toContain("please check");
    expect(toIlse?.text).toContain(`/revisions/${revision.id}`);
  });

  it("resolves and reopens (reviewer, approver or the thread's author); 409 when already in that state", async () => {
    const program = await createProgram(team);
    const { revision } = await createDesign(team, program.id);
    const t = await team.members.designer.agent
      .post(`${API}/revisions/${revision.id}/threads`)
      .send({ anchor: { kind: "design" }, severity: "blocking", body: "mine" })
      .expect(201);
    await team.members.designer2.agent.post(`${API}/threads/${t.body.id}/resolve`).send({}).expect(403);
    const resolved = await team.members.designer.agent
      .post(`${API}/threads/${t.body.id}/resolve`)
      .send({ note: "fixed" })
      .expect(200);
    expect(resolved.body).toMatchObject({ status: "resolved", resolvedBy: { name: "Ilse Varga" } });
    expect(resolved.body.comments).toHaveLength(2);
    await team.members.reviewer.agent.post(`${API}/threads/${t.body.id}/resolve`).send({}).expect(409);
    const reopened = await team.members.reviewer.agent
      .post(`${API}/threads/${t.body.id}/reopen`)
      .send({})
      .expect(200);
    expect(reopened.body).toMatchObject({ status: "open", resolvedBy: null });
    await team.members.approver.agent.post(`${API}/threads/${t.body.id}/reopen`).send({}).expect(409);
    await team.members.approver.agent.post(`${API}/threads/${t.body.id}/resolve`).send({}).expect(200);
  });
});

describe("release gate and transitions", () => {
  it("names every failed check in the 422 and approves once they pass", async () => {
    const program = await createProgram(team);
    const { revision } = await createDesign(team, program.id);
    const approver = team.members.approver.agent;
    const early = await transition(approver, revision.id, "approve").expect(409);
    expect(early.body.error.details.status).toBe("draft");
    await transition(team.members.designer.agent, revision.id, "submit").expect(200);
    await transition(team.members.designer.agent, revision.id, "submit").expect(409);
    const thread = await team.members.reviewer.agent
      .post(`${API}/revisions/${revision.id}/threads`)
      .send({ anchor: { kind: "band", bandId: "peak" }, severity: "blocking", body: "Show me the yield." })
      .expect(201);
    const refused = await transition(approver, revision.id, "approve").expect(422);
    expect(refused.body.error.code).toBe("gate_failed");
    expect(refused.body.error.details.checks.map((c: { id: string }) => c.id)).toEqual([
      "verified_yield",
      "blocking_threads",
    ]);
    expect(refused.body.error.message).toContain("No evidence run");
    const gate = await approver.get(`${API}/revisions/${revision.id}/gate`).expect(200);
    expect(gate.body).toMatchObject({ canApprove: false, canRelease: false, yieldRunId: null });
    expect(gate.body.checks.map((c: { id: string; ok: boolean }) => [c.id, c.ok])).toEqual([
      ["verified_yield", false],
      ["spec_deviation", true],
      ["blocking_threads", false],
      ["independent_approver", true],
      ["state", true],
    ]);
    const run = await startEvidenceRun(team.members.designer.agent, revision.id);
    const done = await waitForRun(team.members.designer.agent, run.id);
    expect(done.result.yield).toBeGreaterThanOrEqual(0.8);
    const stillBlocked = await transition(approver, revision.id, "approve").expect(422);
    expect(stillBlocked.body.error.details.checks.map((c: { id: string }) => c.id)).toEqual([
      "blocking_threads",
    ]);
    await team.members.reviewer.agent.post(`${API}/threads/${thread.body.id}/resolve`).send({}).expect(200);
    const forReviewer = await team.members.reviewer.agent
      .get(`${API}/revisions/${revision.id}/gate`)
      .expect(200);
    expect(forReviewer.body.checks.find((c: { id: string }) => c.id === "independent_approver").ok).toBe(
      false,
    );
    await transition(team.members.reviewer.agent, revision.id, "approve").expect(403);
    const ok = await transition(approver, revision.id, "approve", { note: "Good margins." }).expect(200);
    expect(ok.body.revision.status).toBe("approved");
    expect(ok.body.decision).toMatchObject({
      action: "approve",
      fromStatus: "in_review",
      toStatus: "approved",
      yieldRunId: run.id,
      note: "Good margins.",
      revisionHash: revision.hash,
    });
    const mail = (await mails()).find(
      (m) =>
        m.subject === "Approved: AR window rev 1" &&
        m.to === team.members.designer.email &&
        m.text.includes(revision.id),
    );
    expect(mail).toBeTruthy();
  });

  it("refuses a yield run below target, an unverified run, and an approver who authored the revision", async () => {
    const low = await inReviewWithYield({ specMask: IMPOSSIBLE_MASK });
    expect(low.run.result.yield).toBe(0);
    const res = await transition(team.members.approver.agent, low.revision.id, "approve").expect(422);
    expect(res.body.error.details.checks[0]).toMatchObject({ id: "verified_yield" });
    expect(res.body.error.details.checks[0].message).toContain("below the target");

    const { revision } = await inReviewWithYield();
    const forged = await startRun(team.members.designer.agent, revision.id, {
      trials: 100,
      seed: "forged",
      clientResult: {
        trials: 100,
        seed: "forged",
        passCount: 3,
        yield: 0.03,
        interval: { low: 0, high: 0.1 },
        bandFailures: [],
        errorModel: { thickness: { relativePct: 1, absoluteNm: 0.5, distribution: "normal" } },
      },
    });
    const forgedDone = await waitForRun(team.members.designer.agent, forged.id);
    expect(forgedDone.verified).toBe(false);
    const pinned = await transition(team.members.approver.agent, revision.id, "approve", {
      yieldRunId: forged.id,
    }).expect(422);
    expect(pinned.body.error.details.checks[0].message).toContain("what-if study");

    // a member who is both designer and approver cannot approve their own revision
    const both = await createMember(server, {
      roles: ["designer", "approver"],
      name: "Dual Role",
      workspaceId: team.workspaceId,
    });
    const dual = await signIn(server, both.email, both.password);
    const program = await createProgram(team);
    const own = await dual
      .post(`${API}/programs/${program.id}/designs`)
      .send({ name: "Own", stack: singleLayerAr() })
      .expect(201);
    await transition(dual, own.body.revision.id, "submit").expect(200);
    const ownRun = await startEvidenceRun(dual, own.body.revision.id);
    await waitForRun(dual, ownRun.id);
    const self = await transition(dual, own.body.revision.id, "approve").expect(422);
    expect(self.body.error.details.checks.map((c: { id: string }) => c.id)).toEqual(["independent_approver"]);
  });

  it("lets exactly one of two racing approvals win (the other gets 409)", async () => {
    const { revision } = await inReviewWithYield();
    const [a, b] = await Promise.all([
      transition(team.members.approver.agent, revision.id, "approve"),
      transition(team.members.approver2.agent, revision.id, "approve"),
    ]);
    expect([a.status, b.status].sort()).toEqual([200, 409]);
    const decisions = await team.members.reviewer.agent
      .get(`${API}/revisions/${revision.id}/decisions`)
      .expect(200);
    expect(decisions.body.items.filter((d: { action: string }) => d.action === "approve")).toHaveLength(1);
  });

  it("sends changes back, resubmits, and keeps the decisions immutable", async () => {
    const program = await createProgram(team);
    const { revision } = await createDesign(team, program.id);
    await transition(team.members.designer.agent, revision.id, "request_changes").expect(403);
    await transition(team.members.reviewer.agent, revision.id, "request_changes").expect(409);
    await transition(team.members.designer.agent, revision.id, "submit", { note: "please review" }).expect(
      200,
    );
    const reviewMail = (await mails()).find(
      (m) =>
        m.to === team.members.reviewer.email &&
        m.subject.startsWith("Review requested") &&
        m.text.includes(revision.id),
    );
    expect(reviewMail?.text).toContain("please review");
    await transition(team.members.reviewer.agent, revision.id, "request_changes", {
      note: "More margin",
    }).expect(200);
    const changesMail = (await mails()).find(
      (m) =>
        m.to === team.members.designer.email &&
        m.subject.startsWith("Changes requested") &&
        m.text.includes(revision.id),
    );
    expect(changesMail?.text).toContain("More margin");
    await transition(team.members.designer.agent, revision.id, "submit").expect(200);
    const list = await team.members.reviewer.agent
      .get(`${API}/revisions/${revision.id}/decisions`)
      .expect(200);
    expect(
      list.body.items.map((d: { action: string; actor: { name: string } }) => [d.action, d.actor.name]),
    ).toEqual([
      ["submit", "Ilse Varga"],
      ["request_changes", "Tobiah Renwick"],
      ["submit", "Ilse Varga"],
    ]);
    const sqlite = server.ctx.db.$client;
    expect(() =>
      sqlite.prepare("UPDATE decisions SET note = 'edited' WHERE revision_id = ?").run(revision.id),
    ).toThrow(/immutable/);
    expect(() => sqlite.prepare("DELETE FROM decisions WHERE revision_id = ?").run(revision.id)).toThrow(
      /immutable/,
    );
    const audit = sqlite
      .prepare("SELECT action FROM audit_log WHERE subject_id = ? ORDER BY at")
      .all(revision.id) as { action: string }[];
    expect(audit.map((a) => a.action)).toEqual([
      "revision.submitted",
      "revision.changes_requested",
      "revision.submitted",
    ]);
    await team.members.reviewer.agent.get(`${API}/revisions/nope/decisions`).expect(404);
    await team.members.approver.agent
      .post(`${API}/revisions/nope/transitions`)
      .send({ action: "approve" })
      .expect(404);
    await team.members.approver.agent
      .post(`${API}/revisions/${revision.id}/transitions`)
      .send({ action: "publish" })
      .expect(400);
    await request(server.app)
      .post(`${API}/revisions/${revision.id}/transitions`)
      .send({ action: "submit" })
      .expect(401);
  });

  it("withdraws: the author for a draft, not another designer; an approver even after release", async () => {
    const program = await createProgram(team);
    const { revision } = await createDesign(team, program.id);
    await transition(team.members.designer2.agent, revision.id, "withdraw").expect(403);
    await transition(team.members.reviewer.agent, revision.id, "withdraw").expect(403);
    const w = await transition(team.members.designer.agent, revision.id, "withdraw").expect(200);
    expect(w.body.revision.status).toBe("withdrawn");
    await transition(team.members.approver.agent, revision.id, "withdraw").expect(409);
  });
});

describe("release records", () => {
  it("releases an approved revision with a JSON record and a printable page with the protective caution", async () => {
    const { revision, run } = await inReviewWithYield({ name: "Shield program", protective: true });
    const approver = team.members.approver.agent;
    await transition(approver, revision.id, "release").expect(409);
    await transition(approver, revision.id, "approve").expect(200);
    await transition(team.members.designer.agent, revision.id, "release").expect(403);
    const released = await transition(approver, revision.id, "release", { note: "Lot 7" }).expect(200);
    expect(released.body.revision.status).toBe("released");
    const releaseId: string = released.body.releaseId;
    expect(releaseId).toBeTruthy();

    const record = await team.members.reviewer.agent.get(`${API}/releases/${releaseId}`).expect(200);
    expect(record.body).toMatchObject({
      id: releaseId,
      status: "released",
      program: { name: "Shield program", protective: true, targetYield: 0.8 },
      design: { name: "AR window" },
      revision: { id: revision.id, number: 1, hash: revision.hash },
      yieldRun: { id: run.id, trials: 120, seed: run.seed, verified: true },
      caution: PROTECTIVE_CAUTION,
      releasedBy: { name: "Sunniva Achterberg" },
    });
    expect(record.body.decisions.map((d: { action: string }) => d.action)).toEqual([
      "submit",
      "approve",
      "release",
    ]);
    expect(record.body.revision.stack.layers).toHaveLength(1);

    const print = await team.members.reviewer.agent.get(`${API}/releases/${releaseId}/print`).expect(200);
    expect(print.headers["content-type"]).toMatch(/text\/html/);
    expect(print.text).toContain("<!doctype html>");
    expect(print.text).toContain(revision.hash);
    expect(print.text).toContain("not a certification");
    expect(print.text).toContain("qualified people");
    expect(print.text).not.toMatch(/<script|<link|src="http/);

    const list = await team.members.designer.agent.get(`${API}/releases`).expect(200);
    expect(list.body.items.find((r: { id: string }) => r.id === releaseId)).toMatchObject({
      status: "released",
      program: { protective: true },
    });
    const releaseMail = (await mails()).find(
      (m) => m.to === team.members.designer.email && m.subject === "Released: AR window rev 1",
    );
    expect(releaseMail?.text).toContain("not a certification");

    // an approver may withdraw a released revision; the record then says so
    await transition(approver, revision.id, "withdraw", { note: "Field returns" }).expect(200);
    const after = await team.members.reviewer.agent.get(`${API}/releases/${releaseId}`).expect(200);
    expect(after.body.status).toBe("withdrawn");
    const printAfter = await team.members.reviewer.agent
      .get(`${API}/releases/${releaseId}/print`)
      .expect(200);
    expect(printAfter.text).toContain("withdrawn");
  });

  it("has no caution for a program that is not protective; 404 for unknown ids; 401 without a session", async () => {
    const { revision } = await inReviewWithYield();
    await transition(team.members.approver.agent, revision.id, "approve").expect(200);
    const released = await transition(team.members.approver.agent, revision.id, "release").expect(200);
    const record = await team.members.reviewer.agent
      .get(`${API}/releases/${released.body.releaseId}`)
      .expect(200);
    expect(record.body.caution).toBeNull();
    const print = await team.members.reviewer.agent
      .get(`${API}/releases/${released.body.releaseId}/print`)
      .expect(200);
    expect(print.text).not.toContain("not a certification");
    await team.members.reviewer.agent.get(`${API}/releases/nope`).expect(404);
    await team.members.reviewer.agent.get(`${API}/releases/nope/print`).expect(404);
    await request(server.app).get(`${API}/releases`).expect(401);
    const page = await team.members.reviewer.agent.get(`${API}/releases?limit=1`).expect(200);
    expect(page.body.items).toHaveLength(1);
    expect(page.body.nextCursor).not.toBeNull();
  });
});
