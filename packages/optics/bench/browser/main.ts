// Browser benchmark: the Monte Carlo study of bench/spec-conditions.ts in N module Web Workers, chunks of 250
// handed out on demand. Result in window.__bench. Open index.html?trials=10000&workers=2.
const params = new URLSearchParams(location.search);
const trials = Number(params.get("trials") ?? 10000);
const workers = Number(params.get("workers") ?? 2);

async function run(pool: Worker[], total: number): Promise<{ seconds: number; pass: number }> {
  let next = 0;
  let pass = 0;
  const t0 = performance.now();
  await Promise.all(
    pool.map(
      (w) =>
        new Promise<void>((resolve) => {
          const send = () => {
            if (next >= total) return resolve();
            const start = next;
            const count = Math.min(250, total - start);
            next += count;
            w.postMessage({ trials: total, start, count });
          };
          w.onmessage = (e: MessageEvent<{ passCount: number }>) => {
            pass += e.data.passCount;
            send();
          };
          send();
        }),
    ),
  );
  const seconds = (performance.now() - t0) / 1000;
  return { seconds, pass };
}

(async () => {
  const pool = Array.from({ length: workers }, () => new Worker(new URL("./worker.ts", import.meta.url), { type: "module" }));
  await run(pool, Math.min(500, trials)); // warm-up: JIT in every worker (the timed run includes compiling the study)
  const r = await run(pool, trials);
  pool.forEach((w) => w.terminate());
  (globalThis as unknown as { __bench: unknown }).__bench = { trials, workers, seconds: Number(r.seconds.toFixed(2)), yield: r.pass / trials };
})();
