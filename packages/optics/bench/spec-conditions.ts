// Monte Carlo with customer conditions: a 31-layer two-cavity bandpass whose mask has an f/2 cone band
// and a 0–10° angle-range band. Trials per second in process and in the Node worker pool.
// Run: `pnpm exec tsx bench/spec-conditions.ts [trials] [indexErrors 0|1]` (this package).
import { pathToFileURL } from "node:url";
import { designFromQwots } from "../src/core/index.ts";
import { createYieldPool } from "../src/cli/node-pool.ts";
import { createSpecEvaluator, createYieldRunner, planChunks } from "../src/studies/index.ts";
import type { YieldStudy } from "../src/studies/index.ts";

const pairs = (n: number, a: string, b: string) =>
  Array.from({ length: 2 * n }, (_, i) => ({ material: i % 2 ? b : a, qwot: 1 }));

/** Two-cavity Ta2O5/SiO2 bandpass at 1064 nm: [(HL)^3 H 2L H (LH)^3] L [same], 31 layers, on fused silica. */
export function conditionsStudy(trials: number, indexErrors = true): YieldStudy {
  const cavity = [...pairs(3, "Ta2O5", "SiO2"), { material: "Ta2O5", qwot: 1 }, { material: "SiO2", qwot: 2 }, { material: "Ta2O5", qwot: 1 }, ...pairs(3, "SiO2", "Ta2O5")];
  const design = designFromQwots({
    name: "bench bandpass 1064",
    referenceWavelength: 1064,
    layers: [...cavity, { material: "SiO2", qwot: 1 }, ...cavity],
    substrate: { material: "fused-silica", thicknessMm: 1, backside: false },
  });
  return {
    design,
    mask: {
      bands: [
        // passband centre in the lens's f/2 cone, unpolarized, average transmittance
        { id: "pass-f2", start: 1062, stop: 1066, step: 0.5, quantity: "T", polarization: "u", cone: { fNumber: 2 }, requirement: "avgMin", value: 70 },
        // blocking either side over 0–10°, every angle, unpolarized
        { id: "block-lo", start: 1000, stop: 1040, quantity: "T", polarization: "u", angleRange: { fromDeg: 0, toDeg: 10 }, requirement: "max", value: 5 },
        { id: "block-hi", start: 1090, stop: 1130, quantity: "T", polarization: "u", angleRange: { fromDeg: 0, toDeg: 10 }, requirement: "max", value: 5 },
      ],
    },
    errorModel: indexErrors
      ? { thickness: { relativePct: 0.3, absoluteNm: 0.1, distribution: "normal" }, systematicPct: 0.2, indexDriftPct: 0.2 }
      : { thickness: { relativePct: 0.3, absoluteNm: 0.1, distribution: "normal" }, systematicPct: 0.2 },
    trials,
    seed: "bench-conditions",
    envelopeSamples: 200,
  };
}

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
