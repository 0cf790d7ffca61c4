// Incoherent substrate against coherent averaging, standing-wave fields, group delay, cone averages.
import { describe, expect, it } from "vitest";
import {
  SPEED_OF_LIGHT_NM_PER_FS,
  computeSpectrum,
  coneHalfAngleDeg,
  coneQuadrature,
  fieldProfile,
  groupDelay,
} from "../../src/core/index.ts";
import { expectClose, stack } from "./helpers.ts";
import { expPair, sincos } from "../../src/core/kernel.ts";

describe("incoherent substrate", () => {
  it("equals the coherent result averaged over many substrate thicknesses (one fringe period)", () => {
    // incoherence as the average over the substrate phase (Macleod, thick substrates; common practice)
    const layers: [number, number, number][] = [[2.3, 0, 70], [1.46, 0, 110], [0.2, 3, 6]];
    const ns = 1.52;
    const lambda = 600;
    for (const angle of [0, 40]) {
      const sinS = Math.sin((angle * Math.PI) / 180) / ns;
      const period = lambda / (2 * ns * Math.sqrt(1 - sinS * sinS)); // nm of substrate per 2π of round-trip phase
      const base = 0.01; // mm
      const N = 64;
      const inc = computeSpectrum(stack({ layers, substrate: [ns, 0], backside: true, thicknessMm: base }), {
        wavelengths: [lambda],
        angleDeg: angle,
      });
      for (const pol of ["s", "p"] as const) {
        let R = 0;
        let T = 0;
        for (let k = 0; k < N; k++) {
          const d = stack({ layers, substrate: [ns, 0], backside: true, thicknessMm: base + (k * period) / N / 1e6 });
          const c = computeSpectrum(d, { wavelengths: [lambda], angleDeg: angle, coherentSubstrate: true });
          R += c[pol].R[0]! / N;
          T += c[pol].T[0]! / N;
        }
        expectClose(inc[pol].R[0]!, R, 1e-9, 1e-12);
        expectClose(inc[pol].T[0]!, T, 1e-9, 1e-12);
      }
    }
  });
});

describe("fieldProfile", () => {
  it("in an index-matched layer on glass |E|² swings between (1 − |r|)² and (1 + |r|)²", () => {
    // two-beam standing wave of incident and reflected waves (Born & Wolf, Principles of Optics)
    const r = (1 - 1.52) / (1 + 1.52);
    const d = stack({ layers: [[1, 0, 1500]], substrate: [1.52, 0] });
    const f = fieldProfile(d, { wavelength: 600, polarization: "s", pointsPerLayer: 2001 });
    const max = Math.max(...f.intensity);
    const min = Math.min(...f.intensity);
    expectClose(max, (1 + Math.abs(r)) ** 2, 1e-5);
    expectClose(min, (1 - Math.abs(r)) ** 2, 1e-5);
    // at the substrate interface the field is the transmitted one, |1 + r|²
    expectClose(f.intensity[f.intensity.length - 1]!, (1 + r) ** 2, 1e-12);
    expect(f.depthNm[0]).toBe(0);
    expect(f.interfaces.at(-1)).toEqual({ depthNm: 1500, layerIndex: -1 });
  });

  it("p-polarized waves crossing at 90° (45° incidence) do not interfere: |E|² = 1 + R_p", () => {
    // orthogonal field vectors of incident and reflected p waves at 45° (Born & Wolf)
    const d = stack({ layers: [[1, 0, 800]], substrate: [1.52, 0] });
    const Rp = computeSpectrum(d, { wavelengths: [550], angleDeg: 45 }).p.R[0]!;
    const f = fieldProfile(d, { wavelength: 550, angleDeg: 45, polarization: "p", pointsPerLayer: 50 });
    for (const v of f.intensity) expectClose(v, 1 + Rp, 1e-10);
  });
});

describe("groupDelay", () => {
  it("a matched non-dispersive layer delays by n d / c with zero GDD", () => {
    // phase delay of a plane wave through a slab, t = exp(−i 2π n d / λ) (definition of group delay)
    const n = 1.5;
    const dnm = 3000;
    const d = stack({ incident: [n, 0], layers: [[n, 0, dnm]], substrate: [n, 0] });
    const g = groupDelay(d, { wavelengths: [500, 800, 1200], polarization: "s", side: "T" });
    for (let i = 0; i < 3; i++) {
      expectClose(g.gdFs[i]!, (n * dnm) / SPEED_OF_LIGHT_NM_PER_FS, 1e-7);
      expect(Math.abs(g.gddFs2[i]!)).toBeLessThan(1e-3);
    }
  });
});

describe("cone of incidence", () => {
  it("f-number gives half-angle arcsin(1/(2N)); weights sum to 1", () => {
    // aplanatic lens in air: NA = sin α = 1/(2N) (common practice, no source)
    expectClose(coneHalfAngleDeg({ fNumber: 2 }), (Math.asin(0.25) * 180) / Math.PI, 1e-14);
    const rays = coneQuadrature(20, 10);
    expectClose(rays.reduce((a, r) => a + r.weight, 0), 1, 1e-14);
  });

  it("normal-axis cone on bare glass equals the sin θ-weighted integral of (Rs + Rp)/2", () => {
    // uniform irradiance over the cone: weights ∝ sin θ dθ (independent trapezoid integration)
    const d = stack({ substrate: [1.52, 0] });
    const half = 30;
    const sp = computeSpectrum(d, { wavelengths: [550], cone: { halfAngleDeg: half } });
    let num = 0;
    let den = 0;
    const K = 3000;
    for (let i = 0; i <= K; i++) {
      const th = ((half * i) / K) * (Math.PI / 180);
      const w = (i === 0 || i === K ? 0.5 : 1) * Math.sin(th);
      const c = computeSpectrum(d, { wavelengths: [550], angleDeg: (th * 180) / Math.PI });
      num += w * c.u.R[0]!;
      den += w;
    }
    expectClose(sp.u.R[0]!, num / den, 1e-6);
    expectClose(sp.s.R[0]!, sp.p.R[0]!, 1e-12);
  });

  it("a tilted cone keeps R + T = 1 and tends to the axis result as the cone closes", () => {
    const d = stack({ layers: [[2.3, 0, 65], [1.46, 0, 100]], substrate: [1.52, 0] });
    const axis = computeSpectrum(d, { wavelengths: [500, 650], angleDeg: 30 });
    const narrow = computeSpectrum(d, { wavelengths: [500, 650], angleDeg: 30, cone: { halfAngleDeg: 0.5 } });
    for (let i = 0; i < 2; i++) {
      expectClose(narrow.s.R[i]!, axis.s.R[i]!, 1e-3);
      expectClose(narrow.p.R[i]!, axis.p.R[i]!, 1e-3);
      expectClose(narrow.s.R[i]! + narrow.s.T[i]!, 1, 1e-12);
    }
  });
});

describe("inlined sin/cos/exp", () => {
  it("match Math.sin, Math.cos and Math.exp to about 1 ulp over the engine's range", () => {
    // the minimax kernels follow fdlibm (k_sin.c, k_cos.c); comparison against the runtime's libm
    const sc = new Float64Array(2);
    let seed = 12345;
    const rnd = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648);
    for (let i = 0; i < 4000; i++) {
      const x = (rnd() - 0.5) * 10 ** (rnd() * 6);
      sincos(x, sc);
      expect(Math.abs(sc[0]! - Math.sin(x))).toBeLessThan(4e-16);
      expect(Math.abs(sc[1]! - Math.cos(x))).toBeLessThan(4e-16);
      const y = (rnd() - 0.5) * 300;
      expPair(y, sc);
      expectClose(sc[0]!, Math.exp(y), 5e-16, 0);
      expectClose(sc[1]!, Math.exp(-y), 5e-16, 0);
    }
  });
});
