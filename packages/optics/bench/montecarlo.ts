// Monte Carlo throughput: trials per second on one thread and the speed-up from 1 to 2 worker threads.
// Run with `pnpm optics bench` (repo root) or `pnpm exec tsx bench/montecarlo.ts` (this package).
import { isDeepStrictEqual } from "node:util";
import { pathToFileURL } from "node:url";
import { designFromQwots } from "../src/core/index.ts";
import { createYieldPool } from "../src/cli/pool.ts";
import { createYieldRunner, planChunks } from "../src/studies/index.ts";
import type { YieldStudy } from "../src/studies/index.ts";

/** 40-layer Ta2O5/SiO2 edge-type stack at λ0 = 550 nm with a 3-band mask (Halvorsen Thinfilm Works test part). */
export function benchStudy(trials: number): YieldStudy {
  const layers = Array.from({ length: 40 }, (_, i) => ({
    material: i % 2 === 0 ? "Ta2O5" : "SiO2",
    qwot: i === 0 || i === 39 ? 0.5 : 1,
  }));
  const design = designFromQwots({
    name: "HTW-bench-40",
    referenceWavelength: 550,
    layers,
    substrate: { material: "boro-crown", thicknessMm: 1, backside: true },
  });
  return {
    design,
    mask: {
      bands: [
        {
          id: "block",
          start: 520,
          stop: 580,
          quantity: "R",
          polarization: "u",
          angleDeg: 0,
          requirement: "min",
          value: 99,
        },
        {
          id: "pass-blue",
          start: 420,
          stop: 460,
          quantity: "T",
          polarization: "u",
          angleDeg: 0,
          requirement: "avgMin",
          value: 80,
        },
        {
          id: "block-45s",
          start: 540,
          stop: 560,
          quantity: "OD",
          polarization: "s",
          angleDeg: 45,
          requirement: "min",
          value: 1,
        },
      ],
    },
    errorModel: {
      thickness: { relativePct: 1, absoluteNm: 0.3, distribution: "normal" },
      systematicPct: 0.5,
      indexDriftPct: 0.3,
    },
    trials,
    seed: "HTW-bench",
  };
}

/** Measured figures. */
export interface MonteCarloBench {
  layers: number;
  bands: number;
  wavelengthsPerTrial: number;
  trials: number;
  inProcess: { seconds: number; trialsPerSecond: number };
  /** Steady state of a warmed-up pool (thread start-up excluded). */
  workers1: { seconds: number; trialsPerSecond: number };
  workers2: { seconds: number; trialsPerSecond: number };
  speedup1to2: number;
  identicalAcrossWorkerCounts: boolean;
}

const now = (): number => performance.now() / 1000;

/** Run the benchmark (a few seconds on a laptop core for the default 20000 trials). */
export async function runMonteCarloBench(trials = 20000): Promise<MonteCarloBench> {
  const study = benchStudy(trials);
  const runner = createYieldRunner(study);
  runner.runChunk(0, Math.min(1000, trials)); // warm up the JIT
  const t0 = now();
  for (const [s, c] of planChunks(trials, 250)) runner.runChunk(s, c);
  const inProcess = now() - t0;
  // Pools are started and warmed up first: the figures are steady-state throughput, not thread start-up.
  const timedPool = async (size: number) => {
    const pool = createYieldPool(size);
    try {
      // every thread JIT-compiles on its own: warm each one through a few hundred trials
      await pool.run(benchStudy(Math.min(2000, trials)));
      const start = now();
      const result = await pool.run(study);
      return { seconds: now() - start, result };
    } finally {
      await pool.close();
    }
  };
  const { seconds: w1, result: one } = await timedPool(1);
  const { seconds: w2, result: two } = await timedPool(2);
  const rate = (seconds: number) => ({
    seconds: Number(seconds.toFixed(3)),
    trialsPerSecond: Math.round(trials / seconds),
  });
  return {
    layers: runner.evaluator.layerCount,
    bands: runner.evaluator.bands.length,
    wavelengthsPerTrial: runner.evaluator.groups.reduce((s, g) => s + g.wavelengths.length, 0),
    trials,
    inProcess: rate(inProcess),
    workers1: rate(w1),
    workers2: rate(w2),
    speedup1to2: Number((w1 / w2).toFixed(2)),
    identicalAcrossWorkerCounts: isDeepStrictEqual(one, two),
  };
}

/** Printable summary followed by the figures as JSON. */
export function formatMonteCarloBench(b: MonteCarloBench): string {
  return [
    `Monte Carlo yield, ${b.layers} layers, ${b.bands} bands, ${b.wavelengthsPerTrial} wavelengths per trial, ${b.trials} trials`,
    `  in process        ${String(b.inProcess.trialsPerSecond).padStart(7)} trials/s`,
    `  pool, 1 worker    ${String(b.workers1.trialsPerSecond).padStart(7)} trials/s`,
    `  pool, 2 workers   ${String(b.workers2.trialsPerSecond).padStart(7)} trials/s   speed-up ${b.speedup1to2}× (target ≥ 1.8× on 2 idle cores)`,
    `  identical results across worker counts: ${b.identicalAcrossWorkerCounts ? "yes" : "NO"}`,
    JSON.stringify(b),
  ].join("\n");
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  const trials = Number(process.argv[2] ?? 20000);
  process.stdout.write(formatMonteCarloBench(await runMonteCarloBench(trials)) + "\n");
}
