// Analytic check values for the characteristic-matrix engine; sources named at each check.
import { describe, expect, it } from "vitest";
import { computeSpectrum } from "../../src/core/index.ts";
import { expectClose, stack } from "./helpers.ts";

const at = (d: ReturnType<typeof stack>, lambda: number, angleDeg = 0) =>
  computeSpectrum(d, { wavelengths: [lambda], angleDeg });

describe("single interfaces", () => {
  it("uncoated glass n = 1.52 in air reflects 4.26 % at normal incidence", () => {
    // Hecht, Optics, Fresnel equations: R = ((n1 − n0)/(n1 + n0))² = 0.0426
    const sp = at(stack({ substrate: [1.52, 0] }), 550);
    expectClose(sp.u.R[0]!, ((1.52 - 1) / (1.52 + 1)) ** 2, 1e-12);
    expect(sp.u.R[0]!).toBeCloseTo(0.0426, 4);
    expectClose(sp.u.T[0]!, 1 - sp.u.R[0]!, 1e-12);
  });

  it("p-reflectance vanishes at the Brewster angle tan θB = n1/n0", () => {
    // Hecht, Optics, Brewster's law
    const n = 1.52;
    const thetaB = (Math.atan(n) * 180) / Math.PI;
    const sp = at(stack({ substrate: [n, 0] }), 633, thetaB);
    expect(sp.p.R[0]!).toBeLessThan(1e-20);
    expect(sp.s.R[0]!).toBeGreaterThan(0.1);
  });

  it("oblique Fresnel reflectances of glass at 45° (s and p)", () => {
    // Hecht, Optics, Fresnel equations in terms of cos θ
    const n0 = 1;
    const n1 = 1.52;
    const t0 = Math.PI / 4;
    const t1 = Math.asin((n0 * Math.sin(t0)) / n1);
    const rs = (n0 * Math.cos(t0) - n1 * Math.cos(t1)) / (n0 * Math.cos(t0) + n1 * Math.cos(t1));
    const rp = (n1 * Math.cos(t0) - n0 * Math.cos(t1)) / (n1 * Math.cos(t0) + n0 * Math.cos(t1));
    const sp = at(stack({ substrate: [n1, 0] }), 700, 45);
    expectClose(sp.s.R[0]!, rs * rs, 1e-12);
    expectClose(sp.p.R[0]!, rp * rp, 1e-12);
    expectClose(sp.u.R[0]!, (rs * rs + rp * rp) / 2, 1e-12);
  });

  it("total internal reflection: R = 1 beyond the critical angle from glass to air, lossless", () => {
    // Hecht, Optics, total internal reflection (critical angle asin(1/1.52) = 41.1°)
    for (const layers of [[], [[2.1, 0, 120] as [number, number, number], [1.38, 0, 95] as [number, number, number]]]) {
      const d = stack({ incident: [1.52, 0], substrate: [1, 0], layers });
      for (const angle of [42, 50, 70, 85]) {
        const sp = at(d, 550, angle);
        expectClose(sp.s.R[0]!, 1, 1e-12);
        expectClose(sp.p.R[0]!, 1, 1e-12);
        expectClose(sp.s.T[0]!, 0, 0, 1e-15);
      }
      expect(at(d, 550, 30).s.R[0]!).toBeLessThan(1);
    }
  });
});

describe("single layers (Macleod, Thin-Film Optical Filters)", () => {
  it("quarter-wave MgF2 (1.38) on glass (1.52): R = ((n0 ns − n1²)/(n0 ns + n1²))² ≈ 1.26 %", () => {
    // Macleod, single-layer antireflection coating
    const d = stack({ layers: [[1.38, 0, 550 / (4 * 1.38)]], substrate: [1.52, 0] });
    const R = at(d, 550).u.R[0]!;
    expectClose(R, ((1.52 - 1.38 ** 2) / (1.52 + 1.38 ** 2)) ** 2, 1e-12);
    expect(R * 100).toBeCloseTo(1.26, 2);
  });

  it("quarter-wave layer of n1 = √(n0 ns) reflects nothing at λ0", () => {
    // Macleod, single-layer antireflection coating: zero when n1² = n0 ns
    const n1 = Math.sqrt(1.52);
    const d = stack({ layers: [[n1, 0, 600 / (4 * n1)]], substrate: [1.52, 0] });
    expect(at(d, 600).u.R[0]!).toBeLessThan(1e-28);
  });

  it("a half-wave layer is absent at λ0: R equals the bare substrate's", () => {
    // Macleod, absentee layers
    const bare = at(stack({ substrate: [1.52, 0] }), 550).u.R[0]!;
    for (const n of [1.38, 2.35]) {
      const d = stack({ layers: [[n, 0, 550 / (2 * n)]], substrate: [1.52, 0] });
      expectClose(at(d, 550).u.R[0]!, bare, 1e-12);
    }
  });
});

describe("quarter-wave stacks (Macleod, Thin-Film Optical Filters)", () => {
  const nH = 2.35;
  const nL = 1.38;
  const ns = 1.52;
  const lambda0 = 600;
  const qwStack = (pairs: number) => {
    const layers: [number, number, number][] = [];
    // (HL)^N H from the incident side; in deposition order it is H (LH)^N, also H next to the substrate
    layers.push([nH, 0, lambda0 / (4 * nH)]);
    for (let i = 0; i < pairs; i++) layers.push([nL, 0, lambda0 / (4 * nL)], [nH, 0, lambda0 / (4 * nH)]);
    return stack({ layers, substrate: [ns, 0] });
  };

  it("(HL)^N H peak reflectance R = ((n0 − Y)/(n0 + Y))², Y = (nH/nL)^(2N) nH²/ns", () => {
    // Macleod, quarter-wave stack reflectance at λ0
    for (const N of [1, 3, 6]) {
      const Y = (nH / nL) ** (2 * N) * (nH * nH) / ns;
      expectClose(at(qwStack(N), lambda0).u.R[0]!, ((1 - Y) / (1 + Y)) ** 2, 1e-11);
    }
  });

  it("stop-band half-width Δg = (2/π) asin((nH − nL)/(nH + nL)) in g = λ0/λ", () => {
    // Macleod, width of the high-reflectance zone of a quarter-wave stack
    const dg = (2 / Math.PI) * Math.asin((nH - nL) / (nH + nL));
    const d = qwStack(30);
    const R = (g: number) => at(d, lambda0 / g).u.R[0]!;
    for (const g of [1 - 0.9 * dg, 1 + 0.9 * dg]) expect(R(g)).toBeGreaterThan(0.999);
    for (const g of [1 - 1.15 * dg, 1 + 1.15 * dg]) expect(R(g)).toBeLessThan(0.9);
  });
});

describe("thick substrates (incoherent back surface)", () => {
  it("bare lossless plate in air transmits T = 2n/(n² + 1)", () => {
    // multiple incoherent reflections in a plate, (1 − R)²/(1 − R²) = 2n/(n² + 1) (Macleod, thick plates)
    for (const n of [1.45, 1.52, 4.0]) {
      const sp = at(stack({ substrate: [n, 0], backside: true }), 800);
      expectClose(sp.u.T[0]!, (2 * n) / (n * n + 1), 1e-12);
      expectClose(sp.u.R[0]! + sp.u.T[0]!, 1, 1e-12);
    }
  });

  it("absorbing plate: T = (1 − R)² τ / (1 − R² τ²) with τ = exp(−4πkd/λ)", () => {
    // incoherent plate with internal transmittance τ (Macleod, thick absorbing substrates);
    // at normal incidence the weak k barely changes the interface reflectance, tolerance 1e-6
    const n = 1.5;
    const k = 1e-6;
    const dmm = 2;
    const lambda = 1000;
    const sp = at(stack({ substrate: [n, k], backside: true, thicknessMm: dmm }), lambda);
    const R = ((n - 1) ** 2 + k * k) / ((n + 1) ** 2 + k * k);
    const tau = Math.exp((-4 * Math.PI * k * dmm * 1e6) / lambda);
    expectClose(sp.u.T[0]!, ((1 - R) ** 2 * tau) / (1 - R * R * tau * tau), 1e-6);
    expect(sp.u.A[0]!).toBeGreaterThan(0.02);
  });
});
