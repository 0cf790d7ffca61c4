// Survey: sign of the layer-to-layer correlation of level-cut errors on the part. Random 6-layer H/L designs
// (n = 2.3 / 1.38 on glass 1.52, each layer 0.3–1.7 QWOT at 550 nm), every layer level-monitored on the part
// in T at one wavelength from 450 to 950 nm, 0.3 % photometric noise; the simulated correlation of each pair
// of consecutive layers whose errors are both below 2 % (cuts on a usable slope). The figures are in README.md
// (process models). Run with `pnpm exec tsx bench/level-monitoring.ts [designs] [trials]` (this package).
import { pathToFileURL } from "node:url";
import type { Design } from "../src/core/index.ts";
import { processErrorStats } from "../src/studies/process/index.ts";

const materials = [
  {
    id: "glass152",
    name: "glass",
    model: { kind: "constant" as const, n: 1.52, k: 0 },
    role: "substrate" as const,
    source: "test value",
  },
  {
    id: "H230",
    name: "H",
    model: { kind: "constant" as const, n: 2.3, k: 0 },
    role: "layer" as const,
    source: "test value",
  },
  {
    id: "L138",
    name: "L",
    model: { kind: "constant" as const, n: 1.38, k: 0 },
    role: "layer" as const,
    source: "test value",
  },
];

export interface LevelSurvey {
  designs: number;
  pairs: number;
  negative: number;
  positive: number;
}

/** Count consecutive pairs with r < −0.3 and r > +0.3 among usable pairs (see the file comment). */
export function levelSurvey(designs = 200, trials = 1000, seed = 11): LevelSurvey {
  let s = seed;
  const u = () => (s = (s * 1103515245 + 12345) % 2147483648) / 2147483648;
  const out: LevelSurvey = { designs, pairs: 0, negative: 0, positive: 0 };
  for (let t = 0; t < designs; t++) {
    const qwot = Array.from({ length: 6 }, () => 0.3 + 1.4 * u());
    const design: Design = {
      format: "stackproof.design/v1",
      name: "survey",
      referenceWavelength: 550,
      incident: "air",
      exit: "air",
      layers: qwot.map((q, i) => ({
        material: i % 2 ? "L138" : "H230",
        thickness: (q * 550) / (4 * (i % 2 ? 1.38 : 2.3)),
      })),
      substrate: { material: "glass152", thicknessMm: 1, backside: false },
      materials,
    };
    for (let lm = 450; lm <= 950; lm += 50) {
      const stats = processErrorStats(
        design,
        {
          thickness: { relativePct: 0, absoluteNm: 0, distribution: "normal" },
          process: {
            control: { method: "optical", noisePct: 0.3 },
            plan: design.layers.map(() => ({ wavelength: lm, criterion: "level" as const })),
          },
        },
        trials,
        `survey-${t}-${lm}`,
      );
      for (let j = 1; j < stats.length; j++) {
        if (!(stats[j]!.sigmaPct < 2 && stats[j - 1]!.sigmaPct < 2)) continue;
        out.pairs++;
        const r = stats[j]!.correlationWithPrevious;
        if (r < -0.3) out.negative++;
        if (r > 0.3) out.positive++;
      }
    }
  }
  return out;
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? "").href) {
  const designs = Number(process.argv[2] ?? 200);
  const trials = Number(process.argv[3] ?? 1000);
  const r = levelSurvey(designs, trials);
  const pct = (n: number) => ((100 * n) / r.pairs).toFixed(0);
  console.log(
    `${r.designs} designs × 11 wavelengths, ${r.pairs} usable consecutive pairs: r < −0.3 in ${r.negative} (${pct(r.negative)} %), r > +0.3 in ${r.positive} (${pct(r.positive)} %)`,
  );
}
