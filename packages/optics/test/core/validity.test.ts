// Valid ranges, absorbing-dielectric models (Tauc–Lorentz, Urbach, Drude–Lorentz), the corrected
// silicon absorption, the added library materials, and refusal of non-physical inputs.
import { describe, expect, it } from "vitest";
import fc from "fast-check";
import {
  HC_EV_NM,
  MATERIAL_LIBRARY,
  MaterialModelSchema,
  checkDesignInputs,
  computeSpectrum,
  getMaterial,
  parseDesign,
  refractiveIndex,
  taucLorentzEpsilon,
  validRange,
  type MaterialModel,
} from "../../src/core/index.ts";
import { expectClose } from "./helpers.ts";

// a-Si parameters of Jellison & Modine, Appl. Phys. Lett. 69, 371 (1996), Table I (from memory)
const aSi = { A: 122, E0: 3.45, C: 2.54, Eg: 1.2, epsInf: 1.15 };

/** ε1(E) − ε∞ = (2/π) P∫_Eg^∞ ξ ε2(ξ)/(ξ² − E²) dξ, principal value by subtracting the pole. */
function kramersKronig(E: number): number {
  const e2E = taucLorentzEpsilon(aSi, E).eps2;
  // ξ = Eg + s², s ∈ [0, S]: dense near the gap, reaches ξ ≈ Eg + 1e4 eV (ε2 ~ ξ⁻³ beyond)
  const S = 100;
  const N = 400_000;
  const h = S / N;
  let sum = 0;
  for (let i = 0; i < N; i++) {
    const s = (i + 0.5) * h; // midpoint rule never lands on ξ = E exactly
    const xi = aSi.Eg + s * s;
    const f = (xi * taucLorentzEpsilon(aSi, xi).eps2 - E * e2E) / (xi * xi - E * E);
    sum += f * 2 * s * h;
  }
  // analytic remainder: E ε2(E) P∫_Eg^∞ dξ/(ξ² − E²) = −E ε2(E) ln|(Eg − E)/(Eg + E)|/(2E)
  const pole =
    E > aSi.Eg ? (-e2E * Math.log(Math.abs((aSi.Eg - E) / (aSi.Eg + E)))) / 2 : e2E === 0 ? 0 : NaN;
  // tail beyond ξmax of the subtracted constant: −E ε2(E) ∫_ξmax^∞ dξ/(ξ² − E²) ≈ −E ε2(E)/ξmax
  const xiMax = aSi.Eg + S * S;
  return (2 / Math.PI) * (sum + pole - (E * e2E) / xiMax);
}

describe("Tauc–Lorentz (Jellison & Modine 1996)", () => {
  it("ε2 is zero up to the gap, positive above it, peaks once and falls as E⁻³", () => {
    // shape of the published ε2 (Jellison & Modine 1996, Fig. 1 / Eq. 4)
    expect(taucLorentzEpsilon(aSi, 1.0).eps2).toBe(0);
    expect(taucLorentzEpsilon(aSi, 1.2).eps2).toBe(0);
    expect(taucLorentzEpsilon(aSi, 1.3).eps2).toBeGreaterThan(0);
    // value at E = E0 from the formula: A (E0 − Eg)² / (C E0²)
    expectClose(
      taucLorentzEpsilon(aSi, aSi.E0).eps2,
      (aSi.A * (aSi.E0 - aSi.Eg) ** 2) / (aSi.C * aSi.E0 ** 2),
      1e-12,
    );
    let peakE = 0;
    let peak = -1;
    let rises = 0;
    let falls = 0;
    let prev = 0;
    for (let E = 1.21; E < 20; E += 0.01) {
      const e2 = taucLorentzEpsilon(aSi, E).eps2;
      if (e2 > peak) {
        peak = e2;
        peakE = E;
      }
      if (e2 > prev) rises++;
      else falls++;
      if (falls > 0 && e2 > prev + 1e-12) expect.fail(`ε2 rises again at ${E} eV`);
      prev = e2;
    }
    expect(rises).toBeGreaterThan(0);
    expect(peakE).toBeGreaterThan(aSi.Eg);
    expect(peakE).toBeLessThan(aSi.E0 + aSi.C);
    // high-energy limit ε2 → A E0 C / E³
    const E = 400;
    expectClose(taucLorentzEpsilon(aSi, E).eps2 * E ** 3, aSi.A * aSi.E0 * aSi.C, 0.02);
  });

  it("the closed-form ε1 equals a numerical Kramers–Kronig integral of ε2", () => {
    // Kramers–Kronig relation (Jellison & Modine 1996, Eq. 5): independent numerical check
    for (const E of [0.5, 1.0, 1.5, 2.0, 2.5, 3.0, 3.45, 4.5, 6.0, 10.0]) {
      const closed = taucLorentzEpsilon(aSi, E).eps1 - aSi.epsInf;
      const numeric = kramersKronig(E);
      expectClose(closed, numeric, 2e-4, 2e-4);
    }
  });

  it("the library's a-Si film (Jellison & Modine's a-Si parameters) gives n ≈ 4.2, k ≈ 0.4 at 633 nm", () => {
    // typical amorphous-silicon film at 633 nm (common practice, from memory)
    const v = refractiveIndex(getMaterial("a-Si").model, 632.8);
    expect(v.n).toBeGreaterThan(4);
    expect(v.n).toBeLessThan(4.5);
    expect(v.k).toBeGreaterThan(0.2);
    expect(v.k).toBeLessThan(0.7);
  });

  it("ε1 is continuous through the gap (the logarithmic terms cancel at E = Eg)", () => {
    const at = taucLorentzEpsilon(aSi, aSi.Eg).eps1;
    expectClose(taucLorentzEpsilon(aSi, aSi.Eg * (1 + 1e-9)).eps1, at, 1e-6);
    expectClose(taucLorentzEpsilon(aSi, aSi.Eg * (1 - 1e-9)).eps1, at, 1e-6);
  });

  it("ε1 → ε∞ at high energy; N = n − ik with k = 0 below the gap", () => {
    expectClose(taucLorentzEpsilon(aSi, 1e4).eps1, aSi.epsInf, 1e-3);
    const model = MaterialModelSchema.parse({ kind: "tauc-lorentz", ...aSi });
    const below = refractiveIndex(model, HC_EV_NM / 1.0);
    expect(below.k).toBe(0);
    const above = refractiveIndex(model, HC_EV_NM / 3.0);
    const { eps1, eps2 } = taucLorentzEpsilon(aSi, 3.0);
    // n² − k² = ε1, 2nk = ε2 (N² = ε with N = n − ik, ε = ε1 − iε2)
    expectClose(above.n ** 2 - above.k ** 2, eps1, 1e-12, 1e-12);
    expectClose(2 * above.n * above.k, eps2, 1e-12, 1e-12);
  });

  it("refuses C ≥ 2·E0 and Eg ≥ E0 (the closed form needs α = √(4E0² − C²) real)", () => {
    expect(MaterialModelSchema.safeParse({ kind: "tauc-lorentz", A: 100, E0: 2, C: 4, Eg: 1 }).success).toBe(
      false,
    );
    expect(MaterialModelSchema.safeParse({ kind: "tauc-lorentz", A: 100, E0: 2, C: 1, Eg: 3 }).success).toBe(
      false,
    );
  });
});

describe("Urbach tail and Drude–Lorentz", () => {
  it("Urbach: k = k0·exp((E − E0)/Eu) below E0, added to Cauchy's constant k", () => {
    // Urbach, Phys. Rev. 92, 1324 (1953): exponential absorption edge
    const m = MaterialModelSchema.parse({
      kind: "cauchy",
      A: 2,
      k: 1e-4,
      urbach: { k0: 0.2, E0: 3.5, Eu: 0.1 },
    });
    const lam = 450;
    const E = HC_EV_NM / lam;
    expectClose(refractiveIndex(m, lam).k, 1e-4 + 0.2 * Math.exp((E - 3.5) / 0.1), 1e-12);
    // one Eu further from the gap → k falls by e
    const E1 = 3.0;
    const E2 = 2.9;
    const k1 = refractiveIndex(m, HC_EV_NM / E1).k - 1e-4;
    const k2 = refractiveIndex(m, HC_EV_NM / E2).k - 1e-4;
    expectClose(k1 / k2, Math.E, 1e-9);
    // above the gap k is held at k0 (+ constant k)
    expectClose(refractiveIndex(m, 300).k, 0.2 + 1e-4, 1e-12);
  });

  it("Drude: below the plasma energy ε1 < 0 (metal), above it the film turns transparent", () => {
    // free-electron (Drude) dielectric function, e.g. Rakić et al., Appl. Opt. 37, 5271 (1998)
    const m = MaterialModelSchema.parse({ kind: "drude-lorentz", epsInf: 1, Ep: 9, gamma0: 0.05 });
    const ir = refractiveIndex(m, HC_EV_NM / 1); // E = 1 eV ≪ Ep
    expect(ir.k).toBeGreaterThan(ir.n * 10);
    // ε = 1 − Ep²/(E² + iEΓ): at 1 eV, ε1 ≈ 1 − 81/(1 + 0.0025)
    expectClose(ir.n ** 2 - ir.k ** 2, 1 - (81 * 1) / (1 + 0.0025), 1e-9);
    const uv = refractiveIndex(m, HC_EV_NM / 20); // E = 20 eV > Ep
    expect(uv.n).toBeGreaterThan(0.5);
    expect(uv.k).toBeLessThan(0.05);
  });

  it("a Lorentz oscillator adds its resonance: ε2 peaks at Eⱼ with height f Ep²/(Eⱼ γ)", () => {
    const m = MaterialModelSchema.parse({
      kind: "drude-lorentz",
      epsInf: 1,
      Ep: 5,
      f0: 0,
      gamma0: 0,
      oscillators: [{ f: 0.1, E: 4, gamma: 0.2 }],
    });
    const v = refractiveIndex(m, HC_EV_NM / 4);
    expectClose(2 * v.n * v.k, (0.1 * 25) / (4 * 0.2), 1e-9);
  });
});

describe("valid ranges", () => {
  it("fused silica carries Malitson's 0.21–3.71 µm; outside it a warning, not a silent n = 6.75", () => {
    // Malitson, J. Opt. Soc. Am. 55, 1205 (1965): fit valid 0.21–3.71 µm
    const m = getMaterial("fused-silica").model;
    expect(validRange(m)).toEqual([210, 3710]);
    expect(refractiveIndex(m, 1000).outOfRange).toBeUndefined();
    expect(refractiveIndex(m, 10000).outOfRange).toBe(true);
    const design = parseDesign({
      format: "stackproof.design/v1",
      name: "bare silica",
      referenceWavelength: 1000,
      layers: [],
      substrate: { material: "fused-silica", thicknessMm: 1, backside: false },
    });
    const sp = computeSpectrum(design, { wavelengths: [1000, 5000, 10000] });
    expect(sp.warnings.join(" ")).toMatch(
      /fused-silica: 2 wavelength\(s\) outside the sellmeier model's valid range 210–3710 nm/,
    );
  });

  it("beyond a table is still a refusal (RangeError naming λ and the range)", () => {
    const si = getMaterial("silicon").model;
    expect(() => refractiveIndex(si, 300)).toThrow(/300 nm is outside the table range 400–10000 nm/);
  });

  it("every library material has a source and a range; finite n > 0, k ≥ 0 across it (property)", () => {
    for (const mat of MATERIAL_LIBRARY) {
      expect(mat.model.range, mat.id).toBeDefined();
      expect(mat.source.length, mat.id).toBeGreaterThan(10);
    }
    fc.assert(
      fc.property(
        fc.integer({ min: 0, max: MATERIAL_LIBRARY.length - 1 }),
        fc.double({ min: 0, max: 1, noNaN: true }),
        (i, t) => {
          const mat = MATERIAL_LIBRARY[i]!;
          const [a, b] = validRange(mat.model)!;
          const lam = Math.min(b, Math.max(a, a * Math.pow(b / a, t))); // log-uniform across the range
          const v = refractiveIndex(mat.model, lam);
          return Number.isFinite(v.n) && v.n > 0 && Number.isFinite(v.k) && v.k >= 0 && !v.outOfRange;
        },
      ),
      { numRuns: 3000, seed: 20261202 },
    );
  });

  it("old documents without ranges stay valid", () => {
    const m = MaterialModelSchema.parse({ kind: "cauchy", A: 1.5 });
    expect(validRange(m)).toBeNull();
    expect(refractiveIndex(m, 100000).outOfRange).toBeUndefined();
  });
});

describe("library constants", () => {
  it("a 0.5 mm silicon wafer transmits about 25–30 % at 1064 nm including both surfaces", () => {
    // expected range stated in the product's issue; α ≈ 10 cm⁻¹ at 1064 nm after Green (2008); this table gives T ≈ 0.295
    const design = parseDesign({
      format: "stackproof.design/v1",
      name: "wafer",
      referenceWavelength: 1064,
      layers: [],
      substrate: { material: "silicon", thicknessMm: 0.5, backside: true },
    });
    const T = computeSpectrum(design, { wavelengths: [1064] }).u.T[0]!;
    expect(T).toBeGreaterThan(0.25);
    expect(T).toBeLessThan(0.3);
    // and it is opaque in the visible: α(600 nm) ≈ 4e3 cm⁻¹ (Green 2008)
    const Tvis = computeSpectrum(design, { wavelengths: [600] }).u.T[0]!;
    expect(Tvis).toBeLessThan(1e-30);
  });

  it("TiO2, Nb2O5 and ZnS absorb below their gaps' edges and are nearly lossless in the visible", () => {
    // edges of dense films (from memory): strongly absorbing at 300 nm, k < 1e-3 at 550 nm
    for (const id of ["TiO2", "Nb2O5", "ZnS"]) {
      const m = getMaterial(id).model;
      expect(refractiveIndex(m, 300).k, id).toBeGreaterThan(0.1);
      expect(refractiveIndex(m, 300).outOfRange, id).toBe(true);
      expect(refractiveIndex(m, 550).k, id).toBeLessThan(1e-3);
    }
    expect(refractiveIndex(getMaterial("TiO2").model, 400).k).toBeGreaterThan(1e-3);
  });

  it("CaF2 (Malitson 1963) and ZnSe (Tatian 1984) give their catalogue indices", () => {
    // CaF2 n_d ≈ 1.4338 (Malitson, Appl. Opt. 2, 1103, 1963; from memory)
    expect(refractiveIndex(getMaterial("CaF2").model, 587.6).n).toBeCloseTo(1.4338, 3);
    // ZnSe n ≈ 2.403 at 10.6 µm (Connolly et al. 1979 / Tatian 1984; from memory)
    expect(refractiveIndex(getMaterial("ZnSe").model, 10600).n).toBeCloseTo(2.403, 2);
  });

  it("new film entries sit in their usual ranges at 550 nm (from memory)", () => {
    const at = (id: string) => refractiveIndex(getMaterial(id).model, 550);
    expect(at("YF3").n).toBeCloseTo(1.5, 1);
    expect(at("LaF3").n).toBeCloseTo(1.59, 1);
    expect(at("AlF3").n).toBeCloseTo(1.38, 1);
    expect(at("Y2O3").n).toBeCloseTo(1.9, 1);
    expect(at("Sc2O3").n).toBeCloseTo(1.98, 1);
    expect(at("SiO").n).toBeCloseTo(1.95, 1);
    const ito = at("ITO");
    expect(ito.n).toBeGreaterThan(1.8);
    expect(ito.n).toBeLessThan(2.05);
    expect(ito.k).toBeGreaterThan(0.001);
    expect(ito.k).toBeLessThan(0.05);
    // ITO turns metallic past its plasma edge (ε1 < 0 → k > n)
    const ir = refractiveIndex(getMaterial("ITO").model, 2000);
    expect(ir.k).toBeGreaterThan(ir.n);
  });
});

describe("Lorentz–Drude metals", () => {
  it("Ag-LD and Au-LD agree with the tabulated Ag and Au within 15 % in k across the visible and near IR", () => {
    // two descriptions of the same metals (Rakić 1998 fit vs the Johnson & Christy-shaped tables, both from memory)
    for (const [ld, tab] of [
      ["Ag-LD", "Ag"],
      ["Au-LD", "Au"],
    ] as const) {
      for (const lam of [500, 600, 800, 1000, 1500, 2000]) {
        const a = refractiveIndex(getMaterial(ld).model, lam);
        const b = refractiveIndex(getMaterial(tab).model, lam);
        expect(Math.abs(a.k - b.k) / b.k, `${ld} at ${lam} nm`).toBeLessThan(0.15);
        expect(a.n).toBeLessThan(1); // a good metal: n ≪ k
      }
    }
  });
});

describe("refused inputs (issue: physics inputs that cannot poison a verdict)", () => {
  const base = {
    format: "stackproof.design/v1",
    name: "x",
    referenceWavelength: 550,
    substrate: { material: "fused-silica", thicknessMm: 1, backside: true },
  };
  const wl = [400, 532, 700, 1800];

  it("a design-local material with n = 1e308 is refused by the schema and by checkDesignInputs", () => {
    const huge = {
      id: "huge",
      name: "huge",
      role: "layer",
      source: "attack",
      model: { kind: "constant", n: 1e308 },
    };
    expect(() =>
      checkDesignInputs({ ...base, layers: [{ material: "huge", thickness: 100 }], materials: [huge] }, wl),
    ).toThrow(/materials\[0\]\.model\.n.*1e\+308/);
    // a table with an absurd n gets past the schema, not past the check: named material, model, λ
    const table = {
      id: "bad",
      name: "bad",
      role: "layer",
      source: "attack",
      model: {
        kind: "table",
        points: [
          [300, 1e308, 0],
          [2000, 1e308, 0],
        ],
      },
    };
    expect(() =>
      checkDesignInputs({ ...base, layers: [{ material: "bad", thickness: 100 }], materials: [table] }, wl),
    ).toThrow(/layers\[0\]\.material: material "bad" \(table model\) gives n = 1e\+308 .* at 400 nm/);
  });

  it("a Cauchy model with n ≤ 0 inside the evaluated wavelengths is refused naming λ", () => {
    const neg = {
      id: "neg",
      name: "neg",
      role: "layer",
      source: "attack",
      model: { kind: "cauchy", A: 1.5, B: 0, C: -0.2 },
    };
    // n(532 nm) = 1.5 − 0.2/0.0801 < 0
    expect(() =>
      checkDesignInputs({ ...base, layers: [{ material: "neg", thickness: 100 }], materials: [neg] }, wl),
    ).toThrow(/material "neg" \(cauchy model\) gives n = -[0-9.]+ .* at 400 nm/);
    // the stack preparation refuses it too (no T > 1 comes out)
    const d = parseDesign({ ...base, layers: [{ material: "neg", thickness: 100 }], materials: [neg] });
    expect(() => computeSpectrum(d, { wavelengths: [532] })).toThrow(/neg.*cauchy model.*532 nm/);
  });

  it("thicknesses must be finite and at most 1e6 nm per layer", () => {
    expect(() =>
      checkDesignInputs({ ...base, layers: [{ material: "SiO2", thickness: 1e308 }] }, wl),
    ).toThrow(/layers\[0\]\.thickness: expected at most 1000000 nm.*1e\+308/);
    expect(() =>
      checkDesignInputs({ ...base, layers: [{ material: "SiO2", thickness: Infinity }] }, wl),
    ).toThrow(RangeError);
    expect(() => checkDesignInputs({ ...base, layers: [{ material: "SiO2", thickness: NaN }] }, wl)).toThrow(
      RangeError,
    );
    expect(() =>
      checkDesignInputs(
        { ...base, substrate: { material: "fused-silica", thicknessMm: 1e9, backside: true }, layers: [] },
        wl,
      ),
    ).toThrow(/substrate\.thicknessMm/);
    expect(
      checkDesignInputs({ ...base, layers: [{ material: "SiO2", thickness: 1e6 }] }, wl).layers[0]!.thickness,
    ).toBe(1e6);
  });

  it("a sound design passes and comes back parsed", () => {
    const d = checkDesignInputs(
      {
        ...base,
        layers: [
          { material: "TiO2", thickness: 60 },
          { material: "SiO2", thickness: 90 },
        ],
      },
      wl,
    );
    expect(d.layers).toHaveLength(2);
  });

  it("the kernel refuses a non-finite index even when the schema was bypassed", () => {
    const d = parseDesign({ ...base, layers: [{ material: "SiO2", thickness: 100 }] });
    const hacked = {
      ...d,
      materials: [
        {
          id: "SiO2",
          name: "x",
          role: "layer" as const,
          source: "x",
          model: { kind: "constant", n: NaN, k: 0 } as MaterialModel,
        },
      ],
    };
    expect(() => computeSpectrum(hacked, { wavelengths: [532] })).toThrow(
      /SiO2.*constant model.*n = NaN.*532 nm/,
    );
  });
});
