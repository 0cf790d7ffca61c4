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

function gaussLegendre(n: number): { x: Float64Array; w: Float64Array } {
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
 * Quadrature of a cone of incidence around an axis at `axisDeg`: rays uniform in solid angle
 * (uniform irradiance over the cone), cone angle α by Gauss–Legendre (nAlpha nodes) with
 * weight sin α, azimuth φ by the midpoint rule on [0, π] (the cone is mirror-symmetric about
 * the plane of incidence). Each ray's s share is the squared projection of the beam's s
 * direction, carried onto the plane normal to the ray, on the ray's own s direction; for an
 * axis at normal incidence the azimuth average gives s and p in equal shares.
 * Weights sum to 1.
 */
export function coneQuadrature(axisDeg: number, halfAngleDeg: number, nAlpha = 8, nPhi = 12): ConeRay[] {
  if (!(halfAngleDeg >= 0 && halfAngleDeg < 90)) {
    throw new RangeError(`cone.halfAngleDeg: expected an angle in [0, 90) degrees, got ${halfAngleDeg}`);
  }
  if (!(axisDeg + halfAngleDeg < 90)) {
    throw new RangeError(
      `cone: axis ${axisDeg}° plus half-angle ${halfAngleDeg}° reaches grazing incidence (must stay below 90°)`,
    );
  }
  if (halfAngleDeg === 0) return [{ angleDeg: axisDeg, weight: 1, sFraction: 1 }];
  const amax = (halfAngleDeg * Math.PI) / 180;
  const tc = (axisDeg * Math.PI) / 180;
  const gl = gaussLegendre(nAlpha);
  const rays: ConeRay[] = [];
  const phis = axisDeg === 0 ? 1 : nPhi;
  let sum = 0;
  for (let i = 0; i < nAlpha; i++) {
    const a = (amax * (gl.x[i]! + 1)) / 2;
    const wa = ((gl.w[i]! * amax) / 2) * Math.sin(a);
    for (let k = 0; k < phis; k++) {
      const phi = ((k + 0.5) * Math.PI) / phis;
      const dx = Math.cos(a) * Math.sin(tc) + Math.sin(a) * Math.cos(phi) * Math.cos(tc);
      const dy = Math.sin(a) * Math.sin(phi);
      const dz = Math.cos(a) * Math.cos(tc) - Math.sin(a) * Math.cos(phi) * Math.sin(tc);
      let fs: number;
      if (axisDeg === 0) fs = 0.5;
      else {
        const rho = Math.hypot(dx, dy);
        if (rho < 1e-12) fs = 0.5;
        else {
          // beam s direction (0,1,0) projected normal to the ray, against the ray's s direction
          const ex = -dy * dx;
          const ey = 1 - dy * dy;
          const ez = -dy * dz;
          const en = Math.hypot(ex, ey, ez);
          const dot = (ex * -dy + ey * dx) / (rho * en);
          fs = dot * dot;
        }
      }
      const wgt = wa / phis;
      sum += wgt;
      rays.push({ angleDeg: (Math.acos(Math.min(1, dz)) * 180) / Math.PI, weight: wgt, sFraction: fs });
    }
  }
  for (const r of rays) r.weight /= sum;
  return rays;
}

/** Cone half-angle in degrees from a cone option (f-number N: atan(1/(2N))). */
export function coneHalfAngleDeg(cone: ConeOption): number {
  if ("fNumber" in cone) {
    if (!(cone.fNumber > 0)) throw new RangeError(`cone.fNumber: expected a number > 0, got ${cone.fNumber}`);
    return (Math.atan(1 / (2 * cone.fNumber)) * 180) / Math.PI;
  }
  return cone.halfAngleDeg;
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
    const rays = coneQuadrature(angleDeg, half);
    cone = { halfAngleDeg: half, rays: rays.length };
    const acc = { sR: new Float64Array(W), sT: new Float64Array(W), pR: new Float64Array(W), pT: new Float64Array(W) };
    const rs = { R: new Float64Array(W), T: new Float64Array(W), A: new Float64Array(W) };
    const rp = { R: new Float64Array(W), T: new Float64Array(W), A: new Float64Array(W) };
    for (const ray of rays) {
      new PolKernel(tabulate(prep, ray.angleDeg, "s")).run(d, undefined, rs.R, rs.T, rs.A);
      new PolKernel(tabulate(prep, ray.angleDeg, "p")).run(d, undefined, rp.R, rp.T, rp.A);
      const fs = ray.sFraction;
      const g = ray.weight;
      for (let w = 0; w < W; w++) {
        acc.sR[w] = acc.sR[w]! + g * (fs * rs.R[w]! + (1 - fs) * rp.R[w]!);
        acc.sT[w] = acc.sT[w]! + g * (fs * rs.T[w]! + (1 - fs) * rp.T[w]!);
        acc.pR[w] = acc.pR[w]! + g * ((1 - fs) * rs.R[w]! + fs * rp.R[w]!);
        acc.pT[w] = acc.pT[w]! + g * ((1 - fs) * rs.T[w]! + fs * rp.T[w]!);
      }
    }
    for (let w = 0; w < W; w++) {
      s.R[w] = acc.sR[w]!;
      s.T[w] = acc.sT[w]!;
      s.A[w] = 1 - acc.sR[w]! - acc.sT[w]!;
      p.R[w] = acc.pR[w]!;
      p.T[w] = acc.pT[w]!;
      p.A[w] = 1 - acc.pR[w]! - acc.pT[w]!;
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
