// Browser Monte Carlo with a warm pool: 1 vs 2 Web Workers for 2,000- and 10,000-trial studies in Debian's
// chromium (playwright-core). Uses the built app's own yield worker (apps/web/dist/assets/yield.worker-*.js) with
// the chunking rule of apps/web/src/workers/pool.ts (≈ 8 chunks per worker, 25..2000 trials); the workers are
// created and warmed once (a 2,000-trial study each), as the page's pool is, then every study reuses them.
//   pnpm --filter @stackproof/web build && pnpm --filter @stackproof/api build && \
//   (cd apps/api && node --import tsx ../../tests/bench/browser-pool.ts [rounds])
import fs from "node:fs";
import path from "node:path";
import { benchStudy } from "../../packages/optics/bench/montecarlo.ts";
import { openBrowser, startProduct } from "../browser/support/harness.ts";
import { repoRoot } from "../browser/support/paths.ts";

const ROUNDS = Number(process.argv[2] ?? 3);
const asset = fs
  .readdirSync(path.join(repoRoot, "apps/web/dist/assets"))
  .find((f) => /^yield\.worker-.*\.js$/.test(f));
if (!asset) throw new Error("build the web app first (no yield worker in apps/web/dist/assets)");

const product = await startProduct({ demo: false, env: { LOG_LEVEL: "warn" } });
const browser = await openBrowser();
try {
  await browser.page.goto(product.url);
  await browser.page.evaluate("globalThis.__name = (f) => f"); // tsx keeps function names with a helper the page lacks
  const result = await browser.page.evaluate(
    async ({ workerUrl, studies, warmStudy, rounds }) => {
      // A minimal client of comlink's wire protocol (the page's bundle keeps comlink private).
      type Call = (method: string, ...args: unknown[]) => Promise<unknown>;
      const spawn = (): { call: Call; worker: Worker } => {
        const worker = new Worker(workerUrl, { type: "module" });
        const pending = new Map<string, (v: unknown) => void>();
        worker.addEventListener("message", (e: MessageEvent) => {
          const d = e.data as { id: string; type: string; value: unknown };
          pending.get(d.id)?.(
            d.type === "RAW" ? d.value : Promise.reject(new Error(JSON.stringify(d.value))),
          );
          pending.delete(d.id);
        });
        let n = 0;
        const call: Call = (method, ...args) =>
          new Promise((resolve) => {
            const id = `c${n++}`;
            pending.set(id, resolve);
            worker.postMessage({
              id,
              type: "APPLY",
              path: [method],
              argumentList: args.map((value) => ({ type: "RAW", value })),
            });
          });
        return { call, worker };
      };
      const pool = [spawn(), spawn()];
      let key = 1;
      const run = async (study: { trials: number }, n: number) => {
        const workers = pool.slice(0, n);
        const k = key++;
        const size = Math.max(25, Math.min(2000, Math.ceil(study.trials / (n * 8))));
        const tasks: [number, number][] = [];
        for (let s = 0; s < study.trials; s += size) tasks.push([s, Math.min(size, study.trials - s)]);
        const t0 = performance.now();
        await Promise.all(workers.map((w) => w.call("init", k, study)));
        let next = 0;
        await Promise.all(
          workers.map(async (w) => {
            while (next < tasks.length) {
              const [s, c] = tasks[next++] as [number, number];
              await w.call("runChunk", k, s, c);
            }
          }),
        );
        const ms = performance.now() - t0;
        await Promise.all(workers.map((w) => w.call("release", k)));
        return ms;
      };
      await run(warmStudy, 1);
      await Promise.all(
        pool.map(async (w) => {
          const k = key++;
          await w.call("init", k, warmStudy);
          await w.call("runChunk", k, 0, warmStudy.trials);
        }),
      );
      const out: Record<string, { one: number[]; two: number[] }> = {};
      for (const study of studies) {
        const row = { one: [] as number[], two: [] as number[] };
        for (let r = 0; r < rounds; r++) {
          row.one.push(await run(study, 1));
          row.two.push(await run(study, 2));
        }
        out[String(study.trials)] = row;
      }
      for (const w of pool) w.worker.terminate();
      return { out, cores: navigator.hardwareConcurrency };
    },
    {
      workerUrl: `/assets/${asset}`,
      studies: [benchStudy(2000), benchStudy(10000)],
      warmStudy: benchStudy(2000),
      rounds: ROUNDS,
    },
  );
  const rows = Object.entries(result.out).map(([trials, r]) => {
    const best = (xs: number[]) => Math.min(...xs);
    return {
      trials: Number(trials),
      oneWorkerMs: Math.round(best(r.one)),
      twoWorkersMs: Math.round(best(r.two)),
      speedup: Number((best(r.one) / best(r.two)).toFixed(2)),
      allRounds: { one: r.one.map(Math.round), two: r.two.map(Math.round) },
    };
  });
  console.log(JSON.stringify({ hardwareConcurrency: result.cores, rounds: ROUNDS, rows }, null, 2));
} finally {
  await browser.close();
  await product.stop();
}
