/**
 * Electric-field intensity inside the coherent front stack (standing-wave profile), by
 * propagating the tangential fields [E, H] through partial characteristic matrices
 * (Macleod, *Thin-Film Optical Filters*). N = n − ik; the substrate is semi-infinite here
 * (its back surface does not enter a standing-wave plot).
 */
import type { Design } from "./design.ts";
import { prepareStack, tabulate } from "./kernel.ts";

/** Options of {@link fieldProfile}. */
export interface FieldProfileOptions {
  /** vacuum wavelength, nm */
  wavelength: number;
  /** degrees in the incident medium, default 0 */
  angleDeg?: number;
  polarization: "s" | "p" | "u";
  /** samples per layer including both boundaries, default 24 (minimum 2) */
  pointsPerLayer?: number;
}

/** Result of {@link fieldProfile}. */
export interface FieldProfile {
  /** depth below the stack's front surface, nm (0 = incident-medium interface); repeated at interfaces */
  depthNm: Float64Array;
  /** |E|² divided by the incident wave's |E|² (p: tangential and normal components) */
  intensity: Float64Array;
  /**
   * Interface positions: for each layer (deposition index) the depth of its incident-side
   * boundary; the last entry, layerIndex −1, is the substrate interface.
   */
  interfaces: { depthNm: number; layerIndex: number }[];
}

function profileFor(design: Design, wavelength: number, angleDeg: number, pol: "s" | "p", P: number) {
  const prep = prepareStack(design, [wavelength]);
  const t = tabulate(prep, angleDeg, pol);
  const L = prep.L;
  const d = prep.nominal;
  const s2 = t.s2[0]!;
  // fields sampled from the substrate up: per layer P points (z from the bottom boundary)
  const count = L * P;
  const eR = new Float64Array(count);
  const eI = new Float64Array(count);
  const hR = new Float64Array(count);
  const hI = new Float64Array(count);
  let Er = 1;
  let Ei = 0;
  let Hr = t.etaSR[0]!;
  let Hi = t.etaSI[0]!;
  const nz = new Float64Array(count); // |N|⁴ of the layer, for the normal component (p)
  for (let j = 0; j < L; j++) {
    const c = t.packC;
    const br = c[6 * j]!;
    const bi = c[6 * j + 1]!;
    const er = c[6 * j + 2]!;
    const ei = c[6 * j + 3]!;
    const ir = c[6 * j + 4]!;
    const ii = c[6 * j + 5]!;
    const n4 = t.packN2[2 * j]! ** 2 + t.packN2[2 * j + 1]! ** 2;
    let topEr = Er;
    let topEi = Ei;
    let topHr = Hr;
    let topHi = Hi;
    for (let k = 0; k < P; k++) {
      const z = (d[j]! * k) / (P - 1);
      const x = br * z;
      const y = bi * z;
      const ch = Math.cosh(y);
      const sh = Math.sinh(y);
      const ca = Math.cos(x);
      const sa = Math.sin(x);
      const csr = ca * ch;
      const csi = -sa * sh;
      const isr = -ca * sh;
      const isi = sa * ch;
      const m12r = isr * ir - isi * ii;
      const m12i = isr * ii + isi * ir;
      const m21r = isr * er - isi * ei;
      const m21i = isr * ei + isi * er;
      const nEr = csr * Er - csi * Ei + m12r * Hr - m12i * Hi;
      const nEi = csr * Ei + csi * Er + m12r * Hi + m12i * Hr;
      const nHr = m21r * Er - m21i * Ei + csr * Hr - csi * Hi;
      const nHi = m21r * Ei + m21i * Er + csr * Hi + csi * Hr;
      const idx = j * P + k;
      eR[idx] = nEr;
      eI[idx] = nEi;
      hR[idx] = nHr;
      hI[idx] = nHi;
      nz[idx] = n4;
      topEr = nEr;
      topEi = nEi;
      topHr = nHr;
      topHi = nHi;
    }
    Er = topEr;
    Ei = topEi;
    Hr = topHr;
    Hi = topHi;
  }
  // incident tangential amplitude E+ = (E + H/η0)/2 at the front surface
  const e0 = t.eta0[0]!;
  const pr = 0.5 * (Er + Hr / e0);
  const pi = 0.5 * (Ei + Hi / e0);
  const n0 = prep.incident[0]!;
  const cos0sq = 1 - s2 / (n0 * n0);
  // |E_inc|² = |E+_t|² / cos²θ0 for p (tangential part is E cos θ0), |E+|² for s
  const inc = pol === "p" ? (pr * pr + pi * pi) / cos0sq : pr * pr + pi * pi;
  const total = d.reduce((a, b) => a + b, 0);
  const depth = new Float64Array(count);
  const intensity = new Float64Array(count);
  // reorder from the incident side: layer L−1 first, within a layer from its top boundary down
  let o = 0;
  let top = 0;
  const interfaces: { depthNm: number; layerIndex: number }[] = [];
  for (let j = L - 1; j >= 0; j--) {
    interfaces.push({ depthNm: top, layerIndex: j });
    for (let k = P - 1; k >= 0; k--) {
      const idx = j * P + k;
      const zFromBottom = (d[j]! * k) / (P - 1);
      depth[o] = top + (d[j]! - zFromBottom);
      let e2 = eR[idx]! * eR[idx]! + eI[idx]! * eI[idx]!;
      if (pol === "p") e2 += (s2 * (hR[idx]! * hR[idx]! + hI[idx]! * hI[idx]!)) / nz[idx]!;
      intensity[o] = e2 / inc;
      o++;
    }
    top += d[j]!;
  }
  interfaces.push({ depthNm: total, layerIndex: -1 });
  return { depthNm: depth, intensity, interfaces };
}

/**
 * |E|² through the stack at one wavelength, normalized to the incident wave (so a bare
 * reflection-free interface gives 1 everywhere in front of it). Depth runs from the front
 * (incident-side) surface into the stack; samples at both boundaries of each layer, so the
 * p-polarized normal component's jump at interfaces is visible. "u" averages s and p.
 */
export function fieldProfile(design: Design, options: FieldProfileOptions): FieldProfile {
  const P = Math.max(2, Math.floor(options.pointsPerLayer ?? 24));
  const angle = options.angleDeg ?? 0;
  const pol = options.polarization;
  if (pol !== "s" && pol !== "p" && pol !== "u") {
    throw new RangeError(`polarization: expected "s", "p" or "u", got ${JSON.stringify(pol)}`);
  }
  if (pol !== "u") return profileFor(design, options.wavelength, angle, pol, P);
  const a = profileFor(design, options.wavelength, angle, "s", P);
  const b = profileFor(design, options.wavelength, angle, "p", P);
  for (let i = 0; i < a.intensity.length; i++) a.intensity[i] = 0.5 * (a.intensity[i]! + b.intensity[i]!);
  return a;
}
