// Coverage of the process-calibration intervals: datasets of 50 runs simulated by the process sampler with known
// parameters (fitted errors = realised + N(0, s)), calibrated, and the share of 95 % intervals that contain the
// true value counted per parameter. Figures in docs/studies.md (Calibration of the process model).
// Run with `pnpm exec tsx bench/calibration-coverage.ts [datasets]` (this package).
import { pathToFileURL } from "node:url";
import type { Design } from "../src/core/index.ts";
import { calibrateProcessModel, type CalibrationPart } from "../src/studies/asbuilt/index.ts";
import { parseErrorModel, type ErrorModel } from "../src/studies/error-model.ts";
import { createProcessSampler, type ProcessModelInput } from "../src/studies/process/index.ts";
import { TrialRandom } from "../src/studies/random.ts";

const glass = {
  id: "glass152",
  name: "glass",
  model: { kind: "constant" as const, n: 1.52, k: 0 },
  role: "substrate" as const,
  source: "test value",
};
const H = {
  id: "H230",
  name: "H",
  model: { kind: "constant" as const, n: 2.3, k: 0 },
  role: "layer" as const,
  source: "test value",
};
const L = {
  id: "L138",
  name: "L",
  model: { kind: "constant" as const, n: 1.38, k: 0 },
  role: "layer" as const,
  source: "test value",
};
const design = (qwots: number[]): Design => ({
  format: "stackproof.design/v1",
  name: "coverage",
  referenceWavelength: 550,
  incident: "air",
  exit: "air",
  layers: qwots.map((q, i) => ({
    material: i % 2 ? "L138" : "H230",
    thickness: (q * 550) / (4 * (i % 2 ? 1.38 : 2.3)),
  })),
  substrate: { material: "glass152", thicknessMm: 1, backside: false },
  materials: [glass, H, L],
});
const model = (process: ProcessModelInput): ErrorModel => ({
  thickness: { relativePct: 0, absoluteNm: 0, distribution: "normal" },
  process,
});

function runs(d: Design, truth: ErrorModel, seed: string, s: number): CalibrationPart[] {
  const sampler = createProcessSampler(parseErrorModel(truth), d);
  const nominal = Float64Array.from(d.layers, (l) => l.thickness);
  const th = new Float64Array(nominal.length);
  const sc = new Float64Array(nominal.length);
  const rng = new TrialRandom();
  const noise = new TrialRandom();
  return Array.from({ length: 50 }, (_, r) => {
    sampler.sample(rng, seed, r, nominal, th, sc);
    noise.reset(`${seed}:fit`, r);
    return {
      runId: `run-${r}`,
      designKey: "d",
      layers: d.layers.map((l, j) => ({
        material: l.material,
        index: j,
        nominalNm: l.thickness,
        errorPct: 100 * (th[j]! / nominal[j]! - 1) + s * noise.normal(),
        sePct: s,
      })),
    };
  });
}

export function coverage(datasets = 40): string[] {
  const lines: string[] = [];
  const count = (
    name: string,
    make: (k: number) => {
      parts: CalibrationPart[];
      program: ErrorModel;
      truth: Record<string, number>;
      designs?: Record<string, Design>;
    },
  ) => {
    const hit = new Map<string, number>();
    const seen = new Map<string, number>();
    for (let k = 0; k < datasets; k++) {
      const x = make(k);
      const c = calibrateProcessModel(x.parts, x.program, {
        bootstrap: 100,
        ...(x.designs ? { designs: x.designs } : {}),
      });
      for (const p of c.parameters) {
        const key = `${p.material ?? "all"} ${p.parameter}`;
        const t = x.truth[p.parameter]!;
        seen.set(key, (seen.get(key) ?? 0) + 1);
        hit.set(key, (hit.get(key) ?? 0) + (p.low <= t && t <= p.high ? 1 : 0));
      }
    }
    for (const [key, n] of seen) lines.push(`${name}: ${key} ${hit.get(key)}/${n}`);
  };
  const crystal = { method: "crystal" as const, toolingPct: 0.8, noisePct: 0.4 };
  count("crystal, 12 layers", (k) => ({
    parts: runs(
      design(Array(12).fill(1)),
      model({ control: { H230: crystal, L138: crystal } }),
      `c${k}`,
      0.1,
    ),
    program: model({ control: { H230: crystal, L138: crystal } }),
    truth: { toolingPct: 0.8, noisePct: 0.4 },
  }));
  const time = {
    method: "time" as const,
    rateErrorPct: 0.5,
    rateDriftPct: 0.8,
    driftCorrelation: 0.8,
    withinLayerPct: 0.3,
  };
  count("time, 30 layers, one control", (k) => ({
    parts: runs(design(Array(30).fill(1)), model({ control: time }), `t${k}`, 0.1),
    program: model({ control: time }),
    truth: { rateErrorPct: 0.5, rateDriftPct: 0.8, driftCorrelation: 0.8, withinLayerPct: 0.3 },
  }));
  const level = design([0.6, 1.3, 0.7, 0.9, 1.4, 0.5, 0.8, 1.2]);
  const optical = (noise: number) =>
    model({
      control: { method: "optical", noisePct: noise, overshootSigmaNm: noise },
      plan: level.layers.map(() => ({ wavelength: 550, criterion: "level" as const })),
    });
  count("optical levels, model right", (k) => ({
    parts: runs(level, optical(0.3), `o${k}`, 0.05),
    program: optical(0.3),
    truth: { opticalScale: 1 },
    designs: { d: level },
  }));
  count("optical levels, model half the noise", (k) => ({
    parts: runs(level, optical(0.6), `h${k}`, 0.05),
    program: optical(0.3),
    truth: { opticalScale: 2 },
    designs: { d: level },
  }));
  return lines;
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? "").href) {
  for (const line of coverage(Number(process.argv[2] ?? 40))) console.log(line);
}
