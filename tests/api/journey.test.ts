// The whole review journey over HTTP against createApp, in the demo workspace, with the demo accounts:
// designer → evidence run (server-assigned seed) verified from a browser-style result → review thread and changes requested → revision 2 →
// reviewer resolves → approver checks the gate, approves, releases → release record and its printable page.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import {
  designFromQwots,
  mergeYieldChunks,
  planChunks,
  runYieldChunk,
  type YieldStudy,
} from "@stackproof/optics";
import { createApp, createContext, loadEnv, type AppContext } from "@stackproof/api";
import { loadDemoData, type DemoSummary } from "../../apps/api/src/demo/index.ts";

const HOST = "stackproof.test";
const ORIGIN = `http://${HOST}`;
const API = "/api/v1";
const PASSWORD = "demo-quartz-lantern";

let ctx: AppContext;
let demo: DemoSummary | null;
let app: ReturnType<typeof createApp>;
let dir: string;

async function signIn(email: string) {
  const agent = request.agent(app).host(HOST).set("Origin", ORIGIN);
  const res = await agent.post(`${API}/auth/sign-in`).send({ email, password: PASSWORD });
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  return agent;
}

async function waitForRun(agent: ReturnType<typeof request.agent>, id: string) {
  const deadline = Date.now() + 60000;
  for (;;) {
    const res = await agent.get(`${API}/yield-runs/${id}`).expect(200);
    if (res.body.status !== "queued" && res.body.status !== "running") return res.body;
    if (Date.now() > deadline) throw new Error(`run ${id} is still ${res.body.status}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

beforeAll(async () => {
  dir = fs.mkdtempSync(path.join(os.tmpdir(), "stackproof-journey-"));
  const env = loadEnv({
    NODE_ENV: "test",
    DATA_DIR: dir,
    DEMO_DATA: "true",
    YIELD_WORKERS: "1",
    PUBLIC_URL: ORIGIN,
  });
  ctx = await createContext(env);
  // As the entry point (apps/api/src/index.ts) does.
  demo = await loadDemoData(env, ctx.db);
  app = createApp(ctx);
});
afterAll(async () => {
  await ctx?.close();
  fs.rmSync(dir, { recursive: true, force: true });
});

describe("review journey", () => {
  it("loads the demo workspace with a release, open threads and a revision ready for decision", async () => {
    expect(demo).toMatchObject({ programs: 4, releases: 1 });
    const approver = await signIn("approver@halvorsen.example");
    const overview = await approver.get(`${API}/overview`).expect(200);
    expect(overview.body.items).toHaveLength(4);
    expect(overview.body.items.some((r: { openBlockingThreads: number }) => r.openBlockingThreads > 0)).toBe(
      true,
    );
    const queue = await approver.get(`${API}/queue`).expect(200);
    expect(queue.body.readyForDecision.map((r: { designName: string }) => r.designName)).toContain(
      "Kestrel receiver bandpass",
    );
    const releases = await approver.get(`${API}/releases`).expect(200);
    expect(releases.body.items).toHaveLength(1);
    const programs = await approver.get(`${API}/programs`).expect(200);
    expect(programs.body.items.filter((p: { protective: boolean }) => p.protective)).toHaveLength(1);
  });

  it("takes a new design from draft to a printed release record", async () => {
    const designer = await signIn("designer@halvorsen.example");
    const reviewer = await signIn("reviewer@halvorsen.example");
    const approver = await signIn("approver@halvorsen.example");
    const admin = await signIn("admin@halvorsen.example");

    // The quality lead (administrator) sets up a program: visible AR on a lens, average R ≤ 1 % over 450–650 nm.
    // Whoever sets a program's rules may not sign off against them, so the program manager does not create it.
    const mask = {
      bands: [
        {
          id: "visible",
          label: "Visible average",
          start: 450,
          stop: 650,
          step: 5,
          quantity: "R",
          polarization: "u",
          angleDeg: 0,
          requirement: "avgMax",
          value: 1,
        },
      ],
    };
    const errorModel = { thickness: { relativePct: 1, absoluteNm: 0.3, distribution: "normal" } };
    const program = await admin
      .post(`${API}/programs`)
      .send({
        name: "Pipit lens — visible AR",
        customer: "Pipit optics",
        targetYield: 0.9,
        minEvidenceTrials: 400,
        specMask: mask,
        errorModel,
        studyDefaults: { trials: 200, seed: "pipit" },
      })
      .expect(201);

    // Revision 1: a single MgF2 quarter wave (about 1.3 % at 550 nm, Macleod single-layer AR) fails the average.
    const single = designFromQwots({
      name: "Pipit AR",
      referenceWavelength: 550,
      layers: [{ material: "MgF2", qwot: 1 }],
      substrate: { material: "boro-crown", thicknessMm: 3, backside: false },
    });
    const created = await designer
      .post(`${API}/programs/${program.body.id}/designs`)
      .send({ name: "Pipit AR", stack: single, note: "single layer" })
      .expect(201);
    const r1 = created.body.revision;
    expect(r1.nominal.pass).toBe(false);
    await designer.post(`${API}/revisions/${r1.id}/transitions`).send({ action: "submit" }).expect(200);
    const thread = await reviewer
      .post(`${API}/revisions/${r1.id}/threads`)
      .send({
        anchor: { kind: "band", bandId: "visible" },
        severity: "blocking",
        body: "@Ilse Varga the visible average fails; use a quarter-half-quarter design.",
      })
      .expect(201);
    expect(thread.body.anchorPasses).toBe(false);
    await reviewer
      .post(`${API}/revisions/${r1.id}/transitions`)
      .send({ action: "request_changes", note: "See the blocking thread." })
      .expect(200);

    // Revision 2: quarter-half-quarter Al2O3 / ZrO2 / MgF2 (Macleod, three-layer AR).
    const qhq = designFromQwots({
      name: "Pipit AR",
      referenceWavelength: 530,
      layers: [
        { material: "Al2O3", qwot: 1 },
        { material: "ZrO2", qwot: 2 },
        { material: "MgF2", qwot: 1 },
      ],
      substrate: { material: "boro-crown", thicknessMm: 3, backside: false },
    });
    const r2 = await designer
      .post(`${API}/designs/${created.body.design.id}/revisions`)
      .send({ baseRevisionId: r1.id, stack: qhq, note: "QHQ" })
      .expect(201);
    expect(r2.body.number).toBe(2);
    expect(r2.body.nominal.pass).toBe(true);
    const diff = await reviewer.get(`${API}/revisions/${r2.body.id}/diff?against=${r1.id}`).expect(200);
    expect(diff.body.added).toHaveLength(2);

    // The browser computes the evidence study with the server-assigned seed and trials and submits its result;
    // the server runs the same study and verifies it.
    const plan = (await designer.get(`${API}/revisions/${r2.body.id}/evidence`).expect(200)).body.plan;
    expect(plan).toMatchObject({ trials: 400, programVersion: 1, seed: expect.stringMatching(/^ev-/) });
    const study: YieldStudy = {
      design: r2.body.stack,
      mask: r2.body.specMask,
      errorModel: errorModel as YieldStudy["errorModel"],
      trials: plan.trials,
      seed: plan.seed,
    };
    const browser = mergeYieldChunks(
      study,
      planChunks(plan.trials, 64).map(([s, n]) => runYieldChunk(study, s, n)),
    );
    const started = await designer
      .post(`${API}/revisions/${r2.body.id}/yield-runs`)
      .send({ trials: plan.trials, seed: plan.seed, clientResult: browser })
      .expect(202);
    expect(started.body.run.kind).toBe("evidence");
    const run = await waitForRun(designer, started.body.run.id);
    expect(run).toMatchObject({ status: "done", verified: true, clientSubmitted: true });
    expect(run.result.yield).toBeGreaterThanOrEqual(0.9);
    await designer
      .post(`${API}/revisions/${r2.body.id}/transitions`)
      .send({ action: "submit", note: "QHQ, verified yield attached" })
      .expect(200);

    // The thread from revision 1 carries forward and now passes; until resolved it blocks approval.
    const threads = await reviewer.get(`${API}/revisions/${r2.body.id}/threads`).expect(200);
    expect(threads.body.items).toHaveLength(1);
    expect(threads.body.items[0]).toMatchObject({ revisionNumber: 1, status: "open", anchorPasses: true });
    const blocked = await approver
      .post(`${API}/revisions/${r2.body.id}/transitions`)
      .send({ action: "approve" })
      .expect(422);
    expect(blocked.body.error.details.checks.map((c: { id: string }) => c.id)).toEqual(["blocking_threads"]);
    await reviewer
      .post(`${API}/threads/${thread.body.id}/resolve`)
      .send({ note: "Passes on rev 2." })
      .expect(200);

    const gate = await approver.get(`${API}/revisions/${r2.body.id}/gate`).expect(200);
    expect(gate.body).toMatchObject({ canApprove: true, yieldRunId: run.id });
    await approver
      .post(`${API}/revisions/${r2.body.id}/transitions`)
      .send({ action: "approve", note: "Verified yield above target." })
      .expect(200);
    const released = await approver
      .post(`${API}/revisions/${r2.body.id}/transitions`)
      .send({ action: "release", note: "First lot." })
      .expect(200);
    expect(released.body.revision.status).toBe("released");

    const record = await reviewer.get(`${API}/releases/${released.body.releaseId}`).expect(200);
    expect(record.body).toMatchObject({
      status: "released",
      revision: { number: 2, hash: r2.body.hash },
      yieldRun: { id: run.id, verified: true, clientVerified: true, trials: 400, seed: plan.seed },
      evidence: {
        kind: "evidence",
        programVersion: 1,
        figures: { pass: true, trials: 400, confidence: 0.95 },
      },
      threads: { total: 1, open: 0, resolved: 1 },
      caution: null,
    });
    expect(
      record.body.decisions.map(
        (d: { action: string; actor: { name: string } }) => `${d.action}:${d.actor.name}`,
      ),
    ).toEqual(["submit:Ilse Varga", "approve:Sunniva Achterberg", "release:Sunniva Achterberg"]);
    const print = await reviewer.get(`${API}/releases/${released.body.releaseId}/print`).expect(200);
    expect(print.text).toContain("Release record — Pipit AR rev 2");
    expect(print.text).toContain(r2.body.hash);

    // Mails went out along the way (capture mode).
    await ctx.mail.flush();
    const subjects = (ctx.mail.outbox?.all() ?? []).map((m) => `${m.to} ${m.subject}`);
    expect(subjects).toEqual(
      expect.arrayContaining([
        expect.stringMatching(/^reviewer@halvorsen\.example Review requested: Pipit AR rev 1/),
        expect.stringMatching(/^designer@halvorsen\.example .*mentioned you/),
        "designer@halvorsen.example Changes requested on Pipit AR rev 1",
        "designer@halvorsen.example Approved: Pipit AR rev 2",
        "designer@halvorsen.example Released: Pipit AR rev 2",
      ]),
    );
    const audit = await approver.get(`${API}/audit?limit=200`).expect(200);
    const actions = audit.body.items.map((a: { action: string }) => a.action);
    expect(actions).toEqual(
      expect.arrayContaining([
        "revision.approved",
        "revision.released",
        "thread.resolved",
        "yield_run.evidence_started",
        "yield_run.finished",
      ]),
    );
  });
});
