// Independent plain reference for the as-built tests: synthetic "measurements" are made here, not through
// the engine's kernel. Straightforward complex-number characteristic-matrix method (Macleod, Thin-Film
// Optical Filters, ch. 2): N = n − ik, η_s = N cosθ, η_p = N / cosθ, δ = 2π N cosθ d / λ,
// M = Π [[cos δ, i sin δ/η], [iη sin δ, cos δ]], [B, C] = M [1, η_sub], R = |(η0B − C)/(η0B + C)|²,
// T = 4 η0 Re(η_sub)/|η0B + C|². Semi-infinite substrate (front surface only). Only n, k come from the package.
import { designFromQwots, getMaterial, refractiveIndex, type Design, type QwotLayer } from "../../src/core/index.ts";

type C = [number, number];
const add = (a: C, b: C): C => [a[0] + b[0], a[1] + b[1]];
const sub = (a: C, b: C): C => [a[0] - b[0], a[1] - b[1]];
const mul = (a: C, b: C): C => [a[0] * b[0] - a[1] * b[1], a[0] * b[1] + a[1] * b[0]];
const div = (a: C, b: C): C => {
  const d = b[0] * b[0] + b[1] * b[1];
  return [(a[0] * b[0] + a[1] * b[1]) / d, (a[1] * b[0] - a[0] * b[1]) / d];
};
const abs2 = (a: C): number => a[0] * a[0] + a[1] * a[1];
const csqrt = (a: C): C => {
  const r = Math.hypot(a[0], a[1]);
  let re = Math.sqrt((r + a[0]) / 2);
  let im = Math.sign(a[1]) * Math.sqrt((r - a[0]) / 2);
  // decaying branch for N = n − ik: Im(N cosθ) ≤ 0
  if (im > 0 || (im === 0 && re < 0)) {
    re = -re;
    im = -im;
  }
  return [re, im];
};
const ccos = (a: C): C => [Math.cos(a[0]) * Math.cosh(a[1]), -Math.sin(a[0]) * Math.sinh(a[1])];
const csin = (a: C): C => [Math.sin(a[0]) * Math.cosh(a[1]), Math.cos(a[0]) * Math.sinh(a[1])];

/** R and T (fractions) of layers (N, d nm; deposition order) on a semi-infinite substrate, from air-like n0. */
export function referenceRT(
  layers: { N: C; d: number }[],
  substrate: C,
  n0: number,
  lambda: number,
  angleDeg: number,
  pol: "s" | "p",
): { R: number; T: number } {
  const s0 = n0 * Math.sin((angleDeg * Math.PI) / 180);
  const q = (N: C): C => csqrt(sub(mul(N, N), [s0 * s0, 0]));
  const eta = (N: C): C => (pol === "s" ? q(N) : div(mul(N, N), q(N)));
  const eta0 = eta([n0, 0]);
  let m11: C = [1, 0];
  let m12: C = [0, 0];
  let m21: C = [0, 0];
  let m22: C = [1, 0];
  // incident side first: M = M_top ... M_1
  for (let j = layers.length - 1; j >= 0; j--) {
    const { N, d } = layers[j]!;
    const e = eta(N);
    const delta = mul([(2 * Math.PI * d) / lambda, 0], q(N));
    const c = ccos(delta);
    const s = csin(delta);
    const a12 = div(mul([0, 1], s), e);
    const a21 = mul(mul([0, 1], e), s);
    const n11 = add(mul(m11, c), mul(m12, a21));
    const n12 = add(mul(m11, a12), mul(m12, c));
    const n21 = add(mul(m21, c), mul(m22, a21));
    const n22 = add(mul(m21, a12), mul(m22, c));
    m11 = n11;
    m12 = n12;
    m21 = n21;
    m22 = n22;
  }
  const es = eta(substrate);
  const B = add(m11, mul(m12, es));
  const Cc = add(m21, mul(m22, es));
  const num = sub(mul(eta0, B), Cc);
  const den = add(mul(eta0, B), Cc);
  const R = abs2(div(num, den));
  const T = (4 * eta0[0] * es[0]) / abs2(den);
  return { R, T };
}

/** Spectrum in percent of `design` with thicknesses scaled per layer and N scaled per material, by the reference. */
export function referenceSpectrum(
  design: Design,
  wavelengths: number[],
  quantity: "R" | "T",
  angleDeg: number,
  pol: "s" | "p" | "u",
  thicknessFactor: (j: number) => number = () => 1,
  indexFactor: (material: string) => number = () => 1,
): number[] {
  const idx = (id: string, w: number): C => {
    const v = refractiveIndex(getMaterial(id, design.materials).model, w);
    return [v.n, -v.k];
  };
  return wavelengths.map((w) => {
    const layers = design.layers.map((l, j) => {
      const N = idx(l.material, w);
      const f = indexFactor(l.material);
      return { N: [N[0] * f, N[1] * f] as C, d: l.thickness * thicknessFactor(j) };
    });
    const substrate = idx(design.substrate.material, w);
    const n0 = idx(design.incident, w)[0];
    const one = (p: "s" | "p") => referenceRT(layers, substrate, n0, w, angleDeg, p);
    const v = pol === "u" ? ((a, b) => ({ R: (a.R + b.R) / 2, T: (a.T + b.T) / 2 }))(one("s"), one("p")) : one(pol);
    return (quantity === "R" ? v.R : v.T) * 100;
  });
}

/** Deterministic normal draws for the tests (mulberry32 + Box–Muller). */
export function normals(seed: number): () => number {
  let a = seed >>> 0;
  const u = (): number => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  return () => Math.sqrt(-2 * Math.log(u() + 1e-300)) * Math.cos(2 * Math.PI * u());
}

const repeat = (n: number, unit: QwotLayer[]): QwotLayer[] =>
  Array.from({ length: n }, () => unit.map((l) => ({ ...l }))).flat();
const H = (material: string, qwot = 1): QwotLayer => ({ material, qwot });

/** The NIR bandpass of the demo programs (apps/api/src/demo/designs.ts, "Kestrel"): (HL)^5 2H (LH)^5 at 905 nm. */
export function bandpass905(pairs = 5): Design {
  return designFromQwots({
    name: "NIR bandpass",
    referenceWavelength: 905,
    layers: [...repeat(pairs, [H("Ta2O5"), H("SiO2")]), H("Ta2O5", 2), ...repeat(pairs, [H("SiO2"), H("Ta2O5")])],
    substrate: { material: "fused-silica", thicknessMm: 1.1, backside: false },
  });
}

/** The 45° dichroic of the demo programs ("Aster"): (0.5L H 0.5L)^n merged, TiO2/SiO2 on fused silica. */
export function dichroic(periods = 8, lambda0 = 450): Design {
  const layers: QwotLayer[] = [];
  for (let i = 0; i < periods; i++) layers.push(H("SiO2", 0.5), H("TiO2"), H("SiO2", 0.5));
  const merged: QwotLayer[] = [];
  for (const l of layers) {
    const last = merged[merged.length - 1];
    if (last && last.material === l.material) last.qwot += l.qwot;
    else merged.push({ ...l });
  }
  return designFromQwots({
    name: "dichroic",
    referenceWavelength: lambda0,
    layers: merged,
    substrate: { material: "fused-silica", thicknessMm: 1, backside: false },
  });
}

/** n evenly spaced wavelengths from a to b, nm. */
export const grid = (a: number, b: number, step: number): number[] =>
  Array.from({ length: Math.floor((b - a) / step + 1e-9) + 1 }, (_, i) => a + i * step);
