// The worker pool seen through the API: nominal evaluation off the request thread, fair sharing between runs,
// bounded cancellation, caps on runs, request ids.
import http from "node:http";
import type { AddressInfo } from "node:net";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestServer, type TestServer } from "../support/context.ts";
import {
  API,
  createDesign,
  createProgram,
  createTeam,
  startRun,
  waitForRun,
  type Team,
} from "../domain/fixtures.ts";
import { heavyMask, heavyStack } from "./heavy.ts";

let server: TestServer;
let team: Team;
let base: string;
let listener: http.Server;
let revisionId: string;
let heavyId: string;

beforeAll(async () => {
  server = await createTestServer({ YIELD_WORKERS: "1", MAX_ACTIVE_RUNS_PER_USER: "3" });
  team = await createTeam(server);
  const program = await createProgram(team);
  revisionId = (await createDesign(team, program.id)).revision.id;
  const heavyProgram = await createProgram(team, { name: "Heavy", specMask: heavyMask(8) });
  heavyId = (await createDesign(team, heavyProgram.id, heavyStack())).revision.id;
  listener = http.createServer(server.app).listen(0, "127.0.0.1");
  await new Promise((r) => listener.once("listening", r));
  base = `http://127.0.0.1:${(listener.address() as AddressInfo).port}`;
}, 120_000);
afterAll(async () => {
  await new Promise((r) => listener.close(r));
  await server.close();
});

describe("nominal evaluation on the pool", () => {
  it("/api/health answers within 100 ms while a heavy revision is evaluated", async () => {
    await fetch(`${base}/api/health`); // the first fetch in a process loads its HTTP client: not the server's time
    let heavyDone = false;
    const t0 = performance.now();
    const heavy = team.members.reviewer.agent.get(`${API}/revisions/${heavyId}`).then((res) => {
      heavyDone = true;
      return res;
    });
    const latencies: number[] = [];
    while (!heavyDone) {
      const t = performance.now();
      const res = await fetch(`${base}/api/health`);
      latencies.push(performance.now() - t);
      expect(res.status).toBe(200);
      await new Promise((r) => setTimeout(r, 20));
    }
    const res = await heavy;
    const heavyMs = performance.now() - t0;
    expect(res.status).toBe(200);
    expect(res.body.nominal.bands).toHaveLength(8);
    const sorted = [...latencies].sort((x, y) => x - y);
    const p90 = sorted[Math.floor(0.9 * (sorted.length - 1))] ?? Infinity;
    const max = sorted[sorted.length - 1] ?? Infinity;
    // Evaluated on the event loop, the whole evaluation would fall into one health check (and few checks would fit).
    // Off the loop, checks keep going at their 20 ms pace and answer within 100 ms. The machine this runs on may be
    // shared (load 15 on 2 cores when this was written), where a process is sometimes not scheduled for ~150 ms:
    // 100 ms is asserted for 90 % of checks and no check may take a third of the evaluation.
    expect(latencies.length).toBeGreaterThanOrEqual(5);
    expect(p90).toBeLessThan(100);
    expect(max).toBeLessThan(heavyMs / 3);
  }, 120_000);
});

describe("fair scheduling of verified runs", () => {
  it("a small run started behind a large one finishes first; a cancel stops the large one within its chunks in flight", async () => {
    const agent = team.members.designer.agent;
    const large = await startRun(agent, revisionId, { trials: 150_000, seed: "large" });
    const small = await startRun(agent, revisionId, { trials: 500, seed: "small" });
    const smallDone = await waitForRun(agent, small.id, 60_000);
    expect(smallDone.status).toBe("done");
    const mid = (await agent.get(`${API}/yield-runs/${large.id}`).expect(200)).body;
    expect(mid.status).toBe("running");
    expect(mid.progress.done).toBeLessThan(150_000);

    const cancelled = await agent.post(`${API}/yield-runs/${large.id}/cancel`).expect(200);
    expect(cancelled.body.status).toBe("cancelled");
    const atCancel = cancelled.body.progress.done as number;
    await server.ctx.jobs.settled(large.id);
    const after = (await agent.get(`${API}/yield-runs/${large.id}`).expect(200)).body;
    expect(after.status).toBe("cancelled");
    // Only chunks already in flight (one per slot, 250 trials each) may finish after the cancel.
    expect(after.progress.done - atCancel).toBeLessThanOrEqual(server.ctx.compute.slots * 250);
  }, 120_000);
});

describe("caps on runs", () => {
  it("refuses a member's fourth active run with 429 naming the cap; another member is not held back", async () => {
    const agent = team.members.designer.agent;
    const runs = [];
    for (let i = 0; i < 3; i++)
      runs.push(await startRun(agent, revisionId, { trials: 100_000, seed: `cap-${i}` }));
    const refused = await agent
      .post(`${API}/revisions/${revisionId}/yield-runs`)
      .send({ trials: 100, seed: "x" });
    expect(refused.status).toBe(429);
    expect(refused.body.error.code).toBe("run_cap");
    expect(refused.body.error.message).toContain("MAX_ACTIVE_RUNS_PER_USER");
    expect(refused.body.error.details).toMatchObject({ cap: "MAX_ACTIVE_RUNS_PER_USER", limit: 3 });
    const other = await startRun(team.members.designer2.agent, revisionId, { trials: 100, seed: "other" });
    // Cancelling one frees a place.
    await agent.post(`${API}/yield-runs/${runs[0]?.id}/cancel`).expect(200);
    const again = await startRun(agent, revisionId, { trials: 100, seed: "again" });
    for (const r of [...runs.slice(1), again])
      await agent.post(`${API}/yield-runs/${r.id}/cancel`).then(() => undefined);
    await waitForRun(team.members.designer2.agent, other.id, 60_000);
  }, 120_000);
});

describe("request ids", () => {
  it("echoes a caller's X-Request-Id and makes one when none (or an unusable one) is given", async () => {
    const given = await fetch(`${base}/api/health`, { headers: { "X-Request-Id": "trace-42.a" } });
    expect(given.headers.get("x-request-id")).toBe("trace-42.a");
    const made = await fetch(`${base}/api/health`);
    expect(made.headers.get("x-request-id")).toMatch(/^[0-9a-f-]{36}$/);
    const bad = await fetch(`${base}/api/health`, { headers: { "X-Request-Id": "a b\tc" } });
    expect(bad.headers.get("x-request-id")).toMatch(/^[0-9a-f-]{36}$/);
  });
});
