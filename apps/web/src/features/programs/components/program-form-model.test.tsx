import { describe, expect, it } from "vitest";
import {
  emptyBand,
  emptyColour,
  fieldForPath,
  fractionToPercentText,
  parsePerMaterial,
  programFormSchema,
  defaultFormValues,
  formValuesFromProgram,
  toProgramBody,
} from "./program-form-model.ts";
import { SpecBandSchema } from "@stackproof/optics";
import type { Program } from "../api/get-program.ts";
import type { BandValues, ColourValues, ProgramFormValues } from "./program-form-model.ts";

describe("program form model", () => {
  it("shows stored fractions as percent without float noise", () => {
    expect(fractionToPercentText(0.95)).toBe("95");
    expect(fractionToPercentText(0.575)).toBe("57.5");
    expect(fractionToPercentText(0.999)).toBe("99.9");
  });

  it("reads per-material spreads", () => {
    expect(parsePerMaterial("")).toBeUndefined();
    expect(parsePerMaterial("0,4")).toBe(0.4);
    expect(parsePerMaterial("Ta2O5 = 0.5, SiO2 = 0.4")).toEqual({ Ta2O5: 0.5, SiO2: 0.4 });
    expect(parsePerMaterial("Ta2O5 = x")).toBeNaN();
  });

  it("maps the server's issue paths to the form's fields", () => {
    expect(fieldForPath("targetYield")).toBe("targetYieldPct");
    expect(fieldForPath("specMask.bands.3.stop")).toBe("bands.3.stop");
    expect(fieldForPath("specMask.bands.0.step")).toBe("bands.0.step");
    expect(fieldForPath("specMask.bands.1.angleRange.toDeg")).toBe("bands.1.rangeTo");
    expect(fieldForPath("specMask.bands.1.angleRange.stepDeg")).toBe("bands.1.rangeStep");
    expect(fieldForPath("specMask.bands.2.cone.fNumber")).toBe("bands.2.cone");
    expect(fieldForPath("specMask.colour.0.limit.x")).toBe("colour.0.xMin");
    expect(fieldForPath("specMask.colour.0.limit.b.1")).toBe("colour.0.bMax");
    expect(fieldForPath("specMask.colour.1.limit.target.a")).toBe("colour.1.targetA");
    expect(fieldForPath("specMask.colour.1.limit.max")).toBe("colour.1.deltaE");
    expect(fieldForPath("specMask.colour.0.illuminant")).toBe("colour.0.illuminant");
    expect(fieldForPath("errorModel.thickness.truncateSigma")).toBe("truncateSigma");
    expect(fieldForPath("errorModel.systematicPct.SiO2")).toBe("systematicPct");
    expect(fieldForPath("studyDefaults.trials")).toBe("trials");
    expect(fieldForPath("somethingElse")).toBeNull();
  });

  it("checks the error model with the optics package's schema", () => {
    const v = {
      ...defaultFormValues(),
      name: "x",
      truncateSigma: "0.1",
      bands: [{ ...defaultFormValues().bands[0]!, start: "400", stop: "700", value: "1" }],
    };
    const r = programFormSchema.safeParse(v);
    expect(r.success).toBe(false);
    expect(r.error?.issues.map((i) => i.path.join("."))).toEqual(["truncateSigma"]);
  });

  const valid = (over: Partial<ProgramFormValues> = {}): ProgramFormValues => ({
    ...defaultFormValues(),
    name: "x",
    bands: [{ ...emptyBand(0), start: "400", stop: "700", value: "1" }],
    ...over,
  });
  const band = (over: Partial<BandValues>): BandValues => ({
    ...emptyBand(0),
    start: "520",
    stop: "540",
    value: "4",
    ...over,
  });
  const colour = (over: Partial<ColourValues>): ColourValues => ({
    ...emptyColour(0),
    aMin: "-2",
    aMax: "2",
    bMin: "-3",
    bMax: "1",
    ...over,
  });
  const issues = (v: ProgramFormValues) => {
    const r = programFormSchema.safeParse(v);
    return r.success ? [] : r.error.issues.map((i) => `${i.path.join(".")}: ${i.message}`);
  };

  it("creates an angle range (from, to, step), its average, a cone by f-number or half-angle, and 's and p each'", () => {
    const v = valid({
      bands: [
        band({
          id: "eyewear",
          quantity: "OD",
          requirement: "min",
          polarization: "sp",
          incidence: "range",
          rangeFrom: "0",
          rangeTo: "30",
          rangeStep: "2",
          step: "0.5",
        }),
        band({
          id: "avg",
          quantity: "T",
          requirement: "avgMin",
          incidence: "range",
          rangeFrom: "5",
          rangeTo: "15",
          angleAverage: true,
        }),
        band({
          id: "lens",
          quantity: "T",
          requirement: "avgMin",
          incidence: "cone",
          coneBy: "fNumber",
          cone: "2",
          angleDeg: "5",
        }),
        band({
          id: "wide",
          incidence: "cone",
          coneBy: "halfAngle",
          cone: "12.5",
          angleDeg: "0",
          requirement: "max",
        }),
      ],
    });
    expect(issues(v)).toEqual([]);
    expect(toProgramBody(v).specMask.bands).toEqual([
      {
        id: "eyewear",
        start: 520,
        stop: 540,
        step: 0.5,
        quantity: "OD",
        polarization: "sp",
        angleDeg: 0,
        angleRange: { fromDeg: 0, toDeg: 30, stepDeg: 2 },
        requirement: "min",
        value: 4,
      },
      {
        id: "avg",
        start: 520,
        stop: 540,
        quantity: "T",
        polarization: "u",
        angleDeg: 5,
        angleRange: { fromDeg: 5, toDeg: 15 },
        angleAverage: true,
        requirement: "avgMin",
        value: 4,
      },
      {
        id: "lens",
        start: 520,
        stop: 540,
        quantity: "T",
        polarization: "u",
        angleDeg: 5,
        cone: { fNumber: 2 },
        requirement: "avgMin",
        value: 4,
      },
      {
        id: "wide",
        start: 520,
        stop: 540,
        quantity: "R",
        polarization: "u",
        angleDeg: 0,
        cone: { halfAngleDeg: 12.5 },
        requirement: "max",
        value: 4,
      },
    ]);
    // every created band is a valid optics band (the API validates with the same schema)
    for (const b of toProgramBody(v).specMask.bands) expect(SpecBandSchema.safeParse(b).success).toBe(true);
    // an average without a range is not offered: switching back to a single angle drops it
    expect(
      toProgramBody(valid({ bands: [band({ angleAverage: true })] })).specMask.bands[0],
    ).not.toHaveProperty("angleAverage");
  });

  it("round-trips stored bands with conditions through the form unchanged", () => {
    const stored = [
      {
        id: "eyewear",
        start: 520,
        stop: 540,
        step: 0.5,
        quantity: "OD",
        polarization: "sp",
        angleDeg: 0,
        angleRange: { fromDeg: 0, toDeg: 30 },
        requirement: "min",
        value: 4,
      },
      {
        id: "lens",
        start: 900,
        stop: 910,
        quantity: "T",
        polarization: "u",
        angleDeg: 5,
        cone: { fNumber: 2 },
        requirement: "avgMin",
        value: 80,
      },
      {
        id: "cone2",
        start: 900,
        stop: 910,
        quantity: "T",
        polarization: "p",
        angleDeg: 0,
        cone: { halfAngleDeg: 8 },
        requirement: "avgMin",
        value: 80,
        tolerance: 1,
      },
      {
        id: "avg",
        start: 400,
        stop: 700,
        quantity: "R",
        polarization: "u",
        angleDeg: 10,
        angleRange: { fromDeg: 10, toDeg: 20, stepDeg: 0.5 },
        angleAverage: true,
        requirement: "avgMax",
        value: 1,
      },
    ];
    const colour = [
      {
        id: "tint",
        quantity: "R",
        illuminant: "A",
        observer: "10",
        angleDeg: 8,
        polarization: "s",
        limit: { type: "box-xy", x: [0.44, 0.46], y: [0.4, 0.42] },
      },
      {
        id: "lab",
        label: "Lab box",
        quantity: "T",
        illuminant: "D65",
        observer: "2",
        angleDeg: 0,
        polarization: "u",
        limit: { type: "box-ab", a: [-2, 2], b: [-3, 0], L: [90, 100] },
      },
      {
        id: "de",
        quantity: "R",
        illuminant: "D65",
        observer: "2",
        angleDeg: 0,
        polarization: "u",
        limit: { type: "delta-e", formula: "CIE76", target: { L: 30, a: 1, b: -4 }, max: 2.5 },
      },
    ];
    const program = { ...toProgramBody(valid()), specMask: { bands: stored, colour } } as unknown as Program;
    const values = formValuesFromProgram(program);
    expect(values.bands.map((b) => b.incidence)).toEqual(["range", "cone", "cone", "range"]);
    expect(values.bands[2]).toMatchObject({ coneBy: "halfAngle", cone: "8" });
    expect(issues(values)).toEqual([]);
    const again = toProgramBody(values);
    expect(again.specMask.bands).toEqual(stored);
    expect(again.specMask.colour).toEqual(colour);
  });

  it("creates colour requirements: an x/y box, an a*/b* box with or without L*, a ΔE limit", () => {
    const v = valid({
      colour: [
        colour({
          id: "xy",
          limit: "box-xy",
          xMin: "0.30",
          xMax: "0.32",
          yMin: "0.31",
          yMax: "0.33",
          illuminant: "A",
          observer: "10",
        }),
        colour({ id: "ab" }),
        colour({ id: "abL", LMin: "20", LMax: "30", quantity: "T", angleDeg: "12", polarization: "p" }),
        colour({
          id: "de",
          limit: "delta-e",
          formula: "CIEDE2000",
          targetL: "50",
          targetA: "0",
          targetB: "-2",
          deltaE: "1,5",
        }),
      ],
    });
    expect(issues(v)).toEqual([]);
    const body = toProgramBody(v).specMask;
    expect(body.colour).toEqual([
      {
        id: "xy",
        quantity: "R",
        illuminant: "A",
        observer: "10",
        angleDeg: 0,
        polarization: "u",
        limit: { type: "box-xy", x: [0.3, 0.32], y: [0.31, 0.33] },
      },
      {
        id: "ab",
        quantity: "R",
        illuminant: "D65",
        observer: "2",
        angleDeg: 0,
        polarization: "u",
        limit: { type: "box-ab", a: [-2, 2], b: [-3, 1] },
      },
      {
        id: "abL",
        quantity: "T",
        illuminant: "D65",
        observer: "2",
        angleDeg: 12,
        polarization: "p",
        limit: { type: "box-ab", a: [-2, 2], b: [-3, 1], L: [20, 30] },
      },
      {
        id: "de",
        quantity: "R",
        illuminant: "D65",
        observer: "2",
        angleDeg: 0,
        polarization: "u",
        limit: { type: "delta-e", formula: "CIEDE2000", target: { L: 50, a: 0, b: -2 }, max: 1.5 },
      },
    ]);
    // a mask of colour requirements alone is a mask; no colour list is sent when there is none
    expect(issues(valid({ bands: [], colour: [colour({})] }))).toEqual([]);
    expect(toProgramBody(valid())).not.toHaveProperty("specMask.colour");
    expect(issues(valid({ bands: [], colour: [] }))).toEqual([
      "bands: A spec mask needs at least one band or colour requirement.",
    ]);
  });

  it("says what is wrong with angle ranges, cones and steps, at the field", () => {
    expect(issues(valid({ bands: [band({ incidence: "range", rangeFrom: "20", rangeTo: "10" })] }))).toEqual([
      "bands.0.rangeTo: toDeg must be ≥ fromDeg (20°)",
    ]);
    expect(issues(valid({ bands: [band({ incidence: "range", rangeFrom: "0", rangeTo: "95" })] }))).toEqual([
      "bands.0.rangeTo: Enter an angle from 0 to below 90°.",
    ]);
    expect(
      issues(valid({ bands: [band({ incidence: "range", rangeFrom: "", rangeTo: "30", rangeStep: "20" })] })),
    ).toEqual([
      "bands.0.rangeFrom: Enter a number.",
      "bands.0.rangeStep: Enter an angle step above 0 and at most 10°, or leave it empty (1°).",
    ]);
    expect(
      issues(
        valid({ bands: [band({ incidence: "range", rangeFrom: "0", rangeTo: "89", rangeStep: "0.5" })] }),
      ),
    ).toEqual(["bands.0.rangeStep: step gives more than 91 angles over 0–89°"]);
    expect(issues(valid({ bands: [band({ incidence: "cone", coneBy: "fNumber", cone: "0.2" })] }))).toEqual([
      "bands.0.cone: Enter an f-number from 0.5 to 1000.",
    ]);
    expect(issues(valid({ bands: [band({ incidence: "cone", coneBy: "halfAngle", cone: "x" })] }))).toEqual([
      "bands.0.cone: Not a number.",
    ]);
    expect(
      issues(
        valid({ bands: [band({ incidence: "cone", coneBy: "halfAngle", cone: "30", angleDeg: "70" })] }),
      ),
    ).toEqual(["bands.0.cone: chief ray 70° plus cone half-angle 30.00° reaches grazing incidence"]);
    expect(issues(valid({ bands: [band({ step: "0" })] }))).toEqual([
      "bands.0.step: Enter a step above 0 nm, or leave it empty (1 nm).",
    ]);
    expect(issues(valid({ bands: [band({ start: "400", stop: "700", step: "0.01" })] }))).toEqual([
      "bands.0.step: step gives more than 20001 samples over 400–700 nm",
    ]);
  });

  it("says what is wrong with colour requirements, at the field; ids are shared with the bands", () => {
    expect(issues(valid({ colour: [colour({ aMin: "3", aMax: "1" })] }))).toEqual([
      "colour.0.aMax: The upper end must not be below the lower end.",
    ]);
    expect(issues(valid({ colour: [colour({ limit: "box-xy" })] }))).toEqual([
      "colour.0.xMin: Enter a number.",
      "colour.0.xMax: Enter a number.",
      "colour.0.yMin: Enter a number.",
      "colour.0.yMax: Enter a number.",
    ]);
    expect(issues(valid({ colour: [colour({ LMin: "20" })] }))).toEqual(["colour.0.LMax: Enter a number."]);
    expect(
      issues(
        valid({
          colour: [colour({ limit: "delta-e", targetL: "50", targetA: "0", targetB: "0", deltaE: "0" })],
        }),
      ),
    ).toEqual(["colour.0.deltaE: Enter a ΔE limit above 0."]);
    expect(issues(valid({ colour: [colour({ angleDeg: "90" })] }))).toEqual([
      "colour.0.angleDeg: Enter an angle from 0 to below 90°.",
    ]);
    expect(issues(valid({ colour: [colour({ id: "band-1" })] }))).toEqual([
      "colour.0.id: Another band or colour requirement has this id.",
    ]);
    expect(issues(valid({ colour: [colour({ id: " " })] }))).toEqual([
      "colour.0.id: Give the colour requirement an id.",
    ]);
  });
});
