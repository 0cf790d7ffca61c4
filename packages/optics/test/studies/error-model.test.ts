import { describe, expect, it } from "vitest";
import { createTrialSampler, parseErrorModel, scaleErrorModel } from "../../src/studies/error-model.ts";
import type { ErrorModel } from "../../src/studies/error-model.ts";
import { TrialRandom } from "../../src/studies/random.ts";

const model: ErrorModel = {
  thickness: { relativePct: 1, absoluteNm: 0.5, distribution: "normal" },
  systematicPct: { SiO2: 0.5 },
  indexDriftPct: 0.3,
  indexNoisePct: 0.1,
};

describe("error model", () => {
  it("draws depend only on (seed, trial index)", () => {
    const s = createTrialSampler(model, ["TiO2", "SiO2", "TiO2"]);
    const nominal = Float64Array.of(60, 90, 60);
    const a = new Float64Array(3);
    const b = new Float64Array(3);
    const sa = new Float64Array(3);
    const sb = new Float64Array(3);
    const rng = new TrialRandom();
    s.sample(rng, "HTW", 7, nominal, a, sa);
    s.sample(rng, "HTW", 3, nominal, b, sb); // another trial in between
    s.sample(rng, "HTW", 7, nominal, b, sb);
    expect(Array.from(b)).toEqual(Array.from(a));
    expect(Array.from(sb)).toEqual(Array.from(sa));
  });

  it("has the requested spread: σ² = (rel·d)² + abs² per layer (sample variance over 4000 trials)", () => {
    const m: ErrorModel = { thickness: { relativePct: 2, absoluteNm: 1, distribution: "uniform" } };
    const s = createTrialSampler(m, ["SiO2"]);
    const out = new Float64Array(1);
    const scale = new Float64Array(1);
    const rng = new TrialRandom();
    let sum = 0;
    let sum2 = 0;
    const N = 4000;
    for (let i = 0; i < N; i++) {
      s.sample(rng, "spread", i, Float64Array.of(100), out, scale);
      const e = (out[0] as number) - 100;
      sum += e;
      sum2 += e * e;
      expect(Math.abs(e)).toBeLessThanOrEqual(Math.sqrt(3) * Math.sqrt(5) + 1e-12); // uniform half-width √3 σ
    }
    const variance = sum2 / N - (sum / N) ** 2;
    expect(variance).toBeGreaterThan(5 * 0.9); // σ² = 2² + 1² = 5; ±10 % is > 4 standard errors at N = 4000
    expect(variance).toBeLessThan(5 * 1.1);
  });

  it("zero model leaves thicknesses and indices nominal", () => {
    const s = createTrialSampler({ thickness: { relativePct: 0, absoluteNm: 0, distribution: "normal" } }, [
      "a",
      "b",
    ]);
    const out = new Float64Array(2);
    const scale = new Float64Array(2);
    s.sample(new TrialRandom(), "z", 0, Float64Array.of(10, 20), out, scale);
    expect(Array.from(out)).toEqual([10, 20]);
    expect(Array.from(scale)).toEqual([1, 1]);
  });

  it("scales every σ", () => {
    const s = scaleErrorModel(model, 2);
    expect(s.thickness.relativePct).toBe(2);
    expect(s.thickness.absoluteNm).toBe(1);
    expect(s.systematicPct).toEqual({ SiO2: 1 });
    expect(s.indexDriftPct).toBeCloseTo(0.6, 12);
    expect(s.indexNoisePct).toBeCloseTo(0.2, 12);
  });

  it("rejects bad input with a RangeError naming field and value", () => {
    expect(() =>
      parseErrorModel({ thickness: { relativePct: -1, absoluteNm: 0, distribution: "normal" } }),
    ).toThrow(/errorModel\.thickness\.relativePct: .*got -1/);
    expect(() =>
      parseErrorModel({ thickness: { relativePct: 1, absoluteNm: 0, distribution: "gauss" } }),
    ).toThrow(/distribution.*"gauss"/);
    expect(() =>
      parseErrorModel({
        thickness: { relativePct: 1, absoluteNm: 0, distribution: "normal" },
        systematicPct: { SiO2: -2 },
      }),
    ).toThrow(/systematicPct.*-2|systematicPct/);
  });
});
