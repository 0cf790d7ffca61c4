/**
 * Characteristic-matrix (Abelès) kernel shared by {@link computeSpectrum} and the fast
 * evaluator. Internal module: the public entry points are in spectrum.ts and evaluator.ts.
 *
 * Conventions (Macleod, *Thin-Film Optical Filters*): N = n − ik (k ≥ 0 absorbing), time
 * dependence exp(+iωt). In layer j the invariant s = n0 sin θ0 gives q = N cos θ =
 * √(N² − s²) with the forward branch Im q ≤ 0 (Re q ≥ 0 when lossless), so the wave
 * exp(−i 2π q z / λ) decays into the stack; δ = 2π q d / λ; tilted admittances (free-space
 * admittance units) η_s = q and η_p = N²/q = N / cos θ.
 * M = Π [[cos δ, i sin δ / η], [i η sin δ, cos δ]] taken from the incident side;
 * [B, C] = M [1, η_sub]; r = (η0 B − C)/(η0 B + C); R = |r|²; T = 4 η0 Re(η_sub)/|η0 B + C|².
 *
 * Layers are stored in deposition order (j = 0 next to the substrate), so the product is
 * built by left-multiplying layer matrices starting from the substrate side.
 *
 * Storage is wavelength-major ([w * L + j]) so the layer loop reads contiguously. Hot loops
 * hold real and imaginary parts in separate locals, write into preallocated Float64Arrays,
 * and inline sin/cos/exp (constants below; `sincos` and `expPair` are the same code as functions).
 */
import type { Design } from "./design.ts";
import { getMaterial } from "./library.ts";
import { assertPhysicalIndex, indexTable, validRange } from "./materials.ts";
// Inlined sine/cosine and exponential. Accurate to about 1 ulp for the arguments the engine
// produces (|x| < 1e9 rad for sin/cos, −150 ≤ x ≤ 150 for exp). Method: Cody–Waite reduction
// by π/2 (two-part constant) and the minimax kernels of the freely distributable fdlibm (Sun
// Microsystems, k_sin.c / k_cos.c); exp by reduction with ln 2 and the Taylor series of cosh
// and sinh of the remainder, so e^x and e^−x come together without a division.
// The constants must stay module-local: imported bindings (live bindings) made the hot loops
// about 50× slower under tsx.
const S1 = -1.66666666666666324348e-1;
const S2 = 8.33333333332248946124e-3;
const S3 = -1.98412698298579493134e-4;
const S4 = 2.75573137070700676789e-6;
const S5 = -2.50507602534068634195e-8;
const S6 = 1.58969099521155010221e-10;
const C1 = 4.16666666666666019037e-2;
const C2 = -1.38888888888741095749e-3;
const C3 = 2.48015872894767294178e-5;
const C4 = -2.75573143513906633035e-7;
const C5 = 2.0875723212981748279e-9;
const C6 = -1.13596475577881948265e-11;
const PIO2_1 = 1.57079632673412561417;
const PIO2_1T = 6.07710050650619224932e-11;
const TWO_OVER_PI = 0.6366197723675814;
const RND = 6755399441055744;
const LOG2E = 1.4426950408889634;
const LN2_HI = 6.93147180369123816490e-1;
const LN2_LO = 1.90821492927058770002e-10;
const POW2_OFFSET = 256;
const E1 = 1 / 2;
const E2 = 1 / 24;
const E3 = 1 / 720;
const E4 = 1 / 40320;
const E5 = 1 / 3628800;
const E6 = 1 / 479001600;
const O1 = 1 / 6;
const O2 = 1 / 120;
const O3 = 1 / 5040;
const O4 = 1 / 362880;
const O5 = 1 / 39916800;
const O6 = 1 / 6227020800;
const QUAD_C = new Float64Array([1, 0, -1, 0]);
const QUAD_S = new Float64Array([0, 1, 0, -1]);
const POW2 = (() => {
  const t = new Float64Array(2 * POW2_OFFSET + 1);
  for (let i = 0; i < t.length; i++) t[i] = Math.pow(2, i - POW2_OFFSET);
  return t;
})();

/** Polarization: "s" (TE), "p" (TM) or "u" (unpolarized = mean of s and p intensities). */
export type Polarization = "s" | "p" | "u";

/** sin and cos of x (radians) written into out[0], out[1]. */
export function sincos(x: number, out: Float64Array): void {
  const nq = x * TWO_OVER_PI + RND - RND;
  const r = x - nq * PIO2_1 - nq * PIO2_1T;
  const z = r * r;
  const sp = r + r * z * (S1 + z * (S2 + z * (S3 + z * (S4 + z * (S5 + z * S6)))));
  const cp = 1 - 0.5 * z + z * z * (C1 + z * (C2 + z * (C3 + z * (C4 + z * (C5 + z * C6)))));
  const q = (nq | 0) & 3;
  const qc = QUAD_C[q]!;
  const qs = QUAD_S[q]!;
  out[0] = sp * qc + cp * qs;
  out[1] = cp * qc - sp * qs;
}

/** e^x and e^−x for −150 ≤ x ≤ 150, written into out[0], out[1]. */
export function expPair(x: number, out: Float64Array): void {
  const nn = x * LOG2E + RND - RND;
  const r = x - nn * LN2_HI - nn * LN2_LO;
  const z = r * r;
  const ev = 1 + z * (E1 + z * (E2 + z * (E3 + z * (E4 + z * (E5 + z * E6)))));
  const od = r * (1 + z * (O1 + z * (O2 + z * (O3 + z * (O4 + z * (O5 + z * O6))))));
  const ni = nn | 0;
  out[0] = (ev + od) * POW2[POW2_OFFSET + ni]!;
  out[1] = (ev - od) * POW2[POW2_OFFSET - ni]!;
}

/** Rescale step for complex paths: entries are multiplied by 1e-65 (= e^−149.668), RESCALE_LOG = ln(1e65). */
const RESCALE = 1e-65;
const RESCALE_LOG = 65 * Math.LN10;
/** Largest layers × wavelengths table (about 90 bytes per entry and polarization). */
export const MAX_TABLE = 2_000_000;
/** Largest |Im δ| per layer kept; beyond it a layer is opaque to well below 1e-130. */
const MAX_DECAY = 150;

/**
 * Forward-branch complex square root: principal root, then flipped so that Im q ≤ 0
 * (and Re q ≥ 0 when Im q = 0). Writes [re, im] into out.
 */
export function forwardSqrt(re: number, im: number, out: Float64Array): void {
  const r = Math.sqrt(re * re + im * im);
  const u = Math.sqrt(0.5 * (r + Math.abs(re)));
  if (u === 0) {
    out[0] = 0;
    out[1] = 0;
    return;
  }
  let qr: number;
  let qi: number;
  if (re >= 0) {
    qr = u;
    qi = im / (2 * u);
  } else {
    qr = Math.abs(im) / (2 * u);
    qi = im >= 0 ? u : -u;
  }
  const tol = 1e-13 * (Math.abs(qr) + Math.abs(qi));
  if (qi > tol || (Math.abs(qi) <= tol && qr < 0)) {
    qr = -qr;
    qi = -qi;
  }
  out[0] = qr;
  out[1] = qi;
}

/** Optical constants of a design tabulated on a wavelength grid (angle-independent). */
export interface PreparedStack {
  wavelengths: Float64Array;
  W: number;
  L: number;
  /** layer indices N = n − ik as re = n, im = −k, [w * L + j] */
  nRe: Float64Array;
  nIm: Float64Array;
  /** incident medium n (k ignored: the incident medium is taken as lossless) */
  incident: Float64Array;
  /** substrate N (re, im = −k) */
  subRe: Float64Array;
  subIm: Float64Array;
  /** exit medium n behind the substrate (k ignored) */
  exit: Float64Array;
  /** every layer has k = 0 at every wavelength */
  lossless: boolean;
  /** back surface counted incoherently */
  backside: boolean;
  substrateNm: number;
  /** per-layer minimum of n² over the grid (lossless index-scaling fast path test) */
  minN2: Float64Array;
  nominal: Float64Array;
  warnings: string[];
}

/** Validate a wavelength list and copy it into a Float64Array (nm, finite, > 0). */
export function toWavelengths(wavelengths: ArrayLike<number>): Float64Array {
  const W = wavelengths.length;
  if (W === 0) throw new RangeError("wavelengths: expected at least one wavelength, got none");
  const out = new Float64Array(W);
  for (let i = 0; i < W; i++) {
    const v = wavelengths[i] as number;
    if (!(v > 0) || !Number.isFinite(v)) {
      throw new RangeError(`wavelengths[${i}]: expected a finite number > 0 nm, got ${String(v)}`);
    }
    out[i] = v;
  }
  return out;
}

/**
 * Tabulate the optical constants of a design on a wavelength grid.
 * With `coherentSubstrate` and a counted back surface, the substrate becomes a coherent
 * layer (deposition index 0) and the exit medium becomes the semi-infinite substrate.
 */
export function prepareStack(
  design: Design,
  wavelengthsIn: ArrayLike<number>,
  coherentSubstrate = false,
): PreparedStack {
  const wavelengths = toWavelengths(wavelengthsIn);
  const W = wavelengths.length;
  const custom = design.materials;
  const warnings: string[] = [];
  const cache = new Map<string, { n: Float64Array; k: Float64Array }>();
  const table = (id: string, where: string): { n: Float64Array; k: Float64Array } => {
    const hit = cache.get(id);
    if (hit) return hit;
    const mat = getMaterial(id, custom);
    let t;
    try {
      t = indexTable(mat.model, wavelengths);
      // a non-finite or non-physical n, k would turn into NaN spectra that no comparison catches
      assertPhysicalIndex(id, mat.model, wavelengths, t);
    } catch (e) {
      if (e instanceof RangeError) throw new RangeError(`${where} (${id}): ${e.message}`);
      throw e;
    }
    if (t.extrapolated > 0) {
      warnings.push(`${id}: optical constants held constant beyond the table at ${t.extrapolated} wavelength(s)`);
    }
    if (t.outOfRange > 0) {
      const r = validRange(mat.model);
      warnings.push(
        `${id}: ${t.outOfRange} wavelength(s) outside the ${mat.model.kind} model's valid range` +
          (r ? ` ${r[0]}–${r[1]} nm` : ""),
      );
    }
    cache.set(id, t);
    return t;
  };

  const layerIds: string[] = [];
  const thick: number[] = [];
  const labels: string[] = [];
  let backside = design.substrate.backside;
  let substrateId = design.substrate.material;
  if (coherentSubstrate && backside) {
    layerIds.push(design.substrate.material);
    thick.push(design.substrate.thicknessMm * 1e6);
    labels.push("substrate");
    substrateId = design.exit;
    backside = false;
  }
  design.layers.forEach((l, i) => {
    layerIds.push(l.material);
    thick.push(l.thickness);
    labels.push(`layers[${i}]`);
  });
  const L = layerIds.length;
  const nRe = new Float64Array(W * L);
  const nIm = new Float64Array(W * L);
  const minN2 = new Float64Array(L).fill(Infinity);
  let lossless = true;
  for (let j = 0; j < L; j++) {
    const t = table(layerIds[j]!, labels[j]!);
    for (let w = 0; w < W; w++) {
      const n = t.n[w]!;
      const k = t.k[w]!;
      nRe[w * L + j] = n;
      nIm[w * L + j] = -k;
      if (k !== 0) lossless = false;
      if (n * n < minN2[j]!) minN2[j] = n * n;
    }
  }
  const inc = table(design.incident, "incident");
  const sub = table(substrateId, "substrate");
  const ex = table(design.exit, "exit");
  if (inc.k.some((k) => k > 0)) warnings.push(`incident medium ${design.incident}: k ignored (taken as lossless)`);
  if (backside && ex.k.some((k) => k > 0)) warnings.push(`exit medium ${design.exit}: k ignored (taken as lossless)`);
  const subIm = new Float64Array(W);
  for (let w = 0; w < W; w++) subIm[w] = -sub.k[w]!;
  const nominal = Float64Array.from(thick);
  return {
    wavelengths,
    W,
    L,
    nRe,
    nIm,
    incident: Float64Array.from(inc.n),
    subRe: Float64Array.from(sub.n),
    subIm,
    exit: Float64Array.from(ex.n),
    lossless,
    backside,
    substrateNm: design.substrate.thicknessMm * 1e6,
    minN2,
    nominal,
    warnings,
  };
}

/** Angle- and polarization-dependent tables (thickness-independent). */
export interface PolTables {
  W: number;
  L: number;
  pol: "s" | "p";
  /** s² = (n0 sin θ0)² and 2π/λ per wavelength */
  s2: Float64Array;
  k0: Float64Array;
  /** incident admittance (real) */
  eta0: Float64Array;
  /** substrate admittance */
  etaSR: Float64Array;
  etaSI: Float64Array;
  /** back surface counted (incoherent combination, full 2×2 product) */
  backside: boolean;
  /** back-surface reflectance and transmittance (substrate → exit), one-pass internal transmittance */
  Rb: Float64Array;
  Tb: Float64Array;
  tau: Float64Array;
  /** packed per (w, j): [β, η, 1/η] for the real path (stride 3) */
  packR: Float64Array;
  /**
   * packed per (w, j): [βr, βi, ηr, ηi, (1/η)r, (1/η)i] (stride 6), β = 2π q / λ in nm⁻¹;
   * the complex path's only table
   */
  packC: Float64Array;
  /** packed per (w, j): [Re N², Im N²] (stride 2) */
  packN2: Float64Array;
  /** per layer: 1 when lossless and propagating at every wavelength (real layer step) */
  realLayer: Uint8Array;
  /** all layers lossless and propagating (real β and η): real fast path */
  real: boolean;
  /** lossless layers (index scaling may still allow the real path) */
  lossless: boolean;
  maxS2: number;
  minN2: Float64Array;
}

/** Build the per-angle, per-polarization tables. angleDeg in [0, 90) in the incident medium. */
export function tabulate(prep: PreparedStack, angleDeg: number, pol: "s" | "p", into?: PolTables): PolTables {
  if (!(angleDeg >= 0 && angleDeg < 90)) {
    throw new RangeError(`angleDeg: expected an angle in [0, 90) degrees, got ${String(angleDeg)}`);
  }
  const { W, L } = prep;
  const size = W * L;
  if (size > MAX_TABLE) {
    throw new RangeError(
      `design × grid too large: ${L} layers × ${W} wavelengths = ${size} (limit ${MAX_TABLE}); use fewer wavelengths`,
    );
  }
  // `into` (same stack and polarization) is refilled in place: no allocation for a new angle
  const reuse = into !== undefined && into.W === W && into.L === L && into.pol === pol;
  const packC = reuse ? into.packC : new Float64Array(6 * size);
  const packN2 = reuse ? into.packN2 : new Float64Array(2 * size);
  const realLayer = reuse ? into.realLayer.fill(1) : new Uint8Array(L).fill(1);
  const s2 = reuse ? into.s2 : new Float64Array(W);
  const k0 = reuse ? into.k0 : new Float64Array(W);
  const eta0 = reuse ? into.eta0 : new Float64Array(W);
  const etaSR = reuse ? into.etaSR : new Float64Array(W);
  const etaSI = reuse ? into.etaSI : new Float64Array(W);
  const Rb = reuse ? into.Rb : new Float64Array(W);
  const Tb = reuse ? into.Tb : new Float64Array(W);
  const tau = reuse ? into.tau : new Float64Array(W);
  const sinT = Math.sin((angleDeg * Math.PI) / 180);
  const q = new Float64Array(2);
  let real = true;
  let maxS2 = 0;
  for (let w = 0; w < W; w++) {
    const lam = prep.wavelengths[w]!;
    const n0 = prep.incident[w]!;
    const s = n0 * sinT;
    const ss = s * s;
    s2[w] = ss;
    if (ss > maxS2) maxS2 = ss;
    const kw = (2 * Math.PI) / lam;
    k0[w] = kw;
    for (let j = 0; j < L; j++) {
      const i = w * L + j;
      const nr = prep.nRe[i]!;
      const ni = prep.nIm[i]!;
      const Nr = nr * nr - ni * ni;
      const Ni = 2 * nr * ni;
      packN2[2 * i] = Nr;
      packN2[2 * i + 1] = Ni;
      forwardSqrt(Nr - ss, Ni, q);
      const qr = q[0]!;
      const qi = q[1]!;
      let er: number;
      let ei: number;
      if (pol === "s") {
        er = qr;
        ei = qi;
      } else {
        const dd = qr * qr + qi * qi;
        er = (Nr * qr + Ni * qi) / dd;
        ei = (Ni * qr - Nr * qi) / dd;
      }
      const de = er * er + ei * ei;
      const k = 6 * i;
      packC[k] = kw * qr;
      packC[k + 1] = kw * qi;
      packC[k + 2] = er;
      packC[k + 3] = ei;
      packC[k + 4] = er / de;
      packC[k + 5] = -ei / de;
      if (qi !== 0 || ei !== 0) {
        real = false;
        realLayer[j] = 0;
      }
    }
    const q0 = Math.sqrt(n0 * n0 - ss);
    eta0[w] = pol === "s" ? q0 : (n0 * n0) / q0;
    const sr = prep.subRe[w]!;
    const si = prep.subIm[w]!;
    const S2r = sr * sr - si * si;
    const S2i = 2 * sr * si;
    forwardSqrt(S2r - ss, S2i, q);
    const qsr = q[0]!;
    const qsi = q[1]!;
    let esr: number;
    let esi: number;
    if (pol === "s") {
      esr = qsr;
      esi = qsi;
    } else {
      const dd = qsr * qsr + qsi * qsi;
      esr = (S2r * qsr + S2i * qsi) / dd;
      esi = (S2i * qsr - S2r * qsi) / dd;
    }
    etaSR[w] = esr;
    etaSI[w] = esi;
    if (prep.backside) {
      const ne = prep.exit[w]!;
      forwardSqrt(ne * ne - ss, 0, q);
      let eer: number;
      let eei: number;
      if (pol === "s") {
        eer = q[0]!;
        eei = q[1]!;
      } else {
        const dd = q[0]! * q[0]! + q[1]! * q[1]!;
        eer = (ne * ne * q[0]!) / dd;
        eei = (-ne * ne * q[1]!) / dd;
      }
      const sumR = esr + eer;
      const sumI = esi + eei;
      const difR = esr - eer;
      const difI = esi - eei;
      const den = sumR * sumR + sumI * sumI;
      Rb[w] = (difR * difR + difI * difI) / den;
      Tb[w] = (4 * esr * eer) / den;
      // one pass through the substrate: |exp(−i 2π q_s d/λ)|² = exp(4π Im(q_s) d / λ); ≈ exp(−4πk d/(λ cos θ))
      tau[w] = Math.exp(2 * kw * qsi * prep.substrateNm);
    }
  }
  // real path table [β, η, 1/η]: half the memory traffic of the complex one
  const packR = reuse && into.packR.length === 3 * size ? into.packR : new Float64Array(real ? 3 * size : 0);
  if (real) {
    for (let i = 0; i < size; i++) {
      packR[3 * i] = packC[6 * i]!;
      packR[3 * i + 1] = packC[6 * i + 2]!;
      packR[3 * i + 2] = packC[6 * i + 4]!;
    }
  }
  if (reuse) {
    into.packR = packR;
    into.real = real;
    into.maxS2 = maxS2;
    return into;
  }
  return {
    packR, packC, packN2, realLayer,
    W, L, pol, s2, k0, eta0, etaSR, etaSI,
    backside: prep.backside, Rb, Tb, tau, real, lossless: prep.lossless, maxS2, minN2: prep.minN2,
  };
}

/** Amplitude outputs of the coherent front stack (tangential-field convention). */
export interface AmplitudeOut {
  rRe: Float64Array;
  rIm: Float64Array;
  tRe: Float64Array;
  tIm: Float64Array;
}

/**
 * One polarization's evaluator: preallocated scratch, no allocation per call.
 * `run` writes R, T, A (fractions) per wavelength.
 */
export class PolKernel {
  readonly t: PolTables;
  private readonly W: number;
  // front-stack matrix per wavelength (vector mode uses m11 = B, m21 = C)
  private readonly aR: Float64Array;
  private readonly aI: Float64Array;
  private readonly bR: Float64Array;
  private readonly bI: Float64Array;
  private readonly cR: Float64Array;
  private readonly cI: Float64Array;
  private readonly dR: Float64Array;
  private readonly dI: Float64Array;
  private readonly sc: Int32Array;

  constructor(tables: PolTables) {
    this.t = tables;
    const W = tables.W;
    this.W = W;
    this.aR = new Float64Array(W);
    this.aI = new Float64Array(W);
    this.bR = new Float64Array(W);
    this.bI = new Float64Array(W);
    this.cR = new Float64Array(W);
    this.cI = new Float64Array(W);
    this.dR = new Float64Array(W);
    this.dI = new Float64Array(W);
    this.sc = new Int32Array(W);
  }

  /**
   * Evaluate for thicknesses d (nm, deposition order) and optional per-layer index scale.
   * Writes R, T, A into the given arrays (length ≥ W); amplitudes when `amp` is given.
   */
  run(
    d: Float64Array,
    scale: Float64Array | undefined,
    R: Float64Array,
    T: Float64Array,
    A: Float64Array,
    amp?: AmplitudeOut,
  ): void {
    const t = this.t;
    if (t.backside) {
      if (scale) {
        if (this.realScaled(scale)) this.matRealScaled(d, scale);
        else this.matScaled(d, scale);
      } else if (t.real) this.matReal(d);
      else this.matComplex(d);
      this.finishMatrix(R, T, A, amp);
    } else {
      if (scale) {
        if (this.realScaled(scale)) this.vecRealScaled(d, scale);
        else this.vecScaled(d, scale);
      } else if (t.real) this.vecReal(d);
      else this.vecComplex(d);
      this.finishVector(R, T, A, amp);
    }
  }

  /** Real path possible under index scaling: lossless and propagating in every layer. */
  private realScaled(scale: Float64Array): boolean {
    const t = this.t;
    if (!t.lossless) return false;
    for (let j = 0; j < t.L; j++) {
      const f = scale[j]!;
      if (!(f * f * t.minN2[j]! > t.maxS2)) return false;
    }
    return true;
  }

  // ------------------------------------------------------------------ vector mode
  /**
   * Real path, two wavelengths per pass: the layer recurrence is a serial dependency chain, so
   * two independent chains keep the floating-point units busy (about 25 % faster). With an odd
   * count the last wavelength is computed in both chains.
   */
  private vecReal(d: Float64Array): void {
    const t = this.t;
    const L = t.L;
    const W = this.W;
    const pk = t.packR;
    const esR = t.etaSR;
    const esI = t.etaSI;
    const oBr = this.aR, oBi = this.aI, oCr = this.cR, oCi = this.cI, osc = this.sc;
    for (let w = 0; w < W; w += 2) {
      const w2 = w + 1 < W ? w + 1 : w;
      let Br = 1;
      let Bi = 0;
      let Cr = esR[w]!;
      let Ci = esI[w]!;
      let Br2 = 1;
      let Bi2 = 0;
      let Cr2 = esR[w2]!;
      let Ci2 = esI[w2]!;
      let k = 3 * w * L;
      let k2 = 3 * w2 * L;
      for (let j = 0; j < L; j++, k += 3, k2 += 3) {
        const dj = d[j]!;
        const x = pk[k]! * dj;
        const x2 = pk[k2]! * dj;
        const nq = x * TWO_OVER_PI + RND - RND;
        const nq2 = x2 * TWO_OVER_PI + RND - RND;
        const r = x - nq * PIO2_1 - nq * PIO2_1T;
        const r2 = x2 - nq2 * PIO2_1 - nq2 * PIO2_1T;
        const z = r * r;
        const z2 = r2 * r2;
        const sp = r + r * z * (S1 + z * (S2 + z * (S3 + z * (S4 + z * (S5 + z * S6)))));
        const sp2 = r2 + r2 * z2 * (S1 + z2 * (S2 + z2 * (S3 + z2 * (S4 + z2 * (S5 + z2 * S6)))));
        const cp = 1 - 0.5 * z + z * z * (C1 + z * (C2 + z * (C3 + z * (C4 + z * (C5 + z * C6)))));
        const cp2 = 1 - 0.5 * z2 + z2 * z2 * (C1 + z2 * (C2 + z2 * (C3 + z2 * (C4 + z2 * (C5 + z2 * C6)))));
        const qd = (nq | 0) & 3;
        const qd2 = (nq2 | 0) & 3;
        const qc = QUAD_C[qd]!;
        const qs = QUAD_S[qd]!;
        const qc2 = QUAD_C[qd2]!;
        const qs2 = QUAD_S[qd2]!;
        const s = sp * qc + cp * qs;
        const c = cp * qc - sp * qs;
        const s2 = sp2 * qc2 + cp2 * qs2;
        const c2 = cp2 * qc2 - sp2 * qs2;
        const a = s * pk[k + 2]!;
        const b = s * pk[k + 1]!;
        const a2 = s2 * pk[k2 + 2]!;
        const b2 = s2 * pk[k2 + 1]!;
        const nBr = c * Br - a * Ci;
        const nBi = c * Bi + a * Cr;
        const nCr = c * Cr - b * Bi;
        const nCi = c * Ci + b * Br;
        const nBr2 = c2 * Br2 - a2 * Ci2;
        const nBi2 = c2 * Bi2 + a2 * Cr2;
        const nCr2 = c2 * Cr2 - b2 * Bi2;
        const nCi2 = c2 * Ci2 + b2 * Br2;
        Br = nBr;
        Bi = nBi;
        Cr = nCr;
        Ci = nCi;
        Br2 = nBr2;
        Bi2 = nBi2;
        Cr2 = nCr2;
        Ci2 = nCi2;
      }
      oBr[w] = Br;
      oBi[w] = Bi;
      oCr[w] = Cr;
      oCi[w] = Ci;
      osc[w] = 0;
      oBr[w2] = Br2;
      oBi[w2] = Bi2;
      oCr[w2] = Cr2;
      oCi[w2] = Ci2;
      osc[w2] = 0;
    }
  }

  private vecRealScaled(d: Float64Array, scale: Float64Array): void {
    const t = this.t;
    const L = t.L;
    const W = this.W;
    const n2 = t.packN2;
    const p = t.pol === "p";
    const oBr = this.aR, oBi = this.aI, oCr = this.cR, oCi = this.cI, osc = this.sc;
    for (let w = 0; w < W; w++) {
      let Br = 1;
      let Bi = 0;
      let Cr = t.etaSR[w]!;
      let Ci = t.etaSI[w]!;
      const ss = t.s2[w]!;
      const kw = t.k0[w]!;
      const base = w * L;
      for (let j = 0; j < L; j++) {
        const i = base + j;
        const f = scale[j]!;
        const N2 = n2[2 * i]! * f * f;
        const qv = Math.sqrt(N2 - ss);
        const eta = p ? N2 / qv : qv;
        const x = kw * qv * d[j]!;
        const nq = x * TWO_OVER_PI + RND - RND;
        const r = x - nq * PIO2_1 - nq * PIO2_1T;
        const z = r * r;
        const sp = r + r * z * (S1 + z * (S2 + z * (S3 + z * (S4 + z * (S5 + z * S6)))));
        const cp = 1 - 0.5 * z + z * z * (C1 + z * (C2 + z * (C3 + z * (C4 + z * (C5 + z * C6)))));
        const qd = (nq | 0) & 3;
        const qc = QUAD_C[qd]!;
        const qs = QUAD_S[qd]!;
        const s = sp * qc + cp * qs;
        const c = cp * qc - sp * qs;
        const a = s / eta;
        const b = s * eta;
        const nBr = c * Br - a * Ci;
        const nBi = c * Bi + a * Cr;
        const nCr = c * Cr - b * Bi;
        const nCi = c * Ci + b * Br;
        Br = nBr;
        Bi = nBi;
        Cr = nCr;
        Ci = nCi;
      }
      oBr[w] = Br;
      oBi[w] = Bi;
      oCr[w] = Cr;
      oCi[w] = Ci;
      osc[w] = 0;
    }
  }

  /** Complex path, two wavelengths per pass (independent chains, as vecReal). */
  private vecComplex(d: Float64Array): void {
    const t = this.t;
    const L = t.L;
    const W = this.W;
    const pk = t.packC;
    const rl = t.realLayer;
    const oBr = this.aR, oBi = this.aI, oCr = this.cR, oCi = this.cI, osc = this.sc;
    for (let w = 0; w < W; w += 2) {
      const w2 = w + 1 < W ? w + 1 : w;
      let Br = 1;
      let Bi = 0;
      let Cr = t.etaSR[w]!;
      let Ci = t.etaSI[w]!;
      let Br2 = 1;
      let Bi2 = 0;
      let Cr2 = t.etaSR[w2]!;
      let Ci2 = t.etaSI[w2]!;
      let acc = 0;
      let acc2 = 0;
      let nsc = 0;
      let nsc2 = 0;
      let k = 6 * w * L;
      let k2 = 6 * w2 * L;
      for (let j = 0; j < L; j++, k += 6, k2 += 6) {
        const dj = d[j]!;
        const x = pk[k]! * dj;
        let y = pk[k + 1]! * dj;
        if (y < -MAX_DECAY) y = -MAX_DECAY;
        // sin, cos of x
        const nq = x * TWO_OVER_PI + RND - RND;
        const r = x - nq * PIO2_1 - nq * PIO2_1T;
        const z = r * r;
        const sp = r + r * z * (S1 + z * (S2 + z * (S3 + z * (S4 + z * (S5 + z * S6)))));
        const cp = 1 - 0.5 * z + z * z * (C1 + z * (C2 + z * (C3 + z * (C4 + z * (C5 + z * C6)))));
        const qd = (nq | 0) & 3;
        const qc = QUAD_C[qd]!;
        const qs = QUAD_S[qd]!;
        const sa = sp * qc + cp * qs;
        const ca = cp * qc - sp * qs;
        const x2 = pk[k2]! * dj;
        let y2 = pk[k2 + 1]! * dj;
        if (y2 < -MAX_DECAY) y2 = -MAX_DECAY;
        // sin, cos of x2
        const nq2 = x2 * TWO_OVER_PI + RND - RND;
        const r2 = x2 - nq2 * PIO2_1 - nq2 * PIO2_1T;
        const z2 = r2 * r2;
        const sp2 = r2 + r2 * z2 * (S1 + z2 * (S2 + z2 * (S3 + z2 * (S4 + z2 * (S5 + z2 * S6)))));
        const cp2 = 1 - 0.5 * z2 + z2 * z2 * (C1 + z2 * (C2 + z2 * (C3 + z2 * (C4 + z2 * (C5 + z2 * C6)))));
        const qd2 = (nq2 | 0) & 3;
        const qc2 = QUAD_C[qd2]!;
        const qs2 = QUAD_S[qd2]!;
        const sa2 = sp2 * qc2 + cp2 * qs2;
        const ca2 = cp2 * qc2 - sp2 * qs2;
        if (rl[j] === 1) {
          // lossless, propagating layer inside an absorbing stack: real matrix elements
          const a = sa * pk[k + 4]!;
          const b = sa * pk[k + 2]!;
          const rBr = ca * Br - a * Ci;
          const rBi = ca * Bi + a * Cr;
          const rCr = ca * Cr - b * Bi;
          const rCi = ca * Ci + b * Br;
          Br = rBr;
          Bi = rBi;
          Cr = rCr;
          Ci = rCi;
          const a2 = sa2 * pk[k2 + 4]!;
          const b2 = sa2 * pk[k2 + 2]!;
          const rBr2 = ca2 * Br2 - a2 * Ci2;
          const rBi2 = ca2 * Bi2 + a2 * Cr2;
          const rCr2 = ca2 * Cr2 - b2 * Bi2;
          const rCi2 = ca2 * Ci2 + b2 * Br2;
          Br2 = rBr2;
          Bi2 = rBi2;
          Cr2 = rCr2;
          Ci2 = rCi2;
          continue;
        }
        // cosh, sinh of y
        const nn = y * LOG2E + RND - RND;
        const ry = y - nn * LN2_HI - nn * LN2_LO;
        const zy = ry * ry;
        const ev = 1 + zy * (E1 + zy * (E2 + zy * (E3 + zy * (E4 + zy * (E5 + zy * E6)))));
        const od = ry * (1 + zy * (O1 + zy * (O2 + zy * (O3 + zy * (O4 + zy * (O5 + zy * O6))))));
        const ni = nn | 0;
        const ep = (ev + od) * POW2[POW2_OFFSET + ni]!;
        const em = (ev - od) * POW2[POW2_OFFSET - ni]!;
        const ch = 0.5 * (ep + em);
        const sh = 0.5 * (ep - em);
        // cos δ = ca ch − i sa sh ; i sin δ = −ca sh + i sa ch
        const csr = ca * ch;
        const csi = -sa * sh;
        const isr = -ca * sh;
        const isi = sa * ch;
        const er = pk[k + 2]!, ei = pk[k + 3]!, ir = pk[k + 4]!, ii = pk[k + 5]!;
        const m12r = isr * ir - isi * ii;
        const m12i = isr * ii + isi * ir;
        const m21r = isr * er - isi * ei;
        const m21i = isr * ei + isi * er;
        const nBr = csr * Br - csi * Bi + m12r * Cr - m12i * Ci;
        const nBi = csr * Bi + csi * Br + m12r * Ci + m12i * Cr;
        const nCr = m21r * Br - m21i * Bi + csr * Cr - csi * Ci;
        const nCi = m21r * Bi + m21i * Br + csr * Ci + csi * Cr;
        Br = nBr;
        Bi = nBi;
        Cr = nCr;
        Ci = nCi;
        // cosh, sinh of y2
        const nn2 = y2 * LOG2E + RND - RND;
        const ry2 = y2 - nn2 * LN2_HI - nn2 * LN2_LO;
        const zy2 = ry2 * ry2;
        const ev2 = 1 + zy2 * (E1 + zy2 * (E2 + zy2 * (E3 + zy2 * (E4 + zy2 * (E5 + zy2 * E6)))));
        const od2 = ry2 * (1 + zy2 * (O1 + zy2 * (O2 + zy2 * (O3 + zy2 * (O4 + zy2 * (O5 + zy2 * O6))))));
        const ni2 = nn2 | 0;
        const ep2 = (ev2 + od2) * POW2[POW2_OFFSET + ni2]!;
        const em2 = (ev2 - od2) * POW2[POW2_OFFSET - ni2]!;
        const ch2 = 0.5 * (ep2 + em2);
        const sh2 = 0.5 * (ep2 - em2);
        // cos δ = ca2 ch2 − i sa2 sh2 ; i sin δ = −ca2 sh2 + i sa2 ch2
        const csr2 = ca2 * ch2;
        const csi2 = -sa2 * sh2;
        const isr2 = -ca2 * sh2;
        const isi2 = sa2 * ch2;
        const er2 = pk[k2 + 2]!, ei2 = pk[k2 + 3]!, ir2 = pk[k2 + 4]!, ii2 = pk[k2 + 5]!;
        const m12r2 = isr2 * ir2 - isi2 * ii2;
        const m12i2 = isr2 * ii2 + isi2 * ir2;
        const m21r2 = isr2 * er2 - isi2 * ei2;
        const m21i2 = isr2 * ei2 + isi2 * er2;
        const nBr2 = csr2 * Br2 - csi2 * Bi2 + m12r2 * Cr2 - m12i2 * Ci2;
        const nBi2 = csr2 * Bi2 + csi2 * Br2 + m12r2 * Ci2 + m12i2 * Cr2;
        const nCr2 = m21r2 * Br2 - m21i2 * Bi2 + csr2 * Cr2 - csi2 * Ci2;
        const nCi2 = m21r2 * Bi2 + m21i2 * Br2 + csr2 * Ci2 + csi2 * Cr2;
        Br2 = nBr2;
        Bi2 = nBi2;
        Cr2 = nCr2;
        Ci2 = nCi2;
        acc += y;
        if (acc < -MAX_DECAY) {
          Br *= RESCALE;
          Bi *= RESCALE;
          Cr *= RESCALE;
          Ci *= RESCALE;
          acc += RESCALE_LOG;
          nsc++;
        }
        acc2 += y2;
        if (acc2 < -MAX_DECAY) {
          Br2 *= RESCALE;
          Bi2 *= RESCALE;
          Cr2 *= RESCALE;
          Ci2 *= RESCALE;
          acc2 += RESCALE_LOG;
          nsc2++;
        }
      }
      oBr[w] = Br;
      oBi[w] = Bi;
      oCr[w] = Cr;
      oCi[w] = Ci;
      osc[w] = nsc;
      oBr[w2] = Br2;
      oBi[w2] = Bi2;
      oCr[w2] = Cr2;
      oCi[w2] = Ci2;
      osc[w2] = nsc2;
    }
  }

  /** Complex path with q and η recomputed from N·f, two wavelengths per pass. */
  private vecScaled(d: Float64Array, scale: Float64Array): void {
    const t = this.t;
    const L = t.L;
    const W = this.W;
    const n2 = t.packN2;
    const p = t.pol === "p";
    const oBr = this.aR, oBi = this.aI, oCr = this.cR, oCi = this.cI, osc = this.sc;
    for (let w = 0; w < W; w += 2) {
      const w2 = w + 1 < W ? w + 1 : w;
      let Br = 1;
      let Bi = 0;
      let Cr = t.etaSR[w]!;
      let Ci = t.etaSI[w]!;
      let Br2 = 1;
      let Bi2 = 0;
      let Cr2 = t.etaSR[w2]!;
      let Ci2 = t.etaSI[w2]!;
      const ss = t.s2[w]!;
      const kw = t.k0[w]!;
      const ss2 = t.s2[w2]!;
      const kw2 = t.k0[w2]!;
      let acc = 0;
      let nsc = 0;
      let acc2 = 0;
      let nsc2 = 0;
      const base = w * L;
      const base2 = w2 * L;
      for (let j = 0; j < L; j++) {
        const f2 = scale[j]! * scale[j]!;
        const i = base + j;
        const Nr = n2[2 * i]! * f2;
        const Ni = n2[2 * i + 1]! * f2;
        // q = forward √(N² − s²). Im N² = −2nk ≤ 0 (n > 0, k ≥ 0, scale > 0), so the principal
        // root already decays (Im q ≤ 0) when Re(N² − s²) ≥ 0; otherwise take (−Im/2u, −u).
        // u is floored so that q → 0 gives the correct limit sin δ / η → k0 d.
        const zr = Nr - ss;
        const rr = Math.sqrt(zr * zr + Ni * Ni);
        let u = Math.sqrt(0.5 * (rr + Math.abs(zr)));
        if (u < 1e-150) u = 1e-150;
        const h = (0.5 * Ni) / u;
        const qr = zr >= 0 ? u : -h;
        const qi = zr >= 0 ? h : -u;
        const iq2 = 1 / (qr * qr + qi * qi);
        let er: number;
        let ei: number;
        let ir: number;
        let ii: number;
        if (p) {
          // η = N²/q = N² q̄ /|q|², 1/η = q/N² = q N̄² / |N²|²
          er = (Nr * qr + Ni * qi) * iq2;
          ei = (Ni * qr - Nr * qi) * iq2;
          const iN4 = 1 / (Nr * Nr + Ni * Ni);
          ir = (qr * Nr + qi * Ni) * iN4;
          ii = (qi * Nr - qr * Ni) * iN4;
        } else {
          er = qr;
          ei = qi;
          ir = qr * iq2;
          ii = -qi * iq2;
        }
        const kd = kw * d[j]!;
        const x = qr * kd;
        let y = qi * kd;
        if (y < -MAX_DECAY) y = -MAX_DECAY;
        const nq = x * TWO_OVER_PI + RND - RND;
        const r = x - nq * PIO2_1 - nq * PIO2_1T;
        const z = r * r;
        const sp = r + r * z * (S1 + z * (S2 + z * (S3 + z * (S4 + z * (S5 + z * S6)))));
        const cp = 1 - 0.5 * z + z * z * (C1 + z * (C2 + z * (C3 + z * (C4 + z * (C5 + z * C6)))));
        const qd = (nq | 0) & 3;
        const qc = QUAD_C[qd]!;
        const qs = QUAD_S[qd]!;
        const sa = sp * qc + cp * qs;
        const ca = cp * qc - sp * qs;
        const nn = y * LOG2E + RND - RND;
        const ry = y - nn * LN2_HI - nn * LN2_LO;
        const zy = ry * ry;
        const ev = 1 + zy * (E1 + zy * (E2 + zy * (E3 + zy * (E4 + zy * (E5 + zy * E6)))));
        const od = ry * (1 + zy * (O1 + zy * (O2 + zy * (O3 + zy * (O4 + zy * (O5 + zy * O6))))));
        const nI = nn | 0;
        const ep = (ev + od) * POW2[POW2_OFFSET + nI]!;
        const em = (ev - od) * POW2[POW2_OFFSET - nI]!;
        const ch = 0.5 * (ep + em);
        const sh = 0.5 * (ep - em);
        const csr = ca * ch;
        const csi = -sa * sh;
        const isr = -ca * sh;
        const isi = sa * ch;
        const m12r = isr * ir - isi * ii;
        const m12i = isr * ii + isi * ir;
        const m21r = isr * er - isi * ei;
        const m21i = isr * ei + isi * er;
        const nBr = csr * Br - csi * Bi + m12r * Cr - m12i * Ci;
        const nBi = csr * Bi + csi * Br + m12r * Ci + m12i * Cr;
        const nCr = m21r * Br - m21i * Bi + csr * Cr - csi * Ci;
        const nCi = m21r * Bi + m21i * Br + csr * Ci + csi * Cr;
        Br = nBr;
        Bi = nBi;
        Cr = nCr;
        Ci = nCi;
        const i2 = base2 + j;
        const Nr2 = n2[2 * i2]! * f2;
        const Ni2 = n2[2 * i2 + 1]! * f2;
        // q = forward √(N² − s²). Im N² = −2nk ≤ 0 (n > 0, k ≥ 0, scale > 0), so the principal
        // root already decays (Im q ≤ 0) when Re(N² − s²) ≥ 0; otherwise take (−Im/2u, −u2).
        // u2 is floored so that q → 0 gives the correct limit sin δ / η → k0 d.
        const zr2 = Nr2 - ss2;
        const rr2 = Math.sqrt(zr2 * zr2 + Ni2 * Ni2);
        let u2 = Math.sqrt(0.5 * (rr2 + Math.abs(zr2)));
        if (u2 < 1e-150) u2 = 1e-150;
        const h2 = (0.5 * Ni2) / u2;
        const qr2 = zr2 >= 0 ? u2 : -h2;
        const qi2 = zr2 >= 0 ? h2 : -u2;
        const iq22 = 1 / (qr2 * qr2 + qi2 * qi2);
        let er2: number;
        let ei2: number;
        let ir2: number;
        let ii2: number;
        if (p) {
          // η = N²/q = N² q̄ /|q|², 1/η = q/N² = q N̄² / |N²|²
          er2 = (Nr2 * qr2 + Ni2 * qi2) * iq22;
          ei2 = (Ni2 * qr2 - Nr2 * qi2) * iq22;
          const iN42 = 1 / (Nr2 * Nr2 + Ni2 * Ni2);
          ir2 = (qr2 * Nr2 + qi2 * Ni2) * iN42;
          ii2 = (qi2 * Nr2 - qr2 * Ni2) * iN42;
        } else {
          er2 = qr2;
          ei2 = qi2;
          ir2 = qr2 * iq22;
          ii2 = -qi2 * iq22;
        }
        const kd2 = kw2 * d[j]!;
        const x2 = qr2 * kd2;
        let y2 = qi2 * kd2;
        if (y2 < -MAX_DECAY) y2 = -MAX_DECAY;
        const nq2 = x2 * TWO_OVER_PI + RND - RND;
        const r2 = x2 - nq2 * PIO2_1 - nq2 * PIO2_1T;
        const z2 = r2 * r2;
        const sp2 = r2 + r2 * z2 * (S1 + z2 * (S2 + z2 * (S3 + z2 * (S4 + z2 * (S5 + z2 * S6)))));
        const cp2 = 1 - 0.5 * z2 + z2 * z2 * (C1 + z2 * (C2 + z2 * (C3 + z2 * (C4 + z2 * (C5 + z2 * C6)))));
        const qd2 = (nq2 | 0) & 3;
        const qc2 = QUAD_C[qd2]!;
        const qs2 = QUAD_S[qd2]!;
        const sa2 = sp2 * qc2 + cp2 * qs2;
        const ca2 = cp2 * qc2 - sp2 * qs2;
        const nn2 = y2 * LOG2E + RND - RND;
        const ry2 = y2 - nn2 * LN2_HI - nn2 * LN2_LO;
        const zy2 = ry2 * ry2;
        const ev2 = 1 + zy2 * (E1 + zy2 * (E2 + zy2 * (E3 + zy2 * (E4 + zy2 * (E5 + zy2 * E6)))));
        const od2 = ry2 * (1 + zy2 * (O1 + zy2 * (O2 + zy2 * (O3 + zy2 * (O4 + zy2 * (O5 + zy2 * O6))))));
        const nI2 = nn2 | 0;
        const ep2 = (ev2 + od2) * POW2[POW2_OFFSET + nI2]!;
        const em2 = (ev2 - od2) * POW2[POW2_OFFSET - nI2]!;
        const ch2 = 0.5 * (ep2 + em2);
        const sh2 = 0.5 * (ep2 - em2);
        const csr2 = ca2 * ch2;
        const csi2 = -sa2 * sh2;
        const isr2 = -ca2 * sh2;
        const isi2 = sa2 * ch2;
        const m12r2 = isr2 * ir2 - isi2 * ii2;
        const m12i2 = isr2 * ii2 + isi2 * ir2;
        const m21r2 = isr2 * er2 - isi2 * ei2;
        const m21i2 = isr2 * ei2 + isi2 * er2;
        const nBr2 = csr2 * Br2 - csi2 * Bi2 + m12r2 * Cr2 - m12i2 * Ci2;
        const nBi2 = csr2 * Bi2 + csi2 * Br2 + m12r2 * Ci2 + m12i2 * Cr2;
        const nCr2 = m21r2 * Br2 - m21i2 * Bi2 + csr2 * Cr2 - csi2 * Ci2;
        const nCi2 = m21r2 * Bi2 + m21i2 * Br2 + csr2 * Ci2 + csi2 * Cr2;
        Br2 = nBr2;
        Bi2 = nBi2;
        Cr2 = nCr2;
        Ci2 = nCi2;
        acc += y;
        if (acc < -MAX_DECAY) {
          Br *= RESCALE;
          Bi *= RESCALE;
          Cr *= RESCALE;
          Ci *= RESCALE;
          acc += RESCALE_LOG;
          nsc++;
        }
        acc2 += y2;
        if (acc2 < -MAX_DECAY) {
          Br2 *= RESCALE;
          Bi2 *= RESCALE;
          Cr2 *= RESCALE;
          Ci2 *= RESCALE;
          acc2 += RESCALE_LOG;
          nsc2++;
        }
      }
      oBr[w] = Br;
      oBi[w] = Bi;
      oCr[w] = Cr;
      oCi[w] = Ci;
      osc[w] = nsc;
      oBr[w2] = Br2;
      oBi[w2] = Bi2;
      oCr[w2] = Cr2;
      oCi[w2] = Ci2;
      osc[w2] = nsc2;
    }
  }

  private finishVector(R: Float64Array, T: Float64Array, A: Float64Array, amp?: AmplitudeOut): void {
    const t = this.t;
    const W = this.W;
    for (let w = 0; w < W; w++) {
      const e0 = t.eta0[w]!;
      const Br = this.aR[w]!, Bi = this.aI[w]!, Cr = this.cR[w]!, Ci = this.cI[w]!;
      const dr = e0 * Br + Cr;
      const di = e0 * Bi + Ci;
      const nr = e0 * Br - Cr;
      const ni = e0 * Bi - Ci;
      const dd = dr * dr + di * di;
      const Rv = (nr * nr + ni * ni) / dd;
      let Tv = (4 * e0 * t.etaSR[w]!) / dd;
      const nsc = this.sc[w]!;
      if (nsc > 0) Tv *= Math.pow(RESCALE * RESCALE, nsc);
      R[w] = Rv;
      T[w] = Tv;
      A[w] = 1 - Rv - Tv;
      if (amp) {
        amp.rRe[w] = (nr * dr + ni * di) / dd;
        amp.rIm[w] = (ni * dr - nr * di) / dd;
        const f = nsc > 0 ? Math.pow(RESCALE, nsc) : 1;
        amp.tRe[w] = ((2 * e0 * dr) / dd) * f;
        amp.tIm[w] = ((-2 * e0 * di) / dd) * f;
      }
    }
  }

  // ------------------------------------------------------------------ matrix mode (backside)
  /** Full real-structured 2×2 product, two wavelengths per pass (see vecReal). */
  private matReal(d: Float64Array): void {
    const t = this.t;
    const L = t.L;
    const W = this.W;
    const pk = t.packR;
    for (let w = 0; w < W; w += 2) {
      const w2 = w + 1 < W ? w + 1 : w;
      // M = [[A, iB], [iC, D]] with A, B, C, D real (product of lossless layer matrices)
      let mA = 1;
      let mB = 0;
      let mC = 0;
      let mD = 1;
      let mA2 = 1;
      let mB2 = 0;
      let mC2 = 0;
      let mD2 = 1;
      let k = 3 * w * L;
      let k2 = 3 * w2 * L;
      for (let j = 0; j < L; j++, k += 3, k2 += 3) {
        const dj = d[j]!;
        const x = pk[k]! * dj;
        const x2 = pk[k2]! * dj;
        const nq = x * TWO_OVER_PI + RND - RND;
        const nq2 = x2 * TWO_OVER_PI + RND - RND;
        const r = x - nq * PIO2_1 - nq * PIO2_1T;
        const r2 = x2 - nq2 * PIO2_1 - nq2 * PIO2_1T;
        const z = r * r;
        const z2 = r2 * r2;
        const sp = r + r * z * (S1 + z * (S2 + z * (S3 + z * (S4 + z * (S5 + z * S6)))));
        const sp2 = r2 + r2 * z2 * (S1 + z2 * (S2 + z2 * (S3 + z2 * (S4 + z2 * (S5 + z2 * S6)))));
        const cp = 1 - 0.5 * z + z * z * (C1 + z * (C2 + z * (C3 + z * (C4 + z * (C5 + z * C6)))));
        const cp2 = 1 - 0.5 * z2 + z2 * z2 * (C1 + z2 * (C2 + z2 * (C3 + z2 * (C4 + z2 * (C5 + z2 * C6)))));
        const qd = (nq | 0) & 3;
        const qd2 = (nq2 | 0) & 3;
        const qc = QUAD_C[qd]!;
        const qs = QUAD_S[qd]!;
        const qc2 = QUAD_C[qd2]!;
        const qs2 = QUAD_S[qd2]!;
        const s = sp * qc + cp * qs;
        const c = cp * qc - sp * qs;
        const s2 = sp2 * qc2 + cp2 * qs2;
        const c2 = cp2 * qc2 - sp2 * qs2;
        const a = s * pk[k + 2]!;
        const b = s * pk[k + 1]!;
        const a2 = s2 * pk[k2 + 2]!;
        const b2 = s2 * pk[k2 + 1]!;
        const nA = c * mA - a * mC;
        const nB = c * mB + a * mD;
        const nC = b * mA + c * mC;
        const nD = c * mD - b * mB;
        const nA2 = c2 * mA2 - a2 * mC2;
        const nB2 = c2 * mB2 + a2 * mD2;
        const nC2 = b2 * mA2 + c2 * mC2;
        const nD2 = c2 * mD2 - b2 * mB2;
        mA = nA;
        mB = nB;
        mC = nC;
        mD = nD;
        mA2 = nA2;
        mB2 = nB2;
        mC2 = nC2;
        mD2 = nD2;
      }
      this.aR[w] = mA;
      this.aI[w] = 0;
      this.bR[w] = 0;
      this.bI[w] = mB;
      this.cR[w] = 0;
      this.cI[w] = mC;
      this.dR[w] = mD;
      this.dI[w] = 0;
      this.sc[w] = 0;
      this.aR[w2] = mA2;
      this.aI[w2] = 0;
      this.bR[w2] = 0;
      this.bI[w2] = mB2;
      this.cR[w2] = 0;
      this.cI[w2] = mC2;
      this.dR[w2] = mD2;
      this.dI[w2] = 0;
      this.sc[w2] = 0;
    }
  }

  private matRealScaled(d: Float64Array, scale: Float64Array): void {
    const t = this.t;
    const L = t.L;
    const W = this.W;
    const n2 = t.packN2;
    const p = t.pol === "p";
    for (let w = 0; w < W; w++) {
      let mA = 1;
      let mB = 0;
      let mC = 0;
      let mD = 1;
      const ss = t.s2[w]!;
      const kw = t.k0[w]!;
      const base = w * L;
      for (let j = 0; j < L; j++) {
        const i = base + j;
        const f = scale[j]!;
        const N2 = n2[2 * i]! * f * f;
        const qv = Math.sqrt(N2 - ss);
        const eta = p ? N2 / qv : qv;
        const x = kw * qv * d[j]!;
        const nq = x * TWO_OVER_PI + RND - RND;
        const r = x - nq * PIO2_1 - nq * PIO2_1T;
        const z = r * r;
        const sp = r + r * z * (S1 + z * (S2 + z * (S3 + z * (S4 + z * (S5 + z * S6)))));
        const cp = 1 - 0.5 * z + z * z * (C1 + z * (C2 + z * (C3 + z * (C4 + z * (C5 + z * C6)))));
        const qd = (nq | 0) & 3;
        const qc = QUAD_C[qd]!;
        const qs = QUAD_S[qd]!;
        const s = sp * qc + cp * qs;
        const c = cp * qc - sp * qs;
        const a = s / eta;
        const b = s * eta;
        const nA = c * mA - a * mC;
        const nB = c * mB + a * mD;
        const nC = b * mA + c * mC;
        const nD = c * mD - b * mB;
        mA = nA;
        mB = nB;
        mC = nC;
        mD = nD;
      }
      this.aR[w] = mA;
      this.aI[w] = 0;
      this.bR[w] = 0;
      this.bI[w] = mB;
      this.cR[w] = 0;
      this.cI[w] = mC;
      this.dR[w] = mD;
      this.dI[w] = 0;
      this.sc[w] = 0;
    }
  }

  private matComplex(d: Float64Array): void {
    this.matGeneral(d, undefined);
  }

  private matScaled(d: Float64Array, scale: Float64Array): void {
    this.matGeneral(d, scale);
  }

  /** Full complex matrix product; recomputes q and η when `scale` is given. */
  private matGeneral(d: Float64Array, scale: Float64Array | undefined): void {
    const t = this.t;
    const L = t.L;
    const W = this.W;
    const p = t.pol === "p";
    const pk = t.packC;
    const n2 = t.packN2;
    const rl = t.realLayer;
    for (let w = 0; w < W; w++) {
      let aR = 1, aI = 0, bR = 0, bI = 0, cR = 0, cI = 0, dR = 1, dI = 0;
      const ss = t.s2[w]!;
      const kw = t.k0[w]!;
      let acc = 0;
      let nsc = 0;
      const base = w * L;
      for (let j = 0; j < L; j++) {
        const i = base + j;
        let xr: number, yr: number, er: number, ei: number, ir: number, ii: number;
        if (scale) {
          // same forward-branch recomputation as vecScaled
          const f2 = scale[j]! * scale[j]!;
          const Nr = n2[2 * i]! * f2;
          const Ni = n2[2 * i + 1]! * f2;
          const zr = Nr - ss;
          const rr = Math.sqrt(zr * zr + Ni * Ni);
          let u = Math.sqrt(0.5 * (rr + Math.abs(zr)));
          if (u < 1e-150) u = 1e-150;
          const h = (0.5 * Ni) / u;
          const qr = zr >= 0 ? u : -h;
          const qi = zr >= 0 ? h : -u;
          const iq2 = 1 / (qr * qr + qi * qi);
          if (p) {
            er = (Nr * qr + Ni * qi) * iq2;
            ei = (Ni * qr - Nr * qi) * iq2;
            const iN4 = 1 / (Nr * Nr + Ni * Ni);
            ir = (qr * Nr + qi * Ni) * iN4;
            ii = (qi * Nr - qr * Ni) * iN4;
          } else {
            er = qr;
            ei = qi;
            ir = qr * iq2;
            ii = -qi * iq2;
          }
          const kd = kw * d[j]!;
          xr = qr * kd;
          yr = qi * kd;
        } else {
          const k = 6 * i;
          xr = pk[k]! * d[j]!;
          yr = pk[k + 1]! * d[j]!;
          er = pk[k + 2]!;
          ei = pk[k + 3]!;
          ir = pk[k + 4]!;
          ii = pk[k + 5]!;
        }
        if (yr < -MAX_DECAY) yr = -MAX_DECAY;
        const nq = xr * TWO_OVER_PI + RND - RND;
        const r = xr - nq * PIO2_1 - nq * PIO2_1T;
        const z = r * r;
        const sp = r + r * z * (S1 + z * (S2 + z * (S3 + z * (S4 + z * (S5 + z * S6)))));
        const cp = 1 - 0.5 * z + z * z * (C1 + z * (C2 + z * (C3 + z * (C4 + z * (C5 + z * C6)))));
        const qd = (nq | 0) & 3;
        const qc = QUAD_C[qd]!;
        const qs = QUAD_S[qd]!;
        const sa = sp * qc + cp * qs;
        const ca = cp * qc - sp * qs;
        if (!scale && rl[j] === 1) {
          // lossless, propagating layer: [[c, i a], [i b, c]] × M with real c, a, b
          const a = sa * ir;
          const b = sa * er;
          const xaR = ca * aR - a * cI;
          const xaI = ca * aI + a * cR;
          const xbR = ca * bR - a * dI;
          const xbI = ca * bI + a * dR;
          const xcR = ca * cR - b * aI;
          const xcI = ca * cI + b * aR;
          const xdR = ca * dR - b * bI;
          const xdI = ca * dI + b * bR;
          aR = xaR; aI = xaI; bR = xbR; bI = xbI; cR = xcR; cI = xcI; dR = xdR; dI = xdI;
          continue;
        }
        const nn = yr * LOG2E + RND - RND;
        const ry = yr - nn * LN2_HI - nn * LN2_LO;
        const zy = ry * ry;
        const ev = 1 + zy * (E1 + zy * (E2 + zy * (E3 + zy * (E4 + zy * (E5 + zy * E6)))));
        const od = ry * (1 + zy * (O1 + zy * (O2 + zy * (O3 + zy * (O4 + zy * (O5 + zy * O6))))));
        const nI = nn | 0;
        const ep = (ev + od) * POW2[POW2_OFFSET + nI]!;
        const em = (ev - od) * POW2[POW2_OFFSET - nI]!;
        const ch = 0.5 * (ep + em);
        const sh = 0.5 * (ep - em);
        const csr = ca * ch;
        const csi = -sa * sh;
        const isr = -ca * sh;
        const isi = sa * ch;
        const m12r = isr * ir - isi * ii;
        const m12i = isr * ii + isi * ir;
        const m21r = isr * er - isi * ei;
        const m21i = isr * ei + isi * er;
        // [[cs, m12], [m21, cs]] × [[a, b], [c, d]]
        const naR = csr * aR - csi * aI + m12r * cR - m12i * cI;
        const naI = csr * aI + csi * aR + m12r * cI + m12i * cR;
        const nbR = csr * bR - csi * bI + m12r * dR - m12i * dI;
        const nbI = csr * bI + csi * bR + m12r * dI + m12i * dR;
        const ncR = m21r * aR - m21i * aI + csr * cR - csi * cI;
        const ncI = m21r * aI + m21i * aR + csr * cI + csi * cR;
        const ndR = m21r * bR - m21i * bI + csr * dR - csi * dI;
        const ndI = m21r * bI + m21i * bR + csr * dI + csi * dR;
        aR = naR; aI = naI; bR = nbR; bI = nbI; cR = ncR; cI = ncI; dR = ndR; dI = ndI;
        acc += yr;
        if (acc < -MAX_DECAY) {
          aR *= RESCALE; aI *= RESCALE; bR *= RESCALE; bI *= RESCALE;
          cR *= RESCALE; cI *= RESCALE; dR *= RESCALE; dI *= RESCALE;
          acc += RESCALE_LOG;
          nsc++;
        }
      }
      this.aR[w] = aR; this.aI[w] = aI; this.bR[w] = bR; this.bI[w] = bI;
      this.cR[w] = cR; this.cI[w] = cI; this.dR[w] = dR; this.dI[w] = dI;
      this.sc[w] = nsc;
    }
  }

  private finishMatrix(R: Float64Array, T: Float64Array, A: Float64Array, amp?: AmplitudeOut): void {
    const t = this.t;
    const W = this.W;
    for (let w = 0; w < W; w++) {
      const e0 = t.eta0[w]!;
      const sr = t.etaSR[w]!;
      const si = t.etaSI[w]!;
      const aR = this.aR[w]!, aI = this.aI[w]!, bR = this.bR[w]!, bI = this.bI[w]!;
      const cR = this.cR[w]!, cI = this.cI[w]!, dR = this.dR[w]!, dI = this.dI[w]!;
      // front: [B, C] = M [1, ηs]
      const Br = aR + bR * sr - bI * si;
      const Bi = aI + bR * si + bI * sr;
      const Cr = cR + dR * sr - dI * si;
      const Ci = cI + dR * si + dI * sr;
      const dr = e0 * Br + Cr;
      const di = e0 * Bi + Ci;
      const nr = e0 * Br - Cr;
      const ni = e0 * Bi - Ci;
      const dd = dr * dr + di * di;
      const Rf = (nr * nr + ni * ni) / dd;
      let Tf = (4 * e0 * sr) / dd;
      const nsc = this.sc[w]!;
      if (nsc > 0) Tf *= Math.pow(RESCALE * RESCALE, nsc);
      // seen from the substrate: reversed stack [[d, b], [c, a]] applied to [1, η0]
      const B2r = dR + bR * e0;
      const B2i = dI + bI * e0;
      const C2r = cR + aR * e0;
      const C2i = cI + aI * e0;
      const xBr = sr * B2r - si * B2i;
      const xBi = sr * B2i + si * B2r;
      const pr = xBr - C2r;
      const pi = xBi - C2i;
      const mr = xBr + C2r;
      const mi = xBi + C2i;
      const Rr = (pr * pr + pi * pi) / (mr * mr + mi * mi);
      const tau = t.tau[w]!;
      const Rb = t.Rb[w]!;
      const tt = tau * tau;
      const den = 1 - Rr * Rb * tt;
      const Rv = Rf + (Tf * Tf * tt * Rb) / den;
      const Tv = (Tf * tau * t.Tb[w]!) / den;
      R[w] = Rv;
      T[w] = Tv;
      A[w] = 1 - Rv - Tv;
      if (amp) {
        amp.rRe[w] = (nr * dr + ni * di) / dd;
        amp.rIm[w] = (ni * dr - nr * di) / dd;
        const f = nsc > 0 ? Math.pow(RESCALE, nsc) : 1;
        amp.tRe[w] = ((2 * e0 * dr) / dd) * f;
        amp.tIm[w] = ((-2 * e0 * di) / dd) * f;
      }
    }
  }
}
