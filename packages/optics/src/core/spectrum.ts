/**
 * Spectral response of a design: reflectance, transmittance, absorptance and the complex
 * amplitude coefficients of the coherent front stack, by the characteristic-matrix method
 * (Macleod, *Thin-Film Optical Filters*). Conventions: wavelength nm, angle degrees in the
 * incident medium, N = n − ik, time dependence exp(+iωt).
 */
import type { Design } from "./design.ts";
import { PolKernel, prepareStack, tabulate, type AmplitudeOut, type PreparedStack } from "./kernel.ts";
import type { RTA } from "./evaluator.ts";

/**
 * Response for one polarization. R, T, A are intensities (fractions 0..1). With a counted
 * substrate back surface they are incoherent totals (front stack + back surface + internal
 * absorption). r and t are the complex AMPLITUDE coefficients of the coherent front stack
 * (incident medium → substrate), as ratios of tangential electric fields (Macleod's
 * convention: r_p = r_s at normal incidence); phaseR = arg r, phaseT = arg t in radians,
 * in (−π, π], for the exp(+iωt) convention (a delay lowers the phase).
 */
export interface PolResponse {
  R: Float64Array;
  T: Float64Array;
  A: Float64Array;
  rRe: Float64Array;
  rIm: Float64Array;
  tRe: Float64Array;
  tIm: Float64Array;
  phaseR: Float64Array;
  phaseT: Float64Array;
}

/** Result of {@link computeSpectrum}. `u` is the unpolarized mean of s and p intensities. */
export interface Spectrum {
  wavelengths: Float64Array;
  angleDeg: number;
  s: PolResponse;
  p: PolResponse;
  u: RTA;
  /** present when a cone of incidence was averaged */
  cone?: { halfAngleDeg: number; rays: number };
  /** notes such as clamped table values; never thrown, never printed */
  warnings: string[];
}

/** Cone of incidence: half-angle in degrees, or the focusing f-number (half-angle = atan(1/(2N))). */
export type ConeOption = { halfAngleDeg: number } | { fNumber: number };

/** Options of {@link computeSpectrum}. */
export interface SpectrumOptions {
  /** vacuum wavelengths, nm */
  wavelengths: ArrayLike<number>;
  /** angle of incidence (cone axis) in the incident medium, degrees, default 0 */
  angleDeg?: number;
  /** average R, T, A over a cone of incidence (uniform irradiance) */
  cone?: ConeOption;
  /**
   * Treat the substrate as a coherent thick layer (interference inside the plate kept).
   * Default false: the back surface is added in intensities, as for any real plate.
   */
  coherentSubstrate?: boolean;
}

/**
 * Evenly spaced wavelength grid from start to stop (nm) inclusive, with the given step.
 * The last point is stop when (stop − start) is a whole number of steps (to 1e-9 of a step).
 */
export function wavelengthGrid(start: number, stop: number, step: number): Float64Array {
  if (!(start > 0) || !Number.isFinite(start)) throw new RangeError(`start: expected a wavelength > 0 nm, got ${start}`);
  if (!(stop >= start) || !Number.isFinite(stop)) throw new RangeError(`stop: expected a wavelength ≥ start (${start} nm), got ${stop}`);
  if (!(step > 0) || !Number.isFinite(step)) throw new RangeError(`step: expected a number > 0 nm, got ${step}`);
  const n = Math.floor((stop - start) / step + 1e-9) + 1;
  if (n > 1_000_000) throw new RangeError(`step: ${step} nm gives ${n} points (limit 1,000,000)`);
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) out[i] = start + i * step;
  return out;
}

function emptyPol(W: number): PolResponse {
  return {
    R: new Float64Array(W),
    T: new Float64Array(W),
    A: new Float64Array(W),
    rRe: new Float64Array(W),
    rIm: new Float64Array(W),
    tRe: new Float64Array(W),
    tIm: new Float64Array(W),
    phaseR: new Float64Array(W),
    phaseT: new Float64Array(W),
  };
}

function fillPhases(p: PolResponse): void {
  for (let w = 0; w < p.R.length; w++) {
    p.phaseR[w] = Math.atan2(p.rIm[w]!, p.rRe[w]!);
    p.phaseT[w] = Math.atan2(p.tIm[w]!, p.tRe[w]!);
  }
}

function polAt(prep: PreparedStack, angleDeg: number, pol: "s" | "p", d: Float64Array): PolResponse {
  const out = emptyPol(prep.W);
  const k = new PolKernel(tabulate(prep, angleDeg, pol));
  const amp: AmplitudeOut = out;
  k.run(d, undefined, out.R, out.T, out.A, amp);
  fillPhases(out);
  return out;
}

/** One ray of a cone quadrature: incidence angle, weight, and its s share for an s-polarized beam. */
export interface ConeRay {
  angleDeg: number;
  weight: number;
  sFraction: number;
}

/** Gauss–Legendre nodes x and weights w on [−1, 1] (Newton iteration on P_n; Golub–Welsch values to 1e-15). */
export function gaussLegendre(n: number): { x: Float64Array; w: Float64Array } {
  const x = new Float64Array(n);
  const w = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let z = Math.cos((Math.PI * (i + 0.75)) / (n + 0.5));
    let dp = 0;
    for (let it = 0; it < 100; it++) {
      let p0 = 1;
      let p1 = z;
      for (let k = 2; k <= n; k++) {
        const p2 = ((2 * k - 1) * z * p1 - (k - 1) * p0) / k;
        p0 = p1;
        p1 = p2;
      }
      dp = (n * (z * p1 - p0)) / (z * z - 1);
      const dz = p1 / dp;
      z -= dz;
      if (Math.abs(dz) < 1e-15) break;
    }
    x[i] = z;
    w[i] = 2 / ((1 - z * z) * dp * dp);
  }
  return { x, w };
}

/**
 * A one-dimensional quadrature rule in the angle of incidence θ for an average over a cone (or over an
 * angle range). For a beam polarized "s" the average of a quantity X is Σ_i wS[i]·X_s(θ_i) + wP[i]·X_p(θ_i);
 * for a beam polarized "p" the shares swap (Σ wP[i]·X_s + wS[i]·X_p); unpolarized light is the mean of the two.
 * Σ (wS + wP) = 1.
 */
export interface AngleRule {
  /** cone axis (chief ray) or range start, degrees */
  axisDeg: number;
  /** cone half-angle in degrees (0 for an angle-range rule) */
  halfAngleDeg: number;
  anglesDeg: Float64Array;
  wS: Float64Array;
  wP: Float64Array;
}

// Inner azimuth integral: Gauss–Legendre nodes on [0, ψmax]; the s share is smooth in ψ, so 24 nodes
// reach machine precision (checked by the cone tests against an independent 2-D reference).
const AZIMUTH_GL = gaussLegendre(24);

/**
 * s share of the ray (θ, ψ) (polar angle θ from the surface normal, azimuth ψ from the chief plane of
 * incidence) in a cone about the chief ray at θc, for a beam polarized perpendicular to the chief plane of
 * incidence ("s"). Convention: an ideal aplanatic lens (Richards & Wolf, Proc. R. Soc. A 253, 358 (1959)) —
 * the pupil field ŷ = sin φ ρ̂ + cos φ φ̂ (φ: the ray's azimuth in the pupil) keeps its azimuthal
 * component and tilts its radial one with the ray. The share is |E·ŝ_ray|² with ŝ_ray the ray's own s
 * direction at the coating.
 */
function sShare(sinTc: number, cosTc: number, theta: number, psi: number): number {
  const st = Math.sin(theta);
  if (st < 1e-12) return 0.5; // at normal incidence s and p coincide
  const dx = st * Math.cos(psi);
  const dy = st * Math.sin(psi);
  const dz = Math.cos(theta);
  // pupil axes: ux = p direction of the chief ray, uy = its s direction, a = chief ray
  const ca = dx * sinTc + dz * cosTc; // cos α (angle from the chief ray)
  const px = dx * cosTc - dz * sinTc; // d·ux
  const py = dy; // d·uy
  const sa = Math.hypot(px, py); // sin α
  // ray s direction at the coating: (−sin ψ, cos ψ, 0)
  const sx = -Math.sin(psi);
  const sy = Math.cos(psi);
  let ex: number;
  let ey: number;
  if (sa < 1e-12) {
    ex = 0;
    ey = 1;
  } else {
    const cphi = px / sa;
    const sphi = py / sa;
    // e_φ = a × d / sin α = cos φ uy − sin φ ux; e_ρ = cos α (cos φ ux + sin φ uy) − sin α a
    const ephx = -sphi * cosTc;
    const ephy = cphi;
    const erx = ca * cphi * cosTc - sa * sinTc;
    const ery = ca * sphi;
    ex = sphi * erx + cphi * ephx;
    ey = sphi * ery + cphi * ephy;
  }
  const dot = ex * sx + ey * sy;
  return dot * dot;
}

/**
 * Cone rule (rays filling the cone uniformly in solid angle: a uniformly filled pupil of an aplanatic lens,
 * i.e. uniform radiance). The azimuth is integrated first, without any optics (the response depends only on
 * the angle of incidence θ); the physics is then needed at the 1-D nodes θ_i only.
 *
 * - On axis (θc = 0) the azimuth is reduced exactly: every θ is a full ring, and the aplanatic s share
 *   cos²φ averages to ½ over the ring, so the s and p shares are equal and both polarized cones equal the
 *   unpolarized one.
 * - The polar integral is composite Gauss–Legendre: on the full-ring part (θ ≤ α − θc) in u = 1 − cos θ
 *   (solid-angle weight dΩ = 2π du); on the part where the ring is cut by the cone edge in t with
 *   θ = a + (b − a)(1 − cos t)/2, which removes the square-root behaviour of the ring length at both ends.
 *
 * @param axisDeg chief-ray angle, degrees, ≥ 0
 * @param halfAngleDeg cone half-angle α, degrees, > 0; axisDeg + halfAngleDeg < 90
 * @param panels sub-panels per part (≥ 1)
 * @param nodes Gauss–Legendre nodes per sub-panel (≥ 1)
 */
export function coneRule(axisDeg: number, halfAngleDeg: number, panels = 4, nodes = 8): AngleRule {
  if (!(axisDeg >= 0 && axisDeg < 90)) throw new RangeError(`cone axis: expected an angle in [0, 90) degrees, got ${axisDeg}`);
  if (!(halfAngleDeg > 0 && halfAngleDeg < 90)) {
    throw new RangeError(`cone.halfAngleDeg: expected an angle in (0, 90) degrees, got ${halfAngleDeg}`);
  }
  if (!(axisDeg + halfAngleDeg < 90)) {
    throw new RangeError(`cone: axis ${axisDeg}° plus half-angle ${halfAngleDeg}° reaches grazing incidence (must stay below 90°)`);
  }
  if (!(Number.isInteger(panels) && panels >= 1 && panels <= 4096)) throw new RangeError(`panels: expected an integer 1–4096, got ${panels}`);
  if (!(Number.isInteger(nodes) && nodes >= 1 && nodes <= 64)) throw new RangeError(`nodes: expected an integer 1–64, got ${nodes}`);
  const rad = Math.PI / 180;
  const am = halfAngleDeg * rad;
  const tc = axisDeg * rad;
  const sinTc = Math.sin(tc);
  const cosTc = Math.cos(tc);
  const cosAm = Math.cos(am);
  const gl = gaussLegendre(nodes);
  const angles: number[] = [];
  const wS: number[] = [];
  const wP: number[] = [];
  const omega = 2 * Math.PI * (1 - cosAm);
  // ring part: θ in [0, am − tc]
  const full = am - tc;
  if (full > 0) {
    const u1 = 1 - Math.cos(full);
    for (let p = 0; p < panels; p++) {
      const ua = (u1 * p) / panels;
      const ub = (u1 * (p + 1)) / panels;
      for (let i = 0; i < nodes; i++) {
        const u = ua + ((ub - ua) * (gl.x[i]! + 1)) / 2;
        const theta = Math.acos(1 - u);
        const w = ((gl.w[i]! * (ub - ua)) / 2) * (2 * Math.PI) / omega;
        let fs = 0.5;
        if (tc > 0) {
          // full ring: ∫_0^{2π} f_s dψ / 2π, symmetric about ψ = 0
          let acc = 0;
          for (let k = 0; k < AZIMUTH_GL.x.length; k++) {
            const psi = (Math.PI * (AZIMUTH_GL.x[k]! + 1)) / 2;
            acc += AZIMUTH_GL.w[k]! * sShare(sinTc, cosTc, theta, psi);
          }
          fs = acc / 2;
        }
        angles.push(theta / rad);
        wS.push(w * fs);
        wP.push(w * (1 - fs));
      }
    }
  }
  if (tc > 0) {
    // cut-ring part: θ in [|am − tc|, am + tc], ψ in [−ψm, ψm]
    const a = Math.abs(am - tc);
    const b = am + tc;
    for (let p = 0; p < panels; p++) {
      const ta = (Math.PI * p) / panels;
      const tb = (Math.PI * (p + 1)) / panels;
      for (let i = 0; i < nodes; i++) {
        const t = ta + ((tb - ta) * (gl.x[i]! + 1)) / 2;
        const theta = a + ((b - a) * (1 - Math.cos(t))) / 2;
        const dth = ((b - a) * Math.sin(t)) / 2;
        const st = Math.sin(theta);
        let c = (cosAm - Math.cos(theta) * cosTc) / (st * sinTc);
        c = c > 1 ? 1 : c < -1 ? -1 : c;
        const psiM = Math.acos(c);
        let accS = 0;
        for (let k = 0; k < AZIMUTH_GL.x.length; k++) {
          const psi = (psiM * (AZIMUTH_GL.x[k]! + 1)) / 2;
          accS += AZIMUTH_GL.w[k]! * sShare(sinTc, cosTc, theta, psi);
        }
        accS *= psiM; // ∫_{−ψm}^{ψm} f_s dψ = 2 · (ψm/2) Σ w f_s
        const ring = 2 * psiM;
        const w = ((gl.w[i]! * (tb - ta)) / 2) * st * dth / omega;
        angles.push(theta / rad);
        wS.push(w * accS);
        wP.push(w * (ring - accS));
      }
    }
  }
  // normalise to Σ = 1 (the numerical solid angle): a lossless stack then keeps R + T = 1 exactly
  let sum = 0;
  for (let i = 0; i < wS.length; i++) sum += wS[i]! + wP[i]!;
  return {
    axisDeg,
    halfAngleDeg,
    anglesDeg: Float64Array.from(angles),
    wS: Float64Array.from(wS, (v) => v / sum),
    wP: Float64Array.from(wP, (v) => v / sum),
  };
}

/**
 * Angle-average rule over [fromDeg, toDeg], uniform in angle (every angle counts the same), composite
 * Gauss–Legendre. The beam keeps its polarization: wS = weight, wP = 0.
 */
export function angleRangeRule(fromDeg: number, toDeg: number, panels = 2, nodes = 8): AngleRule {
  if (!(fromDeg >= 0 && toDeg >= fromDeg && toDeg < 90)) {
    throw new RangeError(`angle range: expected 0 ≤ from ≤ to < 90 degrees, got ${fromDeg}–${toDeg}`);
  }
  if (toDeg === fromDeg) {
    return { axisDeg: fromDeg, halfAngleDeg: 0, anglesDeg: Float64Array.of(fromDeg), wS: Float64Array.of(1), wP: Float64Array.of(0) };
  }
  const gl = gaussLegendre(nodes);
  const n = panels * nodes;
  const anglesDeg = new Float64Array(n);
  const wS = new Float64Array(n);
  const span = toDeg - fromDeg;
  for (let p = 0; p < panels; p++) {
    for (let i = 0; i < nodes; i++) {
      anglesDeg[p * nodes + i] = fromDeg + (span * (p + (gl.x[i]! + 1) / 2)) / panels;
      wS[p * nodes + i] = gl.w[i]! / (2 * panels);
    }
  }
  return { axisDeg: fromDeg, halfAngleDeg: 0, anglesDeg, wS, wP: new Float64Array(n) };
}

/** Default absolute tolerance (fractions of R, T) of the adaptive cone and angle-average rules. */
export const ANGLE_RULE_TOLERANCE = 1e-5;
/** Largest number of sub-panels the adaptive rules may reach. */
export const ANGLE_RULE_MAX_PANELS = 128;

/**
 * Adaptive choice of the number of sub-panels: K = 1, 2, 4, … until the results of K and 2K sub-panels
 * (all outputs of `evaluate`, e.g. R and T at every wavelength for both beam polarizations) differ by at
 * most `tolerance`; the coarser rule K is returned. Its error is about that difference, because the finer
 * rule is far more accurate (composite Gauss–Legendre converges as h^(2·nodes) on a smooth integrand).
 * Throws a RangeError when ANGLE_RULE_MAX_PANELS is reached.
 */
export function adaptiveRule(
  build: (panels: number) => AngleRule,
  evaluate: (rule: AngleRule) => Float64Array,
  tolerance = ANGLE_RULE_TOLERANCE,
): AngleRule {
  let rule = build(1);
  let prev = evaluate(rule);
  for (let K = 2; K <= ANGLE_RULE_MAX_PANELS; K *= 2) {
    const next = build(K);
    const cur = evaluate(next);
    let diff = 0;
    for (let i = 0; i < cur.length; i++) {
      const d = Math.abs(cur[i]! - prev[i]!);
      if (d > diff || Number.isNaN(d)) diff = d;
    }
    if (diff <= tolerance) return rule;
    // a non-finite response is reported by the caller as a failing value, not refined further
    if (Number.isNaN(diff)) return rule;
    rule = next;
    prev = cur;
  }
  throw new RangeError(
    `cone/angle average: not converged to ${tolerance} with ${ANGLE_RULE_MAX_PANELS} sub-panels (response too sharp in angle)`,
  );
}

/**
 * Rays of the default cone rule (see {@link coneRule}) as a flat list: angle, weight = wS + wP and the
 * s share wS / (wS + wP) for an s-polarized beam. Kept for callers that mix s and p per ray.
 */
export function coneQuadrature(axisDeg: number, halfAngleDeg: number, panels = 4, nodes = 8): ConeRay[] {
  if (!(halfAngleDeg >= 0 && halfAngleDeg < 90)) {
    throw new RangeError(`cone.halfAngleDeg: expected an angle in [0, 90) degrees, got ${halfAngleDeg}`);
  }
  if (halfAngleDeg === 0) return [{ angleDeg: axisDeg, weight: 1, sFraction: 1 }];
  const rule = coneRule(axisDeg, halfAngleDeg, panels, nodes);
  return Array.from(rule.anglesDeg, (angleDeg, i) => {
    const weight = rule.wS[i]! + rule.wP[i]!;
    return { angleDeg, weight, sFraction: weight > 0 ? rule.wS[i]! / weight : 0.5 };
  });
}

/**
 * Cone half-angle in degrees from a cone option. f-number N: α = arcsin(1/(2N)), the marginal ray of an
 * aplanatic lens in air (NA = 1/(2N); common practice, no source).
 */
export function coneHalfAngleDeg(cone: ConeOption): number {
  if ("fNumber" in cone) {
    if (!(cone.fNumber >= 0.5) || !Number.isFinite(cone.fNumber)) {
      throw new RangeError(`cone.fNumber: expected a number ≥ 0.5, got ${cone.fNumber}`);
    }
    return (Math.asin(1 / (2 * cone.fNumber)) * 180) / Math.PI;
  }
  return cone.halfAngleDeg;
}

/**
 * R, T of both polarizations at each node of a rule, for given thicknesses (one kernel per node and
 * polarization, tabulated once). Output layout: [sR, sT, sA, pR, pT, pA] per node, each of length W.
 */
export interface RuleResponses {
  rule: AngleRule;
  sR: Float64Array[];
  sT: Float64Array[];
  sA: Float64Array[];
  pR: Float64Array[];
  pT: Float64Array[];
  pA: Float64Array[];
}

/** Cone/angle average of node responses into s-beam and p-beam R, T, A (fractions). */
export function averageRule(
  r: RuleResponses,
  W: number,
  out: { sR: Float64Array; sT: Float64Array; sA: Float64Array; pR: Float64Array; pT: Float64Array; pA: Float64Array },
): void {
  out.sR.fill(0, 0, W);
  out.sT.fill(0, 0, W);
  out.sA.fill(0, 0, W);
  out.pR.fill(0, 0, W);
  out.pT.fill(0, 0, W);
  out.pA.fill(0, 0, W);
  const n = r.rule.anglesDeg.length;
  for (let i = 0; i < n; i++) {
    const a = r.rule.wS[i]!;
    const b = r.rule.wP[i]!;
    const sR = r.sR[i]!, sT = r.sT[i]!, sA = r.sA[i]!, pR = r.pR[i]!, pT = r.pT[i]!, pA = r.pA[i]!;
    for (let w = 0; w < W; w++) {
      out.sR[w] = out.sR[w]! + a * sR[w]! + b * pR[w]!;
      out.sT[w] = out.sT[w]! + a * sT[w]! + b * pT[w]!;
      out.sA[w] = out.sA[w]! + a * sA[w]! + b * pA[w]!;
      out.pR[w] = out.pR[w]! + b * sR[w]! + a * pR[w]!;
      out.pT[w] = out.pT[w]! + b * sT[w]! + a * pT[w]!;
      out.pA[w] = out.pA[w]! + b * sA[w]! + a * pA[w]!;
    }
  }
}

/** Evaluate a prepared stack at every node of a rule (nominal thicknesses `d`), allocating the outputs. */
function ruleResponses(prep: PreparedStack, rule: AngleRule, d: Float64Array): RuleResponses {
  const W = prep.W;
  const out: RuleResponses = { rule, sR: [], sT: [], sA: [], pR: [], pT: [], pA: [] };
  for (const angle of rule.anglesDeg) {
    const sR = new Float64Array(W), sT = new Float64Array(W), sA = new Float64Array(W);
    const pR = new Float64Array(W), pT = new Float64Array(W), pA = new Float64Array(W);
    new PolKernel(tabulate(prep, angle, "s")).run(d, undefined, sR, sT, sA);
    new PolKernel(tabulate(prep, angle, "p")).run(d, undefined, pR, pT, pA);
    out.sR.push(sR); out.sT.push(sT); out.sA.push(sA);
    out.pR.push(pR); out.pT.push(pT); out.pA.push(pA);
  }
  return out;
}

/**
 * Cone average of a prepared stack: adaptive cone rule (see {@link coneRule}, {@link adaptiveRule}) built
 * on these wavelengths, returned with the s-beam and p-beam averages (fractions).
 */
export function coneAverage(
  prep: PreparedStack,
  d: Float64Array,
  axisDeg: number,
  halfAngleDeg: number,
  tolerance = ANGLE_RULE_TOLERANCE,
): { rule: AngleRule; sR: Float64Array; sT: Float64Array; sA: Float64Array; pR: Float64Array; pT: Float64Array; pA: Float64Array } {
  const W = prep.W;
  const mk = () => ({
    sR: new Float64Array(W), sT: new Float64Array(W), sA: new Float64Array(W),
    pR: new Float64Array(W), pT: new Float64Array(W), pA: new Float64Array(W),
  });
  const results = new Map<AngleRule, ReturnType<typeof mk>>();
  const rule = adaptiveRule(
    (K) => coneRule(axisDeg, halfAngleDeg, K),
    (r) => {
      const last = mk();
      results.set(r, last);
      averageRule(ruleResponses(prep, r, d), W, last);
      const v = new Float64Array(4 * W);
      v.set(last.sR, 0); v.set(last.sT, W); v.set(last.pR, 2 * W); v.set(last.pT, 3 * W);
      return v;
    },
    tolerance,
  );
  return { rule, ...results.get(rule)! };
}

/**
 * Compute the spectrum of a design at one angle (or averaged over a cone).
 *
 * @returns s, p responses (intensities R, T, A as fractions; amplitude r, t and their phases for
 *   the coherent front stack) and the unpolarized mean `u`. In cone mode R, T, A are the cone
 *   averages and r, t, phases belong to the cone axis ray.
 * @throws RangeError naming the offending wavelength, angle or material
 */
export function computeSpectrum(design: Design, options: SpectrumOptions): Spectrum {
  const angleDeg = options.angleDeg ?? 0;
  const prep = prepareStack(design, options.wavelengths, options.coherentSubstrate === true);
  const W = prep.W;
  const d = prep.nominal;
  for (let j = 0; j < d.length; j++) {
    if (!(d[j]! >= 0)) throw new RangeError(`layers[${j}].thickness: expected a number ≥ 0, got ${d[j]}`);
  }
  const s = polAt(prep, angleDeg, "s", d);
  const p = polAt(prep, angleDeg, "p", d);
  let cone: Spectrum["cone"];
  if (options.cone) {
    const half = coneHalfAngleDeg(options.cone);
    if (half > 0) {
      const avg = coneAverage(prep, d, angleDeg, half);
      cone = { halfAngleDeg: half, rays: avg.rule.anglesDeg.length };
      s.R.set(avg.sR); s.T.set(avg.sT); s.A.set(avg.sA);
      p.R.set(avg.pR); p.T.set(avg.pT); p.A.set(avg.pA);
    }
  }
  const u: RTA = { R: new Float64Array(W), T: new Float64Array(W), A: new Float64Array(W) };
  for (let w = 0; w < W; w++) {
    u.R[w] = 0.5 * (s.R[w]! + p.R[w]!);
    u.T[w] = 0.5 * (s.T[w]! + p.T[w]!);
    u.A[w] = 0.5 * (s.A[w]! + p.A[w]!);
  }
  const result: Spectrum = { wavelengths: prep.wavelengths, angleDeg, s, p, u, warnings: prep.warnings };
  if (cone) result.cone = cone;
  return result;
}

/**
 * R, T, A (fractions) of s and p at one wavelength (nm) for each angle of incidence (degrees in the
 * incident medium): the optical constants are tabulated once, each angle costs one kernel pass.
 */
export function computeSpectrumAtAngles(
  design: Design,
  wavelength: number,
  anglesDeg: readonly number[],
): { s: { R: number[]; T: number[]; A: number[] }; p: { R: number[]; T: number[]; A: number[] }; warnings: string[] } {
  const prep = prepareStack(design, [wavelength]);
  const d = prep.nominal;
  const R = new Float64Array(1);
  const T = new Float64Array(1);
  const A = new Float64Array(1);
  const s = { R: [] as number[], T: [] as number[], A: [] as number[] };
  const p = { R: [] as number[], T: [] as number[], A: [] as number[] };
  for (const a of anglesDeg) {
    for (const [pol, out] of [["s", s], ["p", p]] as const) {
      new PolKernel(tabulate(prep, a, pol)).run(d, undefined, R, T, A);
      out.R.push(R[0]!);
      out.T.push(T[0]!);
      out.A.push(A[0]!);
    }
  }
  return { s, p, warnings: prep.warnings };
}

/**
 * Evenly spaced grid of `points` wavelengths from start to stop (nm), both included (a chart's grid).
 * @throws RangeError for start ≤ 0, stop < start or points outside 1–100,000
 */
export function evenGrid(start: number, stop: number, points: number): Float64Array {
  if (!(start > 0) || !Number.isFinite(start)) throw new RangeError(`start: expected a wavelength > 0 nm, got ${start}`);
  if (!(stop >= start) || !Number.isFinite(stop)) throw new RangeError(`stop: expected a wavelength ≥ start (${start} nm), got ${stop}`);
  const n = Math.round(points);
  if (!(n >= 1 && n <= 100_000)) throw new RangeError(`points: expected 1–100000, got ${points}`);
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) out[i] = n === 1 ? start : start + ((stop - start) * i) / (n - 1);
  return out;
}

/** Options of {@link createLiveSpectrum}. */
export interface LiveSpectrumOptions {
  wavelengths: ArrayLike<number>;
  /** angle of incidence, or the cone's chief ray, degrees */
  angleDeg: number;
  polarization: "s" | "p" | "u";
  /** cone of light (uniform in solid angle) about angleDeg; omitted or half-angle 0 = collimated */
  cone?: ConeOption;
}

/** A compiled spectrum for repeated thickness edits: {@link createLiveSpectrum}. */
export interface LiveSpectrum {
  readonly wavelengths: Float64Array;
  /** number of angle nodes evaluated per call (1 when collimated) */
  readonly nodes: number;
  readonly warnings: readonly string[];
  /** R, T, A (fractions) for thicknesses (nm, deposition order); allocates only the result */
  compute(thicknessesNm: Float64Array): RTA;
}

/**
 * Spectrum of a design for a chart that recomputes on every thickness edit: the optical constants and
 * refraction terms are tabulated once; a cone uses the same adaptive rule as {@link computeSpectrum} and the
 * spec masks (built on the nominal design), so the chart and the verdict agree.
 */
export function createLiveSpectrum(design: Design, options: LiveSpectrumOptions): LiveSpectrum {
  const prep = prepareStack(design, options.wavelengths);
  const W = prep.W;
  const half = options.cone ? coneHalfAngleDeg(options.cone) : 0;
  const pol = options.polarization;
  if (pol !== "s" && pol !== "p" && pol !== "u") throw new RangeError(`polarization: expected "s", "p" or "u", got ${JSON.stringify(pol)}`);
  const check = (d: Float64Array): void => {
    if (d.length !== prep.L) throw new RangeError(`thicknesses: expected ${prep.L} layers, got ${d.length}`);
  };
  if (!(half > 0)) {
    const ks = pol === "p" ? undefined : new PolKernel(tabulate(prep, options.angleDeg, "s"));
    const kp = pol === "s" ? undefined : new PolKernel(tabulate(prep, options.angleDeg, "p"));
    const tmp = { R: new Float64Array(W), T: new Float64Array(W), A: new Float64Array(W) };
    return {
      wavelengths: prep.wavelengths,
      nodes: 1,
      warnings: prep.warnings,
      compute(d) {
        check(d);
        const out: RTA = { R: new Float64Array(W), T: new Float64Array(W), A: new Float64Array(W) };
        (ks ?? kp)!.run(d, undefined, out.R, out.T, out.A);
        if (ks && kp) {
          kp.run(d, undefined, tmp.R, tmp.T, tmp.A);
          for (let w = 0; w < W; w++) {
            out.R[w] = 0.5 * (out.R[w]! + tmp.R[w]!);
            out.T[w] = 0.5 * (out.T[w]! + tmp.T[w]!);
            out.A[w] = 0.5 * (out.A[w]! + tmp.A[w]!);
          }
        }
        return out;
      },
    };
  }
  type Node = { s: PolKernel; p: PolKernel; sR: Float64Array; sT: Float64Array; sA: Float64Array; pR: Float64Array; pT: Float64Array; pA: Float64Array };
  const byRule = new Map<AngleRule, Node[]>();
  const avg = {
    sR: new Float64Array(W), sT: new Float64Array(W), sA: new Float64Array(W),
    pR: new Float64Array(W), pT: new Float64Array(W), pA: new Float64Array(W),
  };
  const responses = (rule: AngleRule, nodes: Node[]): RuleResponses => ({
    rule,
    sR: nodes.map((n) => n.sR), sT: nodes.map((n) => n.sT), sA: nodes.map((n) => n.sA),
    pR: nodes.map((n) => n.pR), pT: nodes.map((n) => n.pT), pA: nodes.map((n) => n.pA),
  });
  const runNodes = (nodes: Node[], d: Float64Array): void => {
    for (const n of nodes) {
      n.s.run(d, undefined, n.sR, n.sT, n.sA);
      n.p.run(d, undefined, n.pR, n.pT, n.pA);
    }
  };
  const rule = adaptiveRule(
    (K) => coneRule(options.angleDeg, half, K),
    (r) => {
      const nodes: Node[] = Array.from(r.anglesDeg, (a) => ({
        s: new PolKernel(tabulate(prep, a, "s")),
        p: new PolKernel(tabulate(prep, a, "p")),
        sR: new Float64Array(W), sT: new Float64Array(W), sA: new Float64Array(W),
        pR: new Float64Array(W), pT: new Float64Array(W), pA: new Float64Array(W),
      }));
      byRule.set(r, nodes);
      runNodes(nodes, prep.nominal);
      averageRule(responses(r, nodes), W, avg);
      const v = new Float64Array(4 * W);
      v.set(avg.sR, 0); v.set(avg.sT, W); v.set(avg.pR, 2 * W); v.set(avg.pT, 3 * W);
      return v;
    },
  );
  const nodes = byRule.get(rule)!;
  const resp = responses(rule, nodes);
  return {
    wavelengths: prep.wavelengths,
    nodes: nodes.length,
    warnings: prep.warnings,
    compute(d) {
      check(d);
      runNodes(nodes, d);
      averageRule(resp, W, avg);
      const out: RTA = { R: new Float64Array(W), T: new Float64Array(W), A: new Float64Array(W) };
      for (let w = 0; w < W; w++) {
        const a = pol === "s" ? 1 : pol === "p" ? 0 : 0.5;
        out.R[w] = a * avg.sR[w]! + (1 - a) * avg.pR[w]!;
        out.T[w] = a * avg.sT[w]! + (1 - a) * avg.pT[w]!;
        out.A[w] = a * avg.sA[w]! + (1 - a) * avg.pA[w]!;
      }
      return out;
    },
  };
}

/** Speed of light in vacuum, nm per fs. */
export const SPEED_OF_LIGHT_NM_PER_FS = 299.792458;

/** Options of {@link groupDelay}. */
export interface GroupDelayOptions {
  wavelengths: ArrayLike<number>;
  /** degrees in the incident medium, default 0 */
  angleDeg?: number;
  polarization: "s" | "p";
  /** phase of the reflected ("R") or transmitted ("T") amplitude of the coherent front stack */
  side: "R" | "T";
  /** relative angular-frequency step of the finite differences, default 1e-4 */
  relativeStep?: number;
}

/**
 * Group delay GD = −dφ/dω (fs) and group-delay dispersion GDD = −d²φ/dω² (fs²) of the
 * reflected or transmitted amplitude, by central finite differences in angular frequency
 * ω = 2πc/λ (phase differences wrapped to (−π, π]). Sign: exp(+iωt) convention, so a
 * positive GD is a delay. Materials' dispersion is included through their models.
 */
export function groupDelay(design: Design, options: GroupDelayOptions): { gdFs: Float64Array; gddFs2: Float64Array } {
  const { polarization, side } = options;
  if (polarization !== "s" && polarization !== "p") {
    throw new RangeError(`polarization: expected "s" or "p" for a phase, got ${JSON.stringify(polarization)}`);
  }
  const rel = options.relativeStep ?? 1e-4;
  const wl = options.wavelengths;
  const W = wl.length;
  const grid = new Float64Array(3 * W);
  const omega = new Float64Array(W);
  for (let i = 0; i < W; i++) {
    const lam = wl[i] as number;
    if (!(lam > 0)) throw new RangeError(`wavelengths[${i}]: expected a finite number > 0 nm, got ${String(lam)}`);
    const om = (2 * Math.PI * SPEED_OF_LIGHT_NM_PER_FS) / lam;
    omega[i] = om;
    const h = om * rel;
    grid[3 * i] = (2 * Math.PI * SPEED_OF_LIGHT_NM_PER_FS) / (om - h);
    grid[3 * i + 1] = lam;
    grid[3 * i + 2] = (2 * Math.PI * SPEED_OF_LIGHT_NM_PER_FS) / (om + h);
  }
  const prep = prepareStack(design, grid);
  const resp = polAt(prep, options.angleDeg ?? 0, polarization, prep.nominal);
  const ph = side === "R" ? resp.phaseR : resp.phaseT;
  const wrap = (x: number): number => x - 2 * Math.PI * Math.round(x / (2 * Math.PI));
  const gdFs = new Float64Array(W);
  const gddFs2 = new Float64Array(W);
  for (let i = 0; i < W; i++) {
    const h = omega[i]! * rel;
    const dm = wrap(ph[3 * i + 1]! - ph[3 * i]!);
    const dp = wrap(ph[3 * i + 2]! - ph[3 * i + 1]!);
    gdFs[i] = -(dm + dp) / (2 * h);
    gddFs2[i] = -(dp - dm) / (h * h);
  }
  return { gdFs, gddFs2 };
}
