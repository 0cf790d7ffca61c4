// Verified yield runs in worker threads: results, verification of browser results, cancellation, restarts.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import {
  mergeYieldChunks,
  runYieldChunk,
  type Design,
  type ErrorModel,
  type SpecMask,
  type YieldStudy,
} from "@stackproof/optics";
import { createApp } from "../../src/app.ts";
import { createContext } from "../../src/context.ts";
import { loadEnv } from "../../src/env.ts";
import { demoPrograms } from "../../src/demo/designs.ts";
import { createTestServer, type TestServer } from "../support/context.ts";
import { createMember, signIn } from "../support/auth.ts";
import {
  API,
  createDesign,
  createProgram,
  createTeam,
  ERROR_MODEL,
  startRun,
  waitForRun,
  type Team,
} from "./fixtures.ts";

let server: TestServer;
let team: Team;
let revisionId: string;
let stack: Design;
let mask: SpecMask;
beforeAll(async () => {
  server = await createTestServer();
  team = await createTeam(server);
  const program = await createProgram(team);
  const { revision } = await createDesign(team, program.id);
  revisionId = revision.id;
  const full = await team.members.reviewer.agent.get(`${API}/revisions/${revisionId}`).expect(200);
  stack = full.body.stack;
  mask = full.body.specMask;
});
afterAll(async () => {
  await server.close();
});

/** The same study computed here in one chunk: the server's chunked run must give identical numbers. */
function localResult(trials: number, seed: string, errorModel: ErrorModel = ERROR_MODEL) {
  const study: YieldStudy = { design: stack, mask, errorModel, trials, seed };
  return mergeYieldChunks(study, [runYieldChunk(study, 0, trials)]);
}

describe("server yield runs", () => {
  it("runs in a worker, reports progress, and stores a verified result", async () => {
    const run = await startRun(team.members.designer.agent, revisionId, { trials: 150, seed: "plain" });
    expect(run.status).toBe("queued");
    const done = await waitForRun(team.members.designer.agent, run.id);
    expect(done).toMatchObject({
      status: "done",
      verified: true,
      clientSubmitted: false,
      mismatch: null,
      progress: { done: 150, total: 150 },
    });
    const local = localResult(150, "plain");
    expect(done.result.passCount).toBe(local.passCount);
    expect(done.result.yield).toBe(local.yield);
    expect(done.result.interval).toEqual(local.interval);
    expect(done.result.bandFailures).toEqual(local.bandFailures);
    expect(done.result.marginHistogram.counts.reduce((a: number, b: number) => a + b, 0)).toBe(150);
    expect(done.result.envelopes.length).toBeGreaterThan(0);
    expect(done.result.criticalLayers).toHaveLength(1);
    expect(done.engineVersion).toBe(local.engineVersion);
    expect(done.finishedAt).not.toBeNull();
    const list = await team.members.reviewer.agent
      .get(`${API}/revisions/${revisionId}/yield-runs`)
      .expect(200);
    expect(list.body.items[0].id).toBe(run.id);
  });

  it("starts the evidence run (server-assigned seed, the program's minimum trials and error model) when none are given", async () => {
    const res = await team.members.reviewer.agent
      .post(`${API}/revisions/${revisionId}/yield-runs`)
      .send({})
      .expect(202);
    expect(res.body.run).toMatchObject({
      trials: 120,
      seed: expect.stringMatching(/^ev-[0-9a-f]{16}-m[0-9a-f]{8}$/),
      errorModel: ERROR_MODEL,
      kind: "evidence",
    });
    await waitForRun(team.members.reviewer.agent, res.body.run.id);
  });

  it("marks a matching browser result verified", async () => {
    const client = localResult(130, "browser-1");
    const run = await startRun(team.members.designer.agent, revisionId, {
      trials: 130,
      seed: "browser-1",
      clientResult: client,
    });
    const done = await waitForRun(team.members.designer.agent, run.id);
    expect(done).toMatchObject({ status: "done", verified: true, clientSubmitted: true, mismatch: null });
  });

  it("refuses to verify a result that does not match, saying why", async () => {
    const client = localResult(130, "browser-2");
    const forged = { ...client, passCount: client.passCount - 1, yield: (client.passCount - 1) / 130 };
    const run = await startRun(team.members.designer.agent, revisionId, {
      trials: 130,
      seed: "browser-2",
      clientResult: forged,
    });
    const done = await waitForRun(team.members.designer.agent, run.id);
    expect(done.verified).toBe(false);
    expect(done.mismatch).toContain(`pass count: client ${client.passCount - 1}, server ${client.passCount}`);
    expect(done.mismatch).toContain("yield");
    // a result computed with another seed does not verify a run with this seed
    const other = localResult(130, "some-other-seed");
    const run2 = await startRun(team.members.designer.agent, revisionId, {
      trials: 130,
      seed: "browser-3",
      clientResult: other,
    });
    const done2 = await waitForRun(team.members.designer.agent, run2.id);
    expect(done2.verified).toBe(false);
    expect(done2.mismatch).toContain("seed");
    // nor one with another error model
    const loose = localResult(130, "browser-4", {
      thickness: { relativePct: 2, absoluteNm: 0.5, distribution: "normal" },
    });
    const run3 = await startRun(team.members.designer.agent, revisionId, {
      trials: 130,
      seed: "browser-4",
      clientResult: loose,
    });
    expect((await waitForRun(team.members.designer.agent, run3.id)).mismatch).toContain("error model");
  });

  it("validates input (400), roles (403), ids (404) and sessions (401)", async () => {
    await team.members.designer.agent
      .post(`${API}/revisions/${revisionId}/yield-runs`)
      .send({ trials: 0 })
      .expect(400);
    await team.members.designer.agent
      .post(`${API}/revisions/${revisionId}/yield-runs`)
      .send({ trials: 10, clientResult: { yield: "high" } })
      .expect(400);
    await team.members.admin.agent
      .post(`${API}/revisions/${revisionId}/yield-runs`)
      .send({ trials: 10 })
      .expect(403);
    await team.members.designer.agent
      .post(`${API}/revisions/nope/yield-runs`)
      .send({ trials: 10 })
      .expect(404);
    await team.members.designer.agent.get(`${API}/yield-runs/nope`).expect(404);
    await team.members.designer.agent.get(`${API}/revisions/nope/yield-runs`).expect(404);
    await team.members.designer.agent.post(`${API}/yield-runs/nope/cancel`).expect(404);
    await request(server.app).get(`${API}/yield-runs/nope`).expect(401);
  });
});

describe("a pool of two workers", () => {
  it("gives the same result as one chunk computed here (chunking-independent merge)", async () => {
    const two = await createTestServer({ YIELD_WORKERS: "2" });
    try {
      expect(two.ctx.jobs.size).toBe(2);
      const crew = await createTeam(two);
      const program = await createProgram(crew);
      const { revision } = await createDesign(crew, program.id);
      const run = await startRun(crew.members.designer.agent, revision.id, { trials: 400, seed: "pool" });
      const done = await waitForRun(crew.members.designer.agent, run.id);
      const local = localResult(400, "pool");
      expect(done.status).toBe("done");
      expect(done.result.passCount).toBe(local.passCount);
      expect(done.result.bandFailures).toEqual(local.bandFailures);
      expect(done.result.marginHistogram).toEqual(local.marginHistogram);
      expect(done.result.criticalLayers).toEqual(local.criticalLayers);
    } finally {
      await two.close();
    }
  });
});

describe("cancellation", () => {
  it("cancels between chunks; only the requester or an approver may; a finished run is 409", async () => {
    const run = await startRun(team.members.designer.agent, revisionId, { trials: 150000, seed: "long" });
    await team.members.designer2.agent.post(`${API}/yield-runs/${run.id}/cancel`).expect(403);
    const cancelled = await team.members.designer.agent
      .post(`${API}/yield-runs/${run.id}/cancel`)
      .expect(200);
    expect(cancelled.body.status).toBe("cancelled");
    await team.members.designer.agent.post(`${API}/yield-runs/${run.id}/cancel`).expect(409);
    const later = await waitForRun(team.members.designer.agent, run.id);
    expect(later.status).toBe("cancelled");
    expect(later.result).toBeNull();
    expect(later.progress.done).toBeLessThan(150000);
    const other = await startRun(team.members.designer.agent, revisionId, { trials: 150000, seed: "long-2" });
    await team.members.approver.agent.post(`${API}/yield-runs/${other.id}/cancel`).expect(200);
    const small = await startRun(team.members.designer.agent, revisionId, { trials: 50, seed: "short" });
    await waitForRun(team.members.designer.agent, small.id);
    const late = await team.members.designer.agent.post(`${API}/yield-runs/${small.id}/cancel`).expect(409);
    expect(late.body.error.details.status).toBe("done");
  });
});

describe("restart during a run", () => {
  it("resumes a run left running by a closed process from its stored chunks, to the same result", async () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "stackproof-restart-"));
    const env = loadEnv({
      NODE_ENV: "test",
      DATA_DIR: dir,
      DEMO_DATA: "false",
      YIELD_WORKERS: "1",
      ALLOWED_ORIGINS: "http://stackproof.test",
    });
    try {
      const ctx1 = await createContext(env);
      const first = { ctx: ctx1, app: createApp(ctx1), dir, close: async () => {} };
      const designer = await createMember(first, { roles: ["designer"] });
      await createMember(first, {
        roles: ["approver"],
        workspaceId: designer.workspaceId,
        email: "pm@halvorsen-thinfilm.test",
        password: "pm-password-long",
      });
      const pm = await signIn(first, "pm@halvorsen-thinfilm.test", "pm-password-long");
      const agent = await signIn(first, designer.email, designer.password);
      // The demo's Kestrel bandpass (about 100 layers, f/2 cone and 0–10° field, optical-monitoring process model)
      // makes each 250-trial chunk take about a second, long enough to stop the process mid-run.
      const kestrel = demoPrograms().find((p) => p.key === "kestrel");
      const kStack = kestrel?.revisions[1]?.stack;
      if (!kestrel || !kStack) throw new Error("no demo design");
      const program = await pm
        .post(`${API}/programs`)
        .send({ name: "Restart", targetYield: 0.5, specMask: kestrel.mask, errorModel: kestrel.errorModel })
        .expect(201);
      const design = await agent
        .post(`${API}/programs/${program.body.id}/designs`)
        .send({ name: "K", stack: kStack })
        .expect(201);
      const trials = 1000; // four chunks: one stored, one in flight at the stop, two left for the next process
      const started = await agent
        .post(`${API}/revisions/${design.body.revision.id}/yield-runs`)
        .send({ trials, seed: "restart" })
        .expect(202);
      const runId: string = started.body.run.id;
      // wait until at least one chunk is stored but the run is not finished
      const deadline = Date.now() + 30000;
      let progress = 0;
      for (;;) {
        const r = await agent.get(`${API}/yield-runs/${runId}`).expect(200);
        progress = r.body.progress.done;
        if (progress > 0 || r.body.status === "done") break;
        if (Date.now() > deadline) throw new Error("no progress");
        await new Promise((res) => setTimeout(res, 20));
      }
      await ctx1.close();
      expect(progress).toBeGreaterThan(0);
      expect(progress).toBeLessThan(trials);

      const ctx2 = await createContext(env);
      try {
        expect(ctx2.jobs.recovered.resumed).toEqual([runId]);
        await ctx2.jobs.settled(runId);
        const second = { ctx: ctx2, app: createApp(ctx2), dir, close: async () => {} };
        const agent2 = await signIn(second, designer.email, designer.password);
        const done = await waitForRun(agent2, runId);
        expect(done).toMatchObject({
          status: "done",
          verified: true,
          progress: { done: trials, total: trials },
        });
        const study: YieldStudy = {
          design: design.body.revision.stack,
          mask: { ...kestrel.mask, protective: false },
          errorModel: kestrel.errorModel,
          trials,
          seed: "restart",
        };
        const local = mergeYieldChunks(study, [runYieldChunk(study, 0, trials)]);
        expect(done.result.passCount).toBe(local.passCount);
        expect(done.result.bandFailures).toEqual(local.bandFailures);
        expect(done.result.interval).toEqual(local.interval);
        const leftover = ctx2.db.$client
          .prepare("SELECT count(*) AS n FROM yield_chunks WHERE run_id = ?")
          .get(runId) as { n: number };
        expect(leftover.n).toBe(0);
      } finally {
        await ctx2.close();
      }

      // A run left by a process with another engine version is failed with the reason, not left running.
      const ctx3 = await createContext(env);
      ctx3.db.$client
        .prepare("UPDATE yield_runs SET status = 'running', engine_version = '0.0.0-old' WHERE id = ?")
        .run(runId);
      await ctx3.close();
      const ctx4 = await createContext(env);
      try {
        expect(ctx4.jobs.recovered.failed).toEqual([runId]);
        const row = ctx4.db.$client
          .prepare("SELECT status, error FROM yield_runs WHERE id = ?")
          .get(runId) as { status: string; error: string };
        expect(row.status).toBe("failed");
        expect(row.error).toContain("engine");
      } finally {
        await ctx4.close();
      }
    } finally {
      fs.rmSync(dir, { recursive: true, force: true });
    }
  }, 60000);
});
