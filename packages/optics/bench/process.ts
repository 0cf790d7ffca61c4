// Process-model throughput: trials per second of each control method on the 40-layer benchmark study,
// one thread, warm JIT. Run with `pnpm exec tsx bench/process.ts [trials]` (this package).
import { pathToFileURL } from "node:url";
import { createYieldRunner, defaultMonitoringPlan } from "../src/studies/index.ts";
import type { ProcessModelInput, YieldStudy } from "../src/studies/index.ts";
import type { Design } from "../src/core/index.ts";
import { benchStudy } from "./montecarlo.ts";

/** The processes compared (null = the study's independent-error model). */
export function benchProcesses(design: Design): { name: string; process: ProcessModelInput | null }[] {
  const plan = defaultMonitoringPlan(design);
  return [
    { name: "independent errors", process: null },
    { name: "time (AR(1) drift)", process: { control: { method: "time", rateErrorPct: 0.5, rateDriftPct: 0.8, driftCorrelation: 0.8, withinLayerPct: 0.3, indexDriftPct: 0.2, shutterNm: 0.3 } } },
    { name: "quartz crystal", process: { control: { method: "crystal", toolingPct: 0.5, noisePct: 0.3, terminationNm: 0.3 } } },
    { name: "optical, part, default plan", process: { control: { method: "optical", noisePct: 0.5, overshootSigmaNm: 0.3, driftPct: 0.1 }, plan } },
    {
      name: "optical, witness every 4, 2 wavelengths",
      process: {
        control: { method: "optical", noisePct: 0.5, overshootSigmaNm: 0.3 },
        plan: plan.map((_, j) => ({ wavelength: j % 2 ? 600 : 550, on: "witness", criterion: "level" })),
        witness: { everyLayers: 4 },
      },
    },
  ];
}

/** Trials per second of each process (best of `rounds` timed runs of `trials` after a warm-up). */
export function runProcessBench(trials = 4000, rounds = 3): { name: string; trialsPerSecond: number; relativeCost: number }[] {
  const base = benchStudy(trials);
  const rows = benchProcesses(base.design as Design).map(({ name, process }) => {
    const study: YieldStudy = { ...base, envelopeSamples: 0, errorModel: { ...base.errorModel, ...(process ? { process } : {}) } };
    const runner = createYieldRunner(study);
    runner.runChunk(0, Math.min(trials, 1000)); // warm-up
    let best = 0;
    for (let r = 0; r < rounds; r++) {
      const t0 = performance.now();
      runner.runChunk(0, trials);
      const rate = trials / ((performance.now() - t0) / 1000);
      if (rate > best) best = rate;
    }
    return { name, trialsPerSecond: best };
  });
  const ref = rows[0]?.trialsPerSecond ?? 1;
  return rows.map((r) => ({ ...r, relativeCost: ref / r.trialsPerSecond }));
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  const trials = Number(process.argv[2] ?? 4000);
  console.log(`| process | trials/s | cost vs independent |\n|---|---|---|`);
  for (const r of runProcessBench(trials)) console.log(`| ${r.name} | ${r.trialsPerSecond.toFixed(0)} | ${r.relativeCost.toFixed(2)}× |`);
}
