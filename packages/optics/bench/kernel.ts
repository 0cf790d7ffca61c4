/**
 * Kernel throughput benchmark: the same workload and modes as the scalar C reference kernel
 * (tmm-c in the shared bench folder), so the two can be compared as a ratio on one machine.
 *
 * Workload: M trials (1 % Gaussian thickness errors) × L layers × W wavelengths (380–1100 nm)
 * of an alternating Cauchy H/L design between n0 = 1 and a semi-infinite n_sub = 1.52.
 * One evaluation = one layer's characteristic matrix built and applied at one wavelength for
 * one polarization. Modes:
 *   lossless-normal   k = 0, 0°
 *   lossless-oblique  k = 0, 45°, s and p
 *   abs-oblique       absorbing layers incl. 4 metal layers (N = 0.2 − 3i, 8 nm), 45°, s and p
 *   abs-full          as abs-oblique with q = N cos θ and η recomputed per evaluation
 *                     (indexScale given, as an index-perturbing Monte Carlo does)
 * Extra rows (not in the C kernel): the same modes with the substrate back surface counted
 * incoherently, which needs the full 2×2 product (`+backside`).
 */
import { createStackEvaluator, parseDesign, type Design, type Material, type RTA } from "../src/core/index.ts";

/** Options of {@link runKernelBenchmark}. */
export interface KernelBenchOptions {
  trials?: number;
  layers?: number;
  wavelengths?: number;
  reps?: number;
  /** also time the incoherent back-surface variants */
  backside?: boolean;
}

/** One mode's result. */
export interface KernelBenchRow {
  mode: string;
  polarizations: string;
  evaluations: number;
  secondsPerRun: number[];
  medianSeconds: number;
  /** layer-wavelength evaluations per second (median run) */
  evalsPerSecond: number;
  nsPerEval: number;
}

/** Deterministic PRNG (mulberry32) and Box–Muller normal deviates. */
function normalSource(seed: number): () => number {
  let a = seed >>> 0;
  const uniform = (): number => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return (((t ^ (t >>> 14)) >>> 0) + 0.5) / 4294967296;
  };
  return () => Math.sqrt(-2 * Math.log(uniform())) * Math.cos(2 * Math.PI * uniform());
}

/**
 * The benchmark design: C layer j (j = 0 at the incident side) is deposition index L−1−j.
 */
export function benchDesign(layers: number, absorbing: boolean, backside = false): Design {
  const materials: Material[] = [
    { id: "H", name: "H", model: { kind: "cauchy", A: 2.2, B: 0.02, C: 0, k: absorbing ? 2e-3 : 0 }, role: "layer", source: "benchmark" },
    { id: "L", name: "L", model: { kind: "cauchy", A: 1.45, B: 0.004, C: 0, k: absorbing ? 5e-4 : 0 }, role: "layer", source: "benchmark" },
    { id: "M", name: "M", model: { kind: "constant", n: 0.2, k: 3 }, role: "metal", source: "benchmark" },
    { id: "S", name: "S", model: { kind: "constant", n: 1.52, k: 0 }, role: "substrate", source: "benchmark" },
  ];
  const cLayers: { material: string; thickness: number }[] = [];
  for (let j = 0; j < layers; j++) {
    const H = j % 2 === 0;
    const A = H ? 2.2 : 1.45;
    const B = H ? 0.02 : 0.004;
    const n550 = A + B / (0.55 * 0.55);
    let thickness = (550 / (4 * n550)) * (0.9 + (0.2 * ((j * 7) % 11)) / 10);
    let material = H ? "H" : "L";
    if (absorbing && j % 10 === 5) {
      material = "M";
      thickness = 8;
    }
    cLayers.push({ material, thickness });
  }
  return parseDesign({
    format: "stackproof.design/v1",
    name: "kernel benchmark",
    referenceWavelength: 550,
    incident: "air",
    layers: cLayers.reverse(),
    substrate: { material: "S", thicknessMm: 1, backside },
    exit: "air",
    materials,
  });
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)]!;
}

function grid(W: number): Float64Array {
  const g = new Float64Array(W);
  for (let w = 0; w < W; w++) g[w] = 380 + ((1100 - 380) * w) / (W > 1 ? W - 1 : 1);
  return g;
}

function benchMode(
  mode: string,
  design: Design,
  angle: number,
  pols: ("s" | "p")[],
  full: boolean,
  M: number,
  W: number,
  reps: number,
): KernelBenchRow {
  const wl = grid(W);
  const evs = pols.map((p) => createStackEvaluator(design, { wavelengths: wl, angleDeg: angle, polarization: p }));
  const L = evs[0]!.layerCount;
  const d0 = evs[0]!.nominalThicknesses;
  const normal = normalSource(0x9e3779b9);
  const trials = new Float64Array(M * L);
  for (let m = 0; m < M; m++) for (let j = 0; j < L; j++) trials[m * L + j] = d0[j]! * (1 + 0.01 * normal());
  const views: Float64Array[] = [];
  for (let m = 0; m < M; m++) views.push(trials.subarray(m * L, (m + 1) * L));
  const scale = full ? new Float64Array(L).fill(1) : undefined;
  const out: RTA = { R: new Float64Array(W), T: new Float64Array(W), A: new Float64Array(W) };
  let sink = 0;
  // warm-up so the optimizing compiler has seen the loop
  for (const ev of evs) for (let m = 0; m < Math.min(M, 300); m++) ev.evaluate(views[m]!, out, scale);
  const times: number[] = [];
  for (let r = 0; r < reps; r++) {
    let tt = 0;
    for (const ev of evs) {
      const t0 = performance.now();
      for (let m = 0; m < M; m++) {
        ev.evaluate(views[m]!, out, scale);
        sink += out.R[0]!;
      }
      tt += (performance.now() - t0) / 1000;
    }
    times.push(tt);
  }
  if (Number.isNaN(sink)) throw new Error("benchmark produced NaN");
  const evaluations = M * L * W * pols.length;
  const med = median(times);
  return {
    mode,
    polarizations: pols.join(""),
    evaluations,
    secondsPerRun: times,
    medianSeconds: med,
    evalsPerSecond: evaluations / med,
    nsPerEval: (1e9 * med) / evaluations,
  };
}

/**
 * Run the kernel benchmark (defaults: 2000 trials × 40 layers × 400 wavelengths, 3 reps, as
 * the C kernel). Synchronous and CPU-bound: run it off the UI thread.
 */
export function runKernelBenchmark(options: KernelBenchOptions = {}): KernelBenchRow[] {
  const M = options.trials ?? 2000;
  const L = options.layers ?? 40;
  const W = options.wavelengths ?? 400;
  const reps = Math.max(1, Math.min(15, options.reps ?? 3));
  const rows: KernelBenchRow[] = [];
  const sets: [string, boolean][] = [["", false]];
  if (options.backside) sets.push(["+backside", true]);
  for (const [suffix, back] of sets) {
    rows.push(benchMode("lossless-normal" + suffix, benchDesign(L, false, back), 0, ["s"], false, M, W, reps));
    rows.push(benchMode("lossless-oblique" + suffix, benchDesign(L, false, back), 45, ["s", "p"], false, M, W, reps));
    rows.push(benchMode("abs-oblique" + suffix, benchDesign(L, true, back), 45, ["s", "p"], false, M, W, reps));
    rows.push(benchMode("abs-full" + suffix, benchDesign(L, true, back), 45, ["s", "p"], true, M, W, reps));
  }
  return rows;
}
