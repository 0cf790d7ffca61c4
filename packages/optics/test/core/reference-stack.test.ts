// Engine (all kernel paths: real, mixed, complex, full matrix, index-recomputing) against a
// plain object-complex implementation of the same method.
import fc from "fast-check";
import { describe, it } from "vitest";
import { computeSpectrum, createStackEvaluator } from "../../src/core/index.ts";
import { expectClose, referenceRT, stack } from "./helpers.ts";

const layer = fc.tuple(
  fc.double({ min: 1.2, max: 4, noNaN: true }),
  fc.oneof(fc.constant(0), fc.constant(0), fc.double({ min: 0, max: 4, noNaN: true })),
  fc.double({ min: 0, max: 300, noNaN: true }),
);

describe("engine against an independent characteristic-matrix implementation", () => {
  it("matches for random lossless, mixed and absorbing stacks, with and without back surface", () => {
    // Macleod, Thin-Film Optical Filters: characteristic matrix, incoherent substrate
    fc.assert(
      fc.property(
        fc.array(layer, { maxLength: 10 }),
        fc.double({ min: 0, max: 80, noNaN: true }),
        fc.boolean(),
        fc.double({ min: 0, max: 1e-6, noNaN: true }),
        fc.double({ min: 350, max: 1500, noNaN: true }),
        (layers, a, backside, ks, lambda) => {
          const spec = { layers, backside, substrate: [1.52, ks] as [number, number], thicknessMm: 0.5 };
          const d = stack(spec);
          const sp = computeSpectrum(d, { wavelengths: [lambda], angleDeg: a });
          for (const pol of ["s", "p"] as const) {
            const ref = referenceRT(spec, lambda, a, pol);
            expectClose(sp[pol].R[0]!, ref.R, 1e-9, 1e-12);
            expectClose(sp[pol].T[0]!, ref.T, 1e-9, 1e-12);
            const ev = createStackEvaluator(d, { wavelengths: [lambda], angleDeg: a, polarization: pol });
            const out = { R: new Float64Array(1), T: new Float64Array(1), A: new Float64Array(1) };
            ev.evaluate(ev.nominalThicknesses, out, new Float64Array(ev.layerCount).fill(1));
            expectClose(out.R[0]!, ref.R, 1e-9, 1e-12);
            expectClose(out.T[0]!, ref.T, 1e-9, 1e-12);
          }
        },
      ),
      { numRuns: 200 },
    );
  });
});
