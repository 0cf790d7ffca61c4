// Energy conservation, reciprocity and the absorbing-layer branch choice, over random stacks.
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { computeSpectrum } from "../../src/core/index.ts";
import { Cx, expectClose, stack } from "./helpers.ts";

const lossless = fc.tuple(fc.double({ min: 1.2, max: 4, noNaN: true }), fc.constant(0), fc.double({ min: 0, max: 600, noNaN: true }));
const absorbing = fc.tuple(
  fc.double({ min: 0.05, max: 4, noNaN: true }),
  fc.double({ min: 0, max: 5, noNaN: true }),
  fc.double({ min: 0, max: 300, noNaN: true }),
);
const wavelengths = fc.array(fc.double({ min: 300, max: 2000, noNaN: true }), { minLength: 1, maxLength: 6 });
const angle = fc.double({ min: 0, max: 89, noNaN: true });

describe("energy conservation (R + T = 1 lossless, R + T + A = 1 absorbing)", () => {
  it("lossless stacks: R + T = 1 at any angle, both polarizations, with and without a back surface", () => {
    // energy conservation for lossless media (Macleod, Thin-Film Optical Filters)
    fc.assert(
      fc.property(fc.array(lossless, { maxLength: 12 }), wavelengths, angle, fc.boolean(), (layers, wl, a, back) => {
        const sp = computeSpectrum(stack({ layers, backside: back }), { wavelengths: wl, angleDeg: a });
        for (const pol of [sp.s, sp.p, sp.u]) {
          for (let i = 0; i < wl.length; i++) {
            expectClose(pol.R[i]! + pol.T[i]!, 1, 0, 1e-9);
            expect(Math.abs(pol.A[i]!)).toBeLessThan(1e-9);
          }
        }
      }),
      { numRuns: 150 },
    );
  });

  it("absorbing stacks: 0 ≤ R, T, A and R + T + A = 1 (forward-decaying branch)", () => {
    // a wrong cos θ branch in an absorbing layer gives growing waves: R > 1 or A < 0 (Macleod)
    fc.assert(
      fc.property(fc.array(absorbing, { minLength: 1, maxLength: 8 }), wavelengths, angle, fc.boolean(), (layers, wl, a, back) => {
        const sp = computeSpectrum(stack({ layers, backside: back, substrate: [1.52, 1e-7] }), { wavelengths: wl, angleDeg: a });
        for (const pol of [sp.s, sp.p]) {
          for (let i = 0; i < wl.length; i++) {
            expect(pol.R[i]!).toBeGreaterThanOrEqual(-1e-12);
            expect(pol.R[i]!).toBeLessThanOrEqual(1 + 1e-9);
            expect(pol.T[i]!).toBeGreaterThanOrEqual(0);
            expect(pol.A[i]!).toBeGreaterThanOrEqual(-1e-9);
            expectClose(pol.R[i]! + pol.T[i]! + pol.A[i]!, 1, 0, 1e-12);
          }
        }
      }),
      { numRuns: 150 },
    );
  });
});

describe("reciprocity", () => {
  it("T is the same from both sides for lossless and absorbing stacks between the same media", () => {
    // reciprocity of transmittance (Macleod, Thin-Film Optical Filters; Born & Wolf)
    fc.assert(
      fc.property(
        fc.array(fc.oneof(lossless, absorbing), { minLength: 1, maxLength: 8 }),
        fc.double({ min: 1.0, max: 2.0, noNaN: true }),
        fc.double({ min: 1.3, max: 2.5, noNaN: true }),
        fc.double({ min: 0, max: 60, noNaN: true }),
        fc.double({ min: 350, max: 1500, noNaN: true }),
        (layers, n0, ns, a, lambda) => {
          const front = stack({ layers, incident: [n0, 0], substrate: [ns, 0] });
          const back = stack({ layers: [...layers].reverse(), incident: [ns, 0], substrate: [n0, 0] });
          const sinS = (n0 * Math.sin((a * Math.PI) / 180)) / ns;
          if (sinS >= 0.999) return;
          const aBack = (Math.asin(sinS) * 180) / Math.PI;
          const f = computeSpectrum(front, { wavelengths: [lambda], angleDeg: a });
          const b = computeSpectrum(back, { wavelengths: [lambda], angleDeg: aBack });
          expectClose(b.s.T[0]!, f.s.T[0]!, 1e-8, 1e-13);
          expectClose(b.p.T[0]!, f.p.T[0]!, 1e-8, 1e-13);
        },
      ),
      { numRuns: 150 },
    );
  });
});

/** Airy summation for one film with complex Fresnel coefficients, written independently of the engine. */
function airyFilm(n0: number, N1: Cx, ns: number, d: number, lambda: number, thetaDeg: number) {
  const s = n0 * Math.sin((thetaDeg * Math.PI) / 180);
  const c0 = Cx.of(Math.cos((thetaDeg * Math.PI) / 180));
  // cos θ1 = √(1 − s²/N1²); the principal root has Re ≥ 0 and, for N1 = n − ik, gives a
  // forward-decaying wave exp(−i k N1 cos θ1 z) (checked below: Im(N1 cos θ1) ≤ 0)
  const c1 = Cx.of(1).sub(Cx.of(s * s).div(N1.mul(N1))).sqrt();
  const cs = Cx.of(Math.sqrt(1 - (s / ns) ** 2));
  const q1 = N1.mul(c1);
  if (q1.im > 0) throw new Error("reference branch is not decaying");
  const n0c = Cx.of(n0);
  const nsc = Cx.of(ns);
  // Born & Wolf Fresnel amplitude coefficients
  const rs = (a: Cx, ca: Cx, b: Cx, cb: Cx) => a.mul(ca).sub(b.mul(cb)).div(a.mul(ca).add(b.mul(cb)));
  const ts = (a: Cx, ca: Cx, b: Cx, cb: Cx) => Cx.of(2).mul(a).mul(ca).div(a.mul(ca).add(b.mul(cb)));
  const rp = (a: Cx, ca: Cx, b: Cx, cb: Cx) => b.mul(ca).sub(a.mul(cb)).div(b.mul(ca).add(a.mul(cb)));
  const tp = (a: Cx, ca: Cx, b: Cx, cb: Cx) => Cx.of(2).mul(a).mul(ca).div(b.mul(ca).add(a.mul(cb)));
  const beta = q1.mul(Cx.of((2 * Math.PI * d) / lambda));
  const e1 = beta.mul(Cx.of(0, -1)).exp(); // exp(−iβ)
  const e2 = e1.mul(e1);
  const result = (r01: Cx, r12: Cx, t01: Cx, t12: Cx) => {
    const den = Cx.of(1).add(r01.mul(r12).mul(e2));
    const r = r01.add(r12.mul(e2)).div(den);
    const t = t01.mul(t12).mul(e1).div(den);
    return { r, t };
  };
  const S = result(rs(n0c, c0, N1, c1), rs(N1, c1, nsc, cs), ts(n0c, c0, N1, c1), ts(N1, c1, nsc, cs));
  const P = result(rp(n0c, c0, N1, c1), rp(N1, c1, nsc, cs), tp(n0c, c0, N1, c1), tp(N1, c1, nsc, cs));
  const ratio = (ns * cs.re) / (n0 * c0.re);
  return {
    Rs: S.r.abs2(),
    Ts: S.t.abs2() * ratio,
    Rp: P.r.abs2(),
    Tp: P.t.abs2() * ratio,
  };
}

describe("absorbing films at oblique incidence (branch choice)", () => {
  it("a thin metal film matches the Airy formula with complex Fresnel coefficients, s and p", () => {
    // Airy summation for a single absorbing film (Born & Wolf, Principles of Optics; Heavens)
    const cases: [number, number, number, number, number][] = [
      // n, k, d nm, λ nm, angle°
      [0.055, 3.43, 20, 550, 45], // silver-like
      [0.96, 6.69, 10, 550, 60], // aluminium-like
      [3.05, 3.35, 5, 550, 30], // chromium-like
      [0.2, 3, 8, 700, 80],
      [2.0, 0.5, 150, 633, 70],
    ];
    for (const [n, k, d, lambda, a] of cases) {
      const ref = airyFilm(1, Cx.of(n, -k), 1.52, d, lambda, a);
      const sp = computeSpectrum(stack({ layers: [[n, k, d]], substrate: [1.52, 0] }), { wavelengths: [lambda], angleDeg: a });
      expectClose(sp.s.R[0]!, ref.Rs, 1e-10, 1e-14);
      expectClose(sp.s.T[0]!, ref.Ts, 1e-10, 1e-14);
      expectClose(sp.p.R[0]!, ref.Rp, 1e-10, 1e-14);
      expectClose(sp.p.T[0]!, ref.Tp, 1e-10, 1e-14);
      expect(sp.s.A[0]!).toBeGreaterThan(0);
      expect(sp.p.A[0]!).toBeGreaterThan(0);
    }
  });
});
