// Trials per second of a 20,000-trial verified run with 1, 2 and 4 worker processes through Redis (the API itself
// has no worker threads: EMBEDDED_WORKERS=0). Needs Debian's redis-server and the built server.
//   pnpm --filter @stackproof/api build && (cd apps/api && node --import tsx ../../tests/bench/redis-scale.ts)
import path from "node:path";
import { spawn, type ChildProcess } from "node:child_process";
import { designFromQwots } from "@stackproof/optics";
import { DEMO, startProduct } from "../browser/support/harness.ts";
import { repoRoot } from "../browser/support/paths.ts";
import { startRedis } from "../api/support/redis.ts";

const TRIALS = 20_000;
const redis = await startRedis();
const product = await startProduct({
  env: { REDIS_URL: redis.url, EMBEDDED_WORKERS: "0", LOG_LEVEL: "warn", MAX_ACTIVE_RUNS_PER_USER: "10" },
});
const workers: ChildProcess[] = [];
try {
  const headers = { "Content-Type": "application/json", Origin: product.url };
  const signIn = await fetch(`${product.url}/api/v1/auth/sign-in`, {
    method: "POST",
    headers,
    body: JSON.stringify({ email: DEMO.designer, password: DEMO.password }),
  });
  const auth = { ...headers, Cookie: (signIn.headers.get("set-cookie") ?? "").split(";")[0] ?? "" };
  const overview = await (await fetch(`${product.url}/api/v1/programs`, { headers: auth })).json();
  const programId = (overview.items ?? overview)[0].id as string;
  const rows: { workers: number; seconds: number; trialsPerSecond: number }[] = [];
  let created: Response | null = null;
  for (const n of [1, 2, 4]) {
    for (let i = 0; i < n; i++) {
      const w = spawn(process.execPath, [path.join(repoRoot, "apps/api/dist/worker.js")], {
        env: { ...process.env, NODE_ENV: "production", REDIS_URL: redis.url, LOG_LEVEL: "warn" },
        stdio: "ignore",
      });
      workers.push(w);
    }
    if (!created) {
      // the first revision's nominal evaluation also goes through the workers
      created = await fetch(`${product.url}/api/v1/programs/${programId}/designs`, {
        method: "POST",
        headers: auth,
        body: JSON.stringify({
          name: "Scale bench",
          note: "bench",
          stack: designFromQwots({
            name: "Scale bench",
            referenceWavelength: 550,
            layers: Array.from({ length: 24 }, (_, i) => ({ material: i % 2 ? "MgF2" : "Al2O3", qwot: 1 })),
            substrate: { material: "boro-crown", thicknessMm: 1, backside: false },
          }),
        }),
      });
    }
    const revisionId = (await created.clone().json()).revision.id as string;
    // warm-up run so that every worker has compiled the engine
    const go = async (trials: number, seed: string) => {
      const res = await fetch(`${product.url}/api/v1/revisions/${revisionId}/yield-runs`, {
        method: "POST",
        headers: auth,
        body: JSON.stringify({ trials, seed }),
      });
      const id = (await res.json()).run.id as string;
      for (;;) {
        const r = await (await fetch(`${product.url}/api/v1/yield-runs/${id}`, { headers: auth })).json();
        if (r.status === "done") return;
        if (r.status !== "queued" && r.status !== "running") throw new Error(`run ${r.status}: ${r.error}`);
        await new Promise((res2) => setTimeout(res2, 50));
      }
    };
    await go(500 * n * 4, `warm-${n}`);
    const t0 = performance.now();
    await go(TRIALS, `scale-${n}`);
    const seconds = (performance.now() - t0) / 1000;
    rows.push({
      workers: n,
      seconds: Number(seconds.toFixed(2)),
      trialsPerSecond: Math.round(TRIALS / seconds),
    });
    for (const w of workers.splice(0)) w.kill("SIGTERM");
    await new Promise((r) => setTimeout(r, 1000));
  }
  console.log(JSON.stringify({ trials: TRIALS, rows }, null, 2));
} finally {
  for (const w of workers) w.kill("SIGKILL");
  await product.stop();
  await redis.stop();
}
