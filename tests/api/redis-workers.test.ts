// Scale-out through Redis: the API (no local workers) hands a verified run's chunks to two worker processes through
// BullMQ; one worker is killed mid-run; its chunk is taken again by the other (stalled-job handling) and the result
// is identical to the one computed in one piece here.
import path from "node:path";
import { spawn, type ChildProcess } from "node:child_process";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { designFromQwots, mergeYieldChunks, runYieldChunk, type YieldStudy } from "@stackproof/optics";
import { DEMO, startProduct, type Product } from "../browser/support/harness.ts";
import { repoRoot } from "../browser/support/paths.ts";
import { startRedis, type RedisServer } from "./support/redis.ts";

let redis: RedisServer;
let product: Product;
let cookie = "";
const workers: { child: ChildProcess; log: string }[] = [];
const LOCK_MS = "2000";

function startWorker(url: string) {
  const w = {
    child: spawn(process.execPath, [path.join(repoRoot, "apps/api/dist/worker.js")], {
      env: {
        ...process.env,
        NODE_ENV: "production",
        REDIS_URL: url,
        LOG_LEVEL: "debug",
        WORKER_LOCK_MS: LOCK_MS,
      },
      stdio: ["ignore", "pipe", "pipe"],
    }),
    log: "",
  };
  w.child.stdout?.on("data", (d: Buffer) => (w.log += d.toString()));
  w.child.stderr?.on("data", (d: Buffer) => (w.log += d.toString()));
  workers.push(w);
  return w;
}

const chunksDone = (w: { log: string }) =>
  w.log.split("\n").filter((l) => l.includes('"task done"') && l.includes('"chunk"')).length;

async function api(p: string, init: RequestInit = {}) {
  return fetch(`${product.url}${p}`, {
    ...init,
    headers: {
      "Content-Type": "application/json",
      Origin: product.url,
      Cookie: cookie,
      ...(init.headers ?? {}),
    },
  });
}

beforeAll(async () => {
  redis = await startRedis();
  startWorker(redis.url);
  startWorker(redis.url);
  product = await startProduct({
    env: { REDIS_URL: redis.url, EMBEDDED_WORKERS: "0", WORKER_LOCK_MS: LOCK_MS, LOG_LEVEL: "warn" },
  });
  const res = await api("/api/v1/auth/sign-in", {
    method: "POST",
    body: JSON.stringify({ email: DEMO.designer, password: DEMO.password }),
  });
  expect(res.status).toBe(200);
  cookie = (res.headers.get("set-cookie") ?? "").split(";")[0] ?? "";
}, 120_000);

afterAll(async () => {
  for (const w of workers) if (w.child.exitCode === null) w.child.kill("SIGKILL");
  await product?.stop();
  await redis?.stop();
});

describe("verified runs on worker processes through Redis", () => {
  it("survives a worker killed mid-run with a result identical to one computed here", async () => {
    const programs = await (await api("/api/v1/programs")).json();
    const programId = (programs.items ?? programs)[0].id as string;
    const stack = designFromQwots({
      name: "Scale-out",
      referenceWavelength: 550,
      layers: Array.from({ length: 12 }, (_, i) => ({ material: i % 2 ? "MgF2" : "Al2O3", qwot: 1 })),
      substrate: { material: "boro-crown", thicknessMm: 1, backside: false },
    });
    // Nominal evaluation of the new revision goes through the workers too (the API has no threads of its own).
    const created = await api(`/api/v1/programs/${programId}/designs`, {
      method: "POST",
      body: JSON.stringify({ name: "Scale-out", stack, note: "redis" }),
    });
    expect(created.status, await created.clone().text()).toBe(201);
    const revision = (await created.json()).revision as {
      id: string;
      stack: YieldStudy["design"];
      specMask: YieldStudy["mask"];
    };

    const trials = 12_000;
    const started = await api(`/api/v1/revisions/${revision.id}/yield-runs`, {
      method: "POST",
      body: JSON.stringify({ trials, seed: "scale-out" }),
    });
    expect(started.status, await started.clone().text()).toBe(202);
    const runId = (await started.json()).run.id as string;

    // Kill the first worker once both have computed chunks of this run (it is then mid-chunk, or about to be).
    const [victim, survivor] = workers as [(typeof workers)[0], (typeof workers)[0]];
    const deadline = Date.now() + 60_000;
    while (chunksDone(victim) < 2 || chunksDone(survivor) < 2) {
      if (Date.now() > deadline)
        throw new Error(`workers did not both compute:\n${victim.log}\n${survivor.log}`);
      await new Promise((r) => setTimeout(r, 20));
    }
    victim.child.kill("SIGKILL");
    const killedAt = chunksDone(victim);

    let run: {
      status: string;
      result: unknown;
      progress: { done: number };
      error: string | null;
      errorModel: YieldStudy["errorModel"];
    };
    for (;;) {
      run = await (await api(`/api/v1/yield-runs/${runId}`)).json();
      if (run.status !== "queued" && run.status !== "running") break;
      if (Date.now() > deadline + 60_000) throw new Error(`run still ${run.status} at ${run.progress.done}`);
      await new Promise((r) => setTimeout(r, 100));
    }
    expect(run.error).toBeNull();
    expect(run.status).toBe("done");
    expect(chunksDone(survivor)).toBeGreaterThan(0);
    expect(killedAt).toBeGreaterThanOrEqual(2);

    const study: YieldStudy = {
      design: revision.stack,
      mask: revision.specMask,
      errorModel: run.errorModel,
      trials,
      seed: "scale-out",
    };
    const local = mergeYieldChunks(study, [runYieldChunk(study, 0, trials)]);
    expect(run.result).toEqual(JSON.parse(JSON.stringify(local)));
  }, 240_000);
});
