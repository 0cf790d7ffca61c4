// Cone averaging against a brute-force reference built here, independently of the engine: a plain
// real-arithmetic characteristic-matrix routine (Macleod, Thin-Film Optical Filters) for lossless layers,
// integrated over the cone in the chief ray's own coordinates (cone angle α, pupil azimuth φ) by
// Gauss–Legendre in cos α and the trapezoid rule in φ (spectrally accurate for a periodic integrand).
// Source of the reference's accuracy: numerical quadrature convergence — two resolutions are compared
// and must agree to 1e-7 before the engine is checked against the finer one.
import { describe, expect, it } from "vitest";
import {
  coneHalfAngleDeg,
  coneRule,
  computeSpectrum,
  gaussLegendre,
} from "../../src/core/index.ts";
import { qwotDesign } from "./fixtures.ts";

const pairs = (n: number, a: string, b: string): [string, number][] =>
  Array.from({ length: 2 * n }, (_, i) => [i % 2 ? b : a, 1] as [string, number]);
// Single-cavity bandpass (HL)^5 2H (LH)^5 at λ0 = 900 nm, H n = 2.30, L n = 1.38 on n = 1.52:
// FWHM ≈ 1.5 nm at normal incidence (computed here, not a published value).
const layers: [string, number][] = [...pairs(5, "H230", "L138"), ["H230", 2], ...pairs(5, "L138", "H230")];
const design = qwotDesign(layers, 900);
const nIndex: Record<string, number> = { H230: 2.3, L138: 1.38 };

/** Reference R, T (s and p) of the lossless stack at angle θ (radians), plain real arithmetic. */
function rt(lam: number, theta: number): [number, number, number, number] {
  const n0 = 1;
  const ns = 1.52;
  const s = n0 * Math.sin(theta);
  const out: number[] = [];
  for (const pol of ["s", "p"] as const) {
    const adm = (n: number) => {
      const q = Math.sqrt(n * n - s * s);
      return pol === "s" ? q : (n * n) / q;
    };
    // M = Π over layers from the incident side: [[c, i sin/η], [i η sin, c]] with real parts (A, B, C, D)
    let A = 1, B = 0, C = 0, D = 1; // M = [[A, iB], [iC, D]]
    for (let j = design.layers.length - 1; j >= 0; j--) {
      const l = design.layers[j]!;
      const n = nIndex[l.material]!;
      const q = Math.sqrt(n * n - s * s);
      const eta = adm(n);
      const dl = (2 * Math.PI * q * l.thickness) / lam;
      const c = Math.cos(dl);
      const sn = Math.sin(dl);
      // M ← M × layer
      const nA = A * c - B * eta * sn;
      const nB = A * (sn / eta) + B * c;
      const nC = C * c + D * eta * sn;
      const nD = -C * (sn / eta) + D * c;
      A = nA; B = nB; C = nC; D = nD;
    }
    const e0 = adm(n0);
    const es = adm(ns);
    // [Bv, Cv] = M [1, es]: Bv = A + i B es, Cv = i C + D es
    const br = A, bi = B * es, cr = D * es, ci = C;
    const dr = e0 * br + cr, di = e0 * bi + ci;
    const nr = e0 * br - cr, ni = e0 * bi - ci;
    const dd = dr * dr + di * di;
    out.push((nr * nr + ni * ni) / dd, (4 * e0 * es) / dd);
  }
  return out as [number, number, number, number];
}

/**
 * Brute-force cone average for a beam polarized s (perpendicular to the chief plane of incidence), aplanatic
 * convention: ray field E = sin φ e_ρ + cos φ e_φ; s share = (E·ŝ_ray)². Returns [R_s-beam, T_s-beam, R_p-beam, T_p-beam].
 */
function reference(lam: number, chiefDeg: number, halfDeg: number, nA: number, nPhi: number): number[] {
  const tc = (chiefDeg * Math.PI) / 180;
  const am = (halfDeg * Math.PI) / 180;
  const gl = gaussLegendre(nA);
  const acc = [0, 0, 0, 0];
  let wsum = 0;
  const phis = tc === 0 ? 1 : nPhi;
  for (let i = 0; i < nA; i++) {
    // Gauss–Legendre in cos α on [cos am, 1]: uniform solid angle
    const ca = Math.cos(am) + ((1 - Math.cos(am)) * (gl.x[i]! + 1)) / 2;
    const sa = Math.sqrt(1 - ca * ca);
    for (let k = 0; k < phis; k++) {
      const phi = (2 * Math.PI * k) / phis;
      const w = gl.w[i]! / phis;
      // d = cos α a + sin α (cos φ ux + sin φ uy), a = (sin tc, 0, cos tc), ux = (cos tc, 0, −sin tc), uy = (0, 1, 0)
      const dx = ca * Math.sin(tc) + sa * Math.cos(phi) * Math.cos(tc);
      const dy = sa * Math.sin(phi);
      const dz = ca * Math.cos(tc) - sa * Math.cos(phi) * Math.sin(tc);
      const theta = Math.acos(Math.min(1, dz));
      const [Rs, Ts, Rp, Tp] = rt(lam, theta);
      let fs = 0.5;
      const rho = Math.hypot(dx, dy);
      if (tc === 0) fs = 0.5; // full ring of cos²φ
      else if (rho > 1e-12) {
        // e_φ = cos φ uy − sin φ ux ; e_ρ = cos α (cos φ ux + sin φ uy) − sin α a
        const ephx = -Math.sin(phi) * Math.cos(tc), ephy = Math.cos(phi), ephz = Math.sin(phi) * Math.sin(tc);
        const erx = ca * Math.cos(phi) * Math.cos(tc) - sa * Math.sin(tc);
        const ery = ca * Math.sin(phi);
        const erz = -ca * Math.cos(phi) * Math.sin(tc) - sa * Math.cos(tc);
        const ex = Math.sin(phi) * erx + Math.cos(phi) * ephx;
        const ey = Math.sin(phi) * ery + Math.cos(phi) * ephy;
        void ephz; void erz;
        const dot = (ex * -dy + ey * dx) / rho;
        fs = dot * dot;
      }
      acc[0] = acc[0]! + w * (fs * Rs + (1 - fs) * Rp);
      acc[1] = acc[1]! + w * (fs * Ts + (1 - fs) * Tp);
      acc[2] = acc[2]! + w * ((1 - fs) * Rs + fs * Rp);
      acc[3] = acc[3]! + w * ((1 - fs) * Ts + fs * Tp);
      wsum += w;
    }
  }
  return acc.map((v) => v / wsum);
}

const half = coneHalfAngleDeg({ fNumber: 2 });
const wl = Array.from({ length: 25 }, (_, i) => 880 + i * 0.85); // across the cone-shifted passband

describe("cone average (f/2, 1.5 nm-FWHM bandpass)", () => {
  it("f/2 is a half-angle of arcsin(1/4) (NA = 1/(2N); common practice, no source)", () => {
    expect(half).toBeCloseTo((Math.asin(0.25) * 180) / Math.PI, 12);
  });

  it("rule weights average cos θ over the cone exactly: mean = cos θc · (1 + cos α)/2 (centroid of a spherical cap; on axis s share ½)", () => {
    for (const [axis, h] of [[0, half], [10, half], [20, 5], [3, 30]] as const) {
      const r = coneRule(axis, h, 4, 8);
      let mean = 0;
      for (let i = 0; i < r.wS.length; i++) mean += (r.wS[i]! + r.wP[i]!) * Math.cos((r.anglesDeg[i]! * Math.PI) / 180);
      const exact = (Math.cos((axis * Math.PI) / 180) * (1 + Math.cos((h * Math.PI) / 180))) / 2;
      expect(Math.abs(mean - exact)).toBeLessThan(1e-10);
      if (axis === 0) for (let i = 0; i < r.wS.length; i++) expect(r.wS[i]).toBeCloseTo(r.wP[i]!, 15);
    }
  });

  for (const chief of [0, 10]) {
    it(`matches a brute-force reference to 1e-4 in R and T with a ${chief}° chief ray`, () => {
      const sp = computeSpectrum(design, { wavelengths: wl, angleDeg: chief, cone: { fNumber: 2 } });
      // peak of the cone-averaged transmittance lies inside the grid (the check covers the passband)
      let worst = 0;
      const nA = 240;
      const nPhi = 480;
      for (let i = 0; i < wl.length; i += chief === 0 ? 1 : 3) {
        const ref = reference(wl[i]!, chief, half, nA, nPhi);
        const coarse = reference(wl[i]!, chief, half, (nA * 2) / 3, (nPhi * 2) / 3);
        // the reference is converged: two thirds of both resolutions changes it by < 1e-7
        for (let k = 0; k < 4; k++) expect(Math.abs(ref[k]! - coarse[k]!)).toBeLessThan(1e-7);
        const got = [sp.s.R[i]!, sp.s.T[i]!, sp.p.R[i]!, sp.p.T[i]!];
        for (let k = 0; k < 4; k++) worst = Math.max(worst, Math.abs(got[k]! - ref[k]!));
      }
      expect(worst).toBeLessThan(1e-4);
    }, 60_000);
  }
});
