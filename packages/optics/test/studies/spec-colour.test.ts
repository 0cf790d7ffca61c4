// Colour requirements in the spec mask: the same evaluation path as the bands (nominal verdict, margins,
// merit, Monte Carlo yield, sensitivity, validation) and their ISO 9211 style wording.
import { describe, expect, it } from "vitest";
import { judgeColour, type Design } from "../../src/core/index.ts";
import {
  createSpecEvaluator,
  describeColourIso,
  evaluateSpec,
  maskWavelengths,
  mergeYieldChunks,
  meritOf,
  parseSpecMask,
  runYieldChunk,
  specSensitivity,
} from "../../src/studies/index.ts";
import type {
  SpecBand,
  SpecColourInput,
  SpecMaskInput,
  YieldChunk,
  YieldStudy,
} from "../../src/studies/index.ts";
import { partVerdict, type MeasuredPart } from "../../src/studies/asbuilt/index.ts";
import { TEST_MATERIALS, htwAr4, qwotDesign } from "./fixtures.ts";

const colour = (over: Partial<SpecColourInput> & Pick<SpecColourInput, "limit">): SpecColourInput => ({
  id: "colour",
  quantity: "R",
  ...over,
});
const mask = (...entries: SpecColourInput[]): SpecMaskInput => ({ bands: [], colour: entries });
const only = (design: Design, m: SpecMaskInput) => {
  const r = evaluateSpec(design, m);
  return { result: r, outcome: r.bands[r.bands.length - 1]! };
};

// Bare glass n = 1.52, front surface only: R = ((1.52 − 1)/(1.52 + 1))² = 4.2578 % at every wavelength (Hecht,
// Optics, Fresnel equations). A flat reflector has the chromaticity of the illuminant (CIE 15:2004, 7.3: x, y of
// the illuminant are those of the perfect reflecting diffuser, and scaling the spectrum does not change x, y).
const glass = qwotDesign([]);
const R_GLASS = ((1.52 - 1) / (1.52 + 1)) ** 2;
// CIELAB lightness of Y/Yn = R (CIE 15:2004, 8.2.1: L* = 116 (Y/Yn)^(1/3) − 16 for Y/Yn > (6/29)³)
const L_GLASS = 116 * Math.cbrt(R_GLASS) - 16;

// White points of CIE 15:2004, Table T.3 (4 decimals)
const WHITE = {
  "D65/2": [0.3127, 0.329],
  "D65/10": [0.3138, 0.331],
  "A/2": [0.4476, 0.4074],
} as const;

describe("colour requirement on bare glass (reflected colour = the illuminant's chromaticity, CIE 15:2004)", () => {
  it.each([
    ["D65", "2"],
    ["D65", "10"],
    ["A", "2"],
  ] as const)(
    "illuminant %s, %s° observer: (x, y) of the white point, Y = 4.26 %%",
    (illuminant, observer) => {
      const [x0, y0] = WHITE[`${illuminant}/${observer}` as keyof typeof WHITE];
      const box = {
        type: "box-xy" as const,
        x: [x0 - 0.001, x0 + 0.001] as [number, number],
        y: [y0 - 0.001, y0 + 0.001] as [number, number],
      };
      const { result, outcome } = only(glass, mask(colour({ illuminant, observer, limit: box })));
      expect(outcome.colour!.x).toBeCloseTo(x0, 4);
      expect(outcome.colour!.y).toBeCloseTo(y0, 4);
      // Y of a flat reflector is its reflectance in percent (perfect reflector Y = 100)
      expect(outcome.colour!.Y).toBeCloseTo(100 * R_GLASS, 9);
      expect(outcome.average).toBeCloseTo(100 * R_GLASS, 9);
      expect(outcome.colour!.L).toBeCloseTo(L_GLASS, 9);
      expect(Math.abs(outcome.colour!.a) + Math.abs(outcome.colour!.b)).toBeLessThan(1e-9);
      // a box that contains it passes, with the distance to the nearest edge as margin
      expect(outcome.pass).toBe(true);
      expect(result.pass).toBe(true);
      expect(outcome.margin).toBeGreaterThan(0.0009 - 5e-5);
      expect(outcome.margin).toBeLessThanOrEqual(0.001);
      expect(result.merit).toBe(0);
    },
  );

  it("a box that excludes it fails: margin = distance past the edge, the deciding coordinate named", () => {
    const { result, outcome } = only(
      glass,
      mask(colour({ limit: { type: "box-xy", x: [0.32, 0.34], y: [0.3, 0.35] } })),
    );
    expect(result.pass).toBe(false);
    expect(outcome.pass).toBe(false);
    expect(outcome.margin).toBeCloseTo(outcome.colour!.x - 0.32, 12);
    expect(outcome.margin).toBeCloseTo(0.3127 - 0.32, 4);
    expect(outcome.colour!.limiting).toBe("x");
    expect(outcome.worst.value).toBe(outcome.colour!.x);
    expect(outcome.worst.wavelength).toBeNaN();
    expect(outcome.reason).toMatch(/\(x, y\) = \(0\.3127, 0\.3290\) outside the box/);
    // the merit sees the violation: x/y counted in hundredths (COLOUR_XY_RESIDUAL_SCALE = 100)
    expect(result.merit).toBeCloseTo((100 * (0.32 - outcome.colour!.x)) ** 2, 9);
  });

  it("a*/b* box with an L* range: inside passes; an L* range above the glass's L* fails on L*", () => {
    const ab = { a: [-0.5, 0.5] as [number, number], b: [-0.5, 0.5] as [number, number] };
    const inside = only(
      glass,
      mask(colour({ limit: { type: "box-ab", ...ab, L: [L_GLASS - 1, L_GLASS + 1] } })),
    ).outcome;
    expect(inside.pass).toBe(true);
    expect(inside.margin).toBeCloseTo(0.5, 9);
    const dark = only(glass, mask(colour({ limit: { type: "box-ab", ...ab, L: [30, 40] } }))).outcome;
    expect(dark.pass).toBe(false);
    expect(dark.colour!.limiting).toBe("L");
    expect(dark.margin).toBeCloseTo(L_GLASS - 30, 9);
  });

  it("transmitted colour at 45°, s-polarized: Y = Ts of one surface (Fresnel, Hecht), x, y of the illuminant", () => {
    const n = 1.52;
    const ci = Math.cos(Math.PI / 4);
    const ct = Math.sqrt(1 - (Math.sin(Math.PI / 4) / n) ** 2);
    const rs = (ci - n * ct) / (ci + n * ct);
    const { outcome } = only(
      glass,
      mask(
        colour({
          quantity: "T",
          angleDeg: 45,
          polarization: "s",
          limit: { type: "box-xy", x: [0.3, 0.32], y: [0.32, 0.34] },
        }),
      ),
    );
    expect(outcome.colour!.Y).toBeCloseTo(100 * (1 - rs * rs), 9);
    expect(outcome.colour!.x).toBeCloseTo(0.3127, 4);
    expect(outcome.worst.angleDeg).toBe(45);
    expect(outcome.worst.polarization).toBe("s");
  });
});

// Sharma, Wu & Dalal, "The CIEDE2000 color-difference formula: implementation notes, supplementary test data, and
// mathematical observations", Color Res. Appl. 30, 21–30 (2005), Table 1, pairs 1, 2, 3 and 7 (L1 a1 b1, L2 a2 b2,
// ΔE00). Values checked against public transcriptions of Table 1 (e.g. Argyll CMS's icc test of the same paper).
const SHARMA: [number, [number, number, number], [number, number, number], number][] = [
  [1, [50, 2.6772, -79.7751], [50, 0, -82.7485], 2.0425],
  [2, [50, 3.1571, -77.2803], [50, 0, -82.7485], 2.8615],
  [3, [50, 2.8361, -74.02], [50, 0, -82.7485], 3.4412],
  [7, [50, 0, 0], [50, -1, 2], 2.3669],
];

describe("ΔE*ab limits (CIEDE2000 against Sharma, Wu & Dalal 2005, Table 1; CIE76)", () => {
  const at = ([L, a, b]: [number, number, number]) => ({
    X: 0,
    Y: 0,
    Z: 0,
    x: 0,
    y: 0,
    L,
    a,
    b,
    illuminant: "D65" as const,
    observer: "2" as const,
  });

  it.each(SHARMA)(
    "pair %i: the mask's judgement gives the published ΔE00 and flips at it",
    (_, target, sample, published) => {
      const limit = (max: number) => ({
        type: "delta-e" as const,
        formula: "CIEDE2000" as const,
        target: { L: target[0], a: target[1], b: target[2] },
        max,
      });
      const j = judgeColour(limit(published + 0.0005), at(sample));
      expect(j.deltaE).toBeCloseTo(published, 4);
      expect(j.limiting).toBe("deltaE");
      expect(j.margin).toBeGreaterThan(0);
      expect(judgeColour(limit(published - 0.0005), at(sample)).margin).toBeLessThan(0);
    },
  );

  // A dispersion-free substrate reflecting Y/Yn = ((50 + 16)/116)³ at every wavelength has L*a*b* = (50, 0, 0)
  // exactly (CIE 15:2004, 8.2.1): Sharma's pair 7 through the whole mask path, design to verdict.
  const Yr = ((50 + 16) / 116) ** 3;
  const nGrey = (1 + Math.sqrt(Yr)) / (1 - Math.sqrt(Yr));
  const grey: Design = {
    ...qwotDesign([]),
    substrate: { material: "grey", thicknessMm: 1, backside: false },
    materials: [
      ...TEST_MATERIALS,
      {
        id: "grey",
        name: "grey",
        model: { kind: "constant", n: nGrey, k: 0 },
        role: "substrate",
        source: "test value",
      },
    ],
  };

  it("pair 7 through evaluateSpec: a neutral L* = 50 reflector against target (50, −1, 2), ΔE00 = 2.3669", () => {
    const dE = (max: number) =>
      only(
        grey,
        mask(
          colour({ limit: { type: "delta-e", formula: "CIEDE2000", target: { L: 50, a: -1, b: 2 }, max } }),
        ),
      ).outcome;
    const pass = dE(2.3674);
    expect(pass.colour!.L).toBeCloseTo(50, 9);
    expect(pass.colour!.deltaE).toBeCloseTo(2.3669, 4);
    expect(pass.pass).toBe(true);
    const fail = dE(2.3664);
    expect(fail.pass).toBe(false);
    expect(fail.reason).toMatch(/ΔE \(CIEDE2000\) = 2\.37 exceeds 2\.3664/);
  });

  it("CIE76 is the Euclidean distance (CIE 15:2004, 8.2.4): (50, 0, 0) to (50, 3, 4) is 5", () => {
    const o = only(
      grey,
      mask(colour({ limit: { type: "delta-e", formula: "CIE76", target: { L: 50, a: 3, b: 4 }, max: 5.5 } })),
    ).outcome;
    expect(o.colour!.deltaE).toBeCloseTo(5, 9);
    expect(o.margin).toBeCloseTo(0.5, 9);
  });
});

describe("colour requirements share the bands' evaluation", () => {
  const band: SpecBand = {
    id: "ar",
    start: 500,
    stop: 600,
    step: 10,
    quantity: "R",
    polarization: "u",
    angleDeg: 0,
    requirement: "max",
    value: 5,
  };
  const c = colour({ id: "neutral", limit: { type: "box-ab", a: [-1, 1], b: [-1, 1] } });

  it("outcomes come bands first, then colour; a band's verdict is the same with or without colour beside it", () => {
    const alone = evaluateSpec(glass, { bands: [band] });
    const both = evaluateSpec(glass, { bands: [band], colour: [c] });
    expect(both.bands.map((b) => b.id)).toEqual(["ar", "neutral"]);
    expect(both.bands[0]).toEqual(alone.bands[0]);
    const ev = createSpecEvaluator(glass, { bands: [band], colour: [c] });
    expect(ev.ids).toEqual(["ar", "neutral"]);
    // the colour joined the band's (0°, unpolarized) group: one stack evaluator, band samples + 380–780 nm
    expect(ev.groups).toHaveLength(1);
    expect(ev.groups[0]!.wavelengths.length).toBe(81 + 0); // 500…600 every 10 nm are all on the 5 nm grid
    const out = new Float64Array(2);
    expect(ev.margins(ev.nominalThicknesses, out)).toBe(true);
    expect(out[1]).toBeCloseTo(both.bands[1]!.margin, 12);
    expect(ev.violations(1)).toEqual([]);
    expect(ev.residualCount).toBe(11 + 1);
    expect(maskWavelengths({ bands: [{ ...band, start: 1000, stop: 1000 }], colour: [c] })).toHaveLength(82);
  });

  it("a failing colour fails the design even when every band passes; sensitivity reports it", () => {
    const bad = {
      ...c,
      limit: { type: "box-ab" as const, a: [2, 4] as [number, number], b: [-1, 1] as [number, number] },
    };
    const r = evaluateSpec(glass, { bands: [band], colour: [bad] });
    expect(r.bands[0]!.pass).toBe(true);
    expect(r.pass).toBe(false);
    const ev = createSpecEvaluator(glass, { bands: [band], colour: [bad] });
    expect(meritOf(ev, ev.nominalThicknesses)).toBeCloseTo(4, 6); // a* ≈ 0 is 2 below the box: (2)²
    const ar = qwotDesign([["L138", 1]]);
    const s = specSensitivity(ar, { bands: [band], colour: [bad] });
    expect(s.bands.map((b) => b.id)).toEqual(["ar", "neutral"]);
    // the MgF2-like quarter wave tints the reflection: its thickness moves a*, so the derivative is not zero
    expect(Math.abs(s.bands[1]!.thickness[0]!)).toBeGreaterThan(0);
  });

  it("a non-finite spectrum never passes: the reason names the wavelength", () => {
    const d = qwotDesign([["H230", 1]]);
    d.layers = [{ material: "H230", thickness: 1e308 }];
    const { result, outcome } = only(
      d,
      mask(colour({ limit: { type: "box-ab", a: [-100, 100], b: [-100, 100] } })),
    );
    expect(result.pass).toBe(false);
    expect(outcome.margin).toBeNaN();
    expect(outcome.reason).toMatch(/not finite at \d+ nm \(0°, u\)/);
    const ev = createSpecEvaluator(
      d,
      mask(colour({ limit: { type: "box-ab", a: [-100, 100], b: [-100, 100] } })),
    );
    const res = new Float64Array(ev.residualCount);
    ev.residuals(ev.nominalThicknesses, res);
    expect(res[0]).toBeGreaterThan(0);
  });
});

describe("mask validation with colour (RangeError naming the field and value)", () => {
  const band: SpecBand = {
    id: "b",
    start: 500,
    stop: 600,
    quantity: "R",
    polarization: "u",
    angleDeg: 0,
    requirement: "max",
    value: 5,
  };
  const ok = colour({ limit: { type: "box-xy", x: [0.3, 0.32], y: [0.32, 0.34] } });

  it("old masks stay valid and unchanged: no colour key is added (stored form and hash unchanged)", () => {
    const parsed = parseSpecMask({ bands: [band] });
    expect("colour" in parsed).toBe(false);
    expect(JSON.stringify(parsed)).not.toMatch(/colour/);
  });

  it("fills the defaults into a stored colour requirement (D65, 2°, 0°, unpolarized); a kind tag is dropped", () => {
    const stored = { ...ok, illuminant: "D65", observer: "2", angleDeg: 0, polarization: "u" };
    expect(parseSpecMask(mask(ok)).colour![0]).toEqual(stored);
    expect(parseSpecMask(mask({ ...ok, kind: "colour" } as SpecColourInput)).colour![0]).toEqual(stored);
  });

  it.each([
    [{ bands: [] }, /^mask\.bands: a mask needs at least one band or colour requirement/],
    [{ bands: [], colour: [] }, /mask\.bands: a mask needs at least one band or colour requirement/],
    [{ bands: [band], colour: [{ ...ok, id: "b" }] }, /mask\.colour\[0\]\.id: duplicate id.*got "b"/],
    [mask({ ...ok, quantity: "A" as "R" }), /mask\.colour\[0\]\.quantity: expected "R" or "T", got "A"/],
    [
      mask({ ...ok, illuminant: "F2" as "A" }),
      /mask\.colour\[0\]\.illuminant: expected "D65" or "A", got "F2"/,
    ],
    [mask({ ...ok, observer: "4" as "2" }), /mask\.colour\[0\]\.observer.*got "4"/],
    [mask({ ...ok, angleDeg: 95 }), /mask\.colour\[0\]\.angleDeg: expected an angle 0 ≤ θ < 90°, got 95/],
    [mask({ ...ok, polarization: "sp" as "s" }), /mask\.colour\[0\]\.polarization.*got "sp"/],
    [
      mask({ ...ok, limit: { type: "box-xy", x: [0.4, 0.3], y: [0, 1] } }),
      /mask\.colour\[0\]\.limit\.x: expected \[min, max\] with min ≤ max/,
    ],
    [
      mask({ ...ok, limit: { type: "box-ab", a: [0, Number.NaN], b: [0, 1] } }),
      /mask\.colour\[0\]\.limit\.a\[1\]/,
    ],
    [
      mask({
        ...ok,
        limit: { type: "delta-e", formula: "CIEDE2000", target: { L: 50, a: 0, b: 0 }, max: 0 },
      }),
      /mask\.colour\[0\]\.limit\.max: expected a ΔE limit > 0, got 0/,
    ],
    [
      mask({
        ...ok,
        limit: { type: "delta-e", formula: "CIE94" as "CIE76", target: { L: 50, a: 0, b: 0 }, max: 1 },
      }),
      /mask\.colour\[0\]\.limit\.formula.*got "CIE94"/,
    ],
    [mask({ ...ok, id: "" }), /mask\.colour\[0\]\.id/],
  ] as [unknown, RegExp][])("refuses %j", (input, message) => {
    expect(() => parseSpecMask(input)).toThrow(RangeError);
    expect(() => parseSpecMask(input)).toThrow(message);
  });
});

describe("Monte Carlo yield with a colour box (visible AR)", () => {
  // The four-layer visible AR of docs/examples; its nominal reflected colour (D65, 2°) is a faint violet
  // (Y ≈ 0.09 %, a* ≈ 2.1, b* ≈ −1.2). A ±1.5 box around it that some builds leave: yield in (0, 1)
  // (0.6375 with this seed and 240 trials when written).
  const design = htwAr4();
  const nominal = evaluateSpec(
    design,
    mask(colour({ limit: { type: "box-ab", a: [-100, 100], b: [-100, 100] } })),
  ).bands[0]!.colour!;
  const study = (limit: SpecColourInput["limit"], trials = 240): YieldStudy => ({
    design,
    mask: {
      bands: [
        {
          id: "avg",
          start: 420,
          stop: 680,
          step: 10,
          quantity: "R",
          polarization: "u",
          angleDeg: 0,
          requirement: "avgMax",
          value: 2,
        },
      ],
      colour: [colour({ id: "hue", limit })],
    },
    errorModel: {
      thickness: { relativePct: 2, absoluteNm: 0.3, distribution: "normal" },
      systematicPct: 0.5,
    },
    trials,
    seed: "colour-yield-1",
  });
  const box = {
    type: "box-ab" as const,
    a: [nominal.a - 1.5, nominal.a + 1.5] as [number, number],
    b: [nominal.b - 1.5, nominal.b + 1.5] as [number, number],
  };

  it("yield is between 0 and 1, counts colour failures by id, and is identical for any chunking", () => {
    const s = study(box);
    const one = mergeYieldChunks(s, [runYieldChunk(s, 0, 240)]);
    const chunks: YieldChunk[] = [];
    let start = 0;
    for (const n of [1, 13, 50, 99, 77]) {
      chunks.push(runYieldChunk(s, start, n));
      start += n;
    }
    expect(start).toBe(240);
    const many = mergeYieldChunks(s, [...chunks].reverse());
    expect(JSON.stringify(many)).toBe(JSON.stringify(one));
    expect(one.yield).toBeGreaterThan(0);
    expect(one.yield).toBeLessThan(1);
    expect(one.bandFailures.map((b) => b.id)).toEqual(["avg", "hue"]);
    expect(one.bandFailures[1]!.count).toBeGreaterThan(0);
    expect(one.nominal.pass).toBe(true);
  });

  it("a box no build can leave gives the bands' yield; a box no build can reach gives 0", () => {
    const wide = mergeYieldChunks(study({ type: "box-ab", a: [-200, 200], b: [-200, 200] }, 60), [
      runYieldChunk(study({ type: "box-ab", a: [-200, 200], b: [-200, 200] }, 60), 0, 60),
    ]);
    expect(wide.bandFailures[1]!.count).toBe(0);
    const bandsOnly = { ...study(box, 60), mask: { bands: study(box, 60).mask.bands } };
    expect(wide.passCount).toBe(mergeYieldChunks(bandsOnly, [runYieldChunk(bandsOnly, 0, 60)]).passCount);
    const never = study({ type: "box-ab", a: [50, 60], b: [50, 60] }, 60);
    const none = mergeYieldChunks(never, [runYieldChunk(never, 0, 60)]);
    expect(none.passCount).toBe(0);
    expect(none.bandFailures[1]!.count).toBe(60);
  });
});

describe("ISO 9211 style wording of a colour requirement", () => {
  it("names quantity, observer, illuminant, angle, polarization and the requirement", () => {
    expect(
      describeColourIso(
        colour({ limit: { type: "delta-e", formula: "CIEDE2000", target: { L: 50, a: -1, b: 2 }, max: 2 } }),
      ),
    ).toBe(
      "Colour of reflected light: CIE 1931 standard colorimetric observer (2°), CIE illuminant D65; angle of incidence 0°; unpolarized; ΔE*ab (CIEDE2000) ≤ 2 from L* = 50, a* = −1, b* = 2",
    );
    expect(
      describeColourIso(
        colour({
          quantity: "T",
          illuminant: "A",
          observer: "10",
          angleDeg: 15,
          polarization: "s",
          limit: { type: "box-xy", x: [0.44, 0.455], y: [0.4, 0.415] },
        }),
      ),
    ).toBe(
      "Colour of transmitted light: CIE 1964 standard colorimetric observer (10°), CIE illuminant A; angle of incidence 15°; s-polarized; chromaticity 0.44 ≤ x ≤ 0.455 and 0.4 ≤ y ≤ 0.415",
    );
    expect(
      describeColourIso(colour({ limit: { type: "box-ab", a: [-2, 2], b: [-6, -1], L: [20, 30] } })),
    ).toMatch(/CIELAB −2 ≤ a\* ≤ 2 and −6 ≤ b\* ≤ −1 and 20 ≤ L\* ≤ 30$/);
    expect(() =>
      describeColourIso(colour({ angleDeg: 90, limit: { type: "box-ab", a: [0, 1], b: [0, 1] } })),
    ).toThrow(/colour\.angleDeg/);
  });
});

describe("measured parts: colour requirements are judged, never skipped", () => {
  const band: SpecBand = {
    id: "low",
    start: 450,
    stop: 650,
    quantity: "R",
    polarization: "u",
    angleDeg: 0,
    requirement: "max",
    value: 5,
  };
  // a flat measured reflectance of 4.26 % (bare glass, Hecht) over the given span, percent, u = 0.2 points
  const part = (from: number, to: number, pct = 100 * R_GLASS): MeasuredPart => ({
    id: "p",
    measurements: [
      {
        wavelengths: [from, to],
        values: [pct, pct],
        quantity: "R",
        angleDeg: 0,
        polarization: "u",
        uncertaintyPct: 0.2,
      },
    ],
  });
  const xy = colour({ limit: { type: "box-xy", x: [0.3107, 0.3147], y: [0.327, 0.331] } });

  it("a flat measured spectrum has the illuminant's chromaticity; shifting it moves no x, y: no guard", () => {
    const v = partVerdict({ bands: [band], colour: [xy] }, part(380, 780));
    expect(v.bands.map((b) => [b.bandId, b.status])).toEqual([
      ["low", "pass"],
      ["colour", "pass"],
    ]);
    expect(v.bands[1]!.margin).toBeCloseTo(0.002, 4); // x = 0.3127 (CIE 15:2004)
    expect(v.bands[1]!.guard).toBeCloseTo(0, 12);
    expect(v.status).toBe("pass");
  });

  it("a measurement short of 430–700 nm leaves the colour not measured: the part is incomplete, not passed", () => {
    const v = partVerdict({ bands: [band], colour: [xy] }, part(440, 700));
    expect(v.bands[1]!.status).toBe("not-measured");
    expect(v.status).toBe("incomplete");
  });

  it("L* moves with the photometric error: inside by less than the guard fails with k = 2, passes with k = 0", () => {
    const c = colour({ limit: { type: "box-ab", a: [-1, 1], b: [-1, 1], L: [L_GLASS - 0.5, 40] } });
    const guarded = partVerdict({ bands: [band], colour: [c] }, part(380, 780), 2);
    expect(guarded.bands[1]!.margin).toBeCloseTo(0.5, 6);
    // R − 0.4 points: L* = 116 ((R − 0.004))^(1/3) − 16 (CIE 15:2004, 8.2.1)
    expect(guarded.bands[1]!.guard).toBeCloseTo(L_GLASS - (116 * Math.cbrt(R_GLASS - 0.004) - 16), 6);
    expect(guarded.bands[1]!.status).toBe("fail");
    expect(partVerdict({ bands: [band], colour: [c] }, part(380, 780), 0).bands[1]!.status).toBe("pass");
  });
});
