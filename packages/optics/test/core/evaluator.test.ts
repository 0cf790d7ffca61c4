// The fast evaluator must agree with computeSpectrum (same kernel, different entry points).
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import {
  computeSpectrum,
  createStackEvaluator,
  getMaterial,
  parseDesign,
  refractiveIndex,
  type Design,
} from "../../src/core/index.ts";
import { expectAllClose, stack } from "./helpers.ts";

const layer = fc.tuple(
  fc.double({ min: 0.1, max: 4, noNaN: true }),
  fc.oneof(fc.constant(0), fc.double({ min: 0, max: 4, noNaN: true })),
  fc.double({ min: 0, max: 400, noNaN: true }),
);

const rta = (W: number) => ({ R: new Float64Array(W), T: new Float64Array(W), A: new Float64Array(W) });

describe("createStackEvaluator", () => {
  it("equals computeSpectrum for random stacks, angles, polarizations, with and without back surface", () => {
    // self-consistency of two entry points over one kernel (common practice, no source)
    fc.assert(
      fc.property(
        fc.array(layer, { maxLength: 10 }),
        fc.oneof(fc.constant(0), fc.double({ min: 0, max: 85, noNaN: true })),
        fc.constantFrom("s" as const, "p" as const, "u" as const),
        fc.boolean(),
        (layers, a, pol, back) => {
          const d = stack({ layers, backside: back, substrate: [1.6, 1e-6] });
          const wl = [400, 550, 700, 1000];
          const sp = computeSpectrum(d, { wavelengths: wl, angleDeg: a });
          const ev = createStackEvaluator(d, { wavelengths: wl, angleDeg: a, polarization: pol });
          const out = rta(wl.length);
          ev.evaluate(ev.nominalThicknesses, out);
          const ref = sp[pol];
          expectAllClose(out.R, ref.R, 1e-12, 1e-15);
          expectAllClose(out.T, ref.T, 1e-12, 1e-15);
          expectAllClose(out.A, ref.A, 1e-12, 1e-14);
          // index scale of 1 takes the recomputing path and must give the same numbers
          const ones = new Float64Array(ev.layerCount).fill(1);
          ev.evaluate(ev.nominalThicknesses, out, ones);
          expectAllClose(out.R, ref.R, 1e-10, 1e-14);
          expectAllClose(out.T, ref.T, 1e-10, 1e-14);
        },
      ),
      { numRuns: 120 },
    );
  });

  it("index scale equals a design with scaled materials; thickness changes equal an edited design", () => {
    // self-consistency (common practice, no source)
    const base = parseDesign({
      format: "stackproof.design/v1",
      name: "scale check",
      referenceWavelength: 550,
      layers: [
        { material: "TiO2", thickness: 57 },
        { material: "SiO2", thickness: 94 },
        { material: "Ag", thickness: 12 },
        { material: "TiO2", thickness: 30 },
      ],
      substrate: { material: "boro-crown", thicknessMm: 1, backside: true },
    });
    const f = [1.01, 0.99, 1.03, 0.98];
    const scaledMaterials = base.layers.map((l, i) => {
      const m = getMaterial(l.material);
      const model = m.model;
      const wl = [450, 550, 650, 800];
      // scaled copy as a table of N·f at the grid wavelengths
      const points = wl.map((w) => {
        const d = refractiveIndex(model, w);
        return [w, d.n * f[i]!, d.k * f[i]!] as [number, number, number];
      });
      return { id: `scaled${i}`, name: `scaled ${i}`, model: { kind: "table" as const, points }, role: "layer" as const, source: "test" };
    });
    const scaled: Design = parseDesign({
      ...base,
      layers: base.layers.map((l, i) => ({ ...l, material: `scaled${i}` })),
      materials: scaledMaterials,
    });
    const wl = [450, 550, 650, 800];
    for (const pol of ["s", "p", "u"] as const) {
      const ev = createStackEvaluator(base, { wavelengths: wl, angleDeg: 35, polarization: pol });
      const out = rta(4);
      ev.evaluate(ev.nominalThicknesses, out, Float64Array.from(f));
      const ref = computeSpectrum(scaled, { wavelengths: wl, angleDeg: 35 })[pol];
      expectAllClose(out.R, ref.R, 1e-10, 1e-14);
      expectAllClose(out.T, ref.T, 1e-10, 1e-14);
      const thick = Float64Array.from([60, 90, 11, 33]);
      ev.evaluate(thick, out);
      const edited = parseDesign({ ...base, layers: base.layers.map((l, i) => ({ ...l, thickness: thick[i]! })) });
      expectAllClose(out.R, computeSpectrum(edited, { wavelengths: wl, angleDeg: 35 })[pol].R, 1e-12, 1e-15);
    }
  });

  it("lossless index scaling uses the real path and agrees with the complex recomputation", () => {
    // self-consistency (common practice, no source)
    const d = stack({ layers: [[2.3, 0, 60], [1.46, 0, 95], [2.3, 0, 61], [1.46, 0, 93]], backside: true });
    const ev = createStackEvaluator(d, { wavelengths: [500, 600, 700], angleDeg: 40, polarization: "p" });
    const out = rta(3);
    const f = Float64Array.from([1.02, 0.98, 1.0, 1.01]);
    ev.evaluate(ev.nominalThicknesses, out, f);
    const dd = stack({
      layers: [[2.3 * 1.02, 0, 60], [1.46 * 0.98, 0, 95], [2.3, 0, 61], [1.46 * 1.01, 0, 93]],
      backside: true,
    });
    expectAllClose(out.R, computeSpectrum(dd, { wavelengths: [500, 600, 700], angleDeg: 40 }).p.R, 1e-12, 1e-15);
  });

  it("rejects wrong lengths with a RangeError", () => {
    const d = stack({ layers: [[2, 0, 100]] });
    const ev = createStackEvaluator(d, { wavelengths: [500], angleDeg: 0, polarization: "s" });
    expect(() => ev.evaluate(new Float64Array(2), rta(1))).toThrow(RangeError);
    expect(() => ev.evaluate(new Float64Array(1), rta(1), new Float64Array(3))).toThrow(/indexScale/);
    expect(() => createStackEvaluator(d, { wavelengths: [500], angleDeg: 90, polarization: "s" })).toThrow(/angleDeg/);
  });

  it("survives opaque metal (no overflow): thick silver is a mirror with T ≈ 0", () => {
    // a 2 µm silver film is opaque; R equals the semi-infinite metal value (Macleod, metal mirrors)
    const d = stack({ layers: [[0.055, 3.43, 2000], [0.055, 3.43, 3000]] });
    const ev = createStackEvaluator(d, { wavelengths: [550], angleDeg: 20, polarization: "s" });
    const out = rta(1);
    ev.evaluate(ev.nominalThicknesses, out);
    const semi = computeSpectrum(stack({ substrate: [0.055, 3.43] }), { wavelengths: [550], angleDeg: 20 }).s.R[0]!;
    expect(Number.isFinite(out.R[0]!)).toBe(true);
    expect(Math.abs(out.R[0]! - semi)).toBeLessThan(1e-12);
    expect(out.T[0]!).toBeLessThan(1e-100);
  });
});
