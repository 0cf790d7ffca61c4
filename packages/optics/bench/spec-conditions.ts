// Monte Carlo with customer conditions: a 31-layer two-cavity bandpass whose mask has an f/2 cone band
// and a 0–10° angle-range band. Trials per second in process and in the Node worker pool.
// Run: `pnpm exec tsx bench/spec-conditions.ts [trials] [indexErrors 0|1]` (this package).
import { pathToFileURL } from "node:url";
import { createYieldPool } from "../src/cli/node-pool.ts";
import { createSpecEvaluator, createYieldRunner, planChunks } from "../src/studies/index.ts";
import { conditionsStudy } from "./conditions-study.ts";
export { conditionsStudy };

const now = (): number => performance.now() / 1000;

export async function runConditionsBench(trials = 10000, indexErrors = true, workers = true) {
  const study = conditionsStudy(trials, indexErrors);
  const t0 = now();
  const ev = createSpecEvaluator(study.design as never, study.mask);
  const compile = now() - t0;
  const runner = createYieldRunner(study);
  runner.runChunk(0, Math.min(500, trials)); // JIT warm-up
  const t1 = now();
  const c1 = process.cpuUsage();
  let pass = 0;
  for (const [s, c] of planChunks(trials, 250)) pass += runner.runChunk(s, c).passCount;
  const inProcess = now() - t1;
  const cpu = process.cpuUsage(c1);
  const result: Record<string, unknown> = {
    layers: ev.layerCount,
    bands: ev.bands.length,
    nominal: ev.evaluate(ev.nominalThicknesses).map((b) => ({ id: b.id, pass: b.pass, margin: Number(b.margin.toFixed(3)) })),
    compileSeconds: Number(compile.toFixed(3)),
    trials,
    indexErrors,
    yield: pass / trials,
    inProcessSeconds: Number(inProcess.toFixed(2)),
    // CPU time of this thread: on a shared machine closer to an idle machine's wall-clock time
    inProcessCpuSeconds: Number(((cpu.user + cpu.system) / 1e6).toFixed(2)),
  };
  if (workers) {
    const pool = createYieldPool(2);
    try {
      await pool.run(conditionsStudy(1000, indexErrors));
      const t2 = now();
      await pool.run(study);
      result.twoWorkersSeconds = Number((now() - t2).toFixed(2));
    } finally {
      await pool.close();
    }
  }
  return result;
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  const trials = Number(process.argv[2] ?? 10000);
  const idx = process.argv[3] !== "0";
  const workers = process.argv[4] !== "0";
  process.stdout.write(JSON.stringify(await runConditionsBench(trials, idx, workers)) + "\n");
}
