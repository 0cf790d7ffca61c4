import { describe, expect, it } from "vitest";
import {
  fieldForPath,
  fractionToPercentText,
  parsePerMaterial,
  programFormSchema,
  defaultFormValues,
  formValuesFromProgram,
  toProgramBody,
} from "./program-form-model.ts";
import type { Program } from "../api/get-program.ts";

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
    expect(fieldForPath("specMask.bands.0.step")).toBe("bands.0.stop");
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

  it("keeps a stored band's angle range, cone and 's and p each' through an edit (nothing is lost)", () => {
    const base = { ...defaultFormValues(), name: "x", bands: [{ ...defaultFormValues().bands[0]!, start: "400", stop: "700", value: "1" }] };
    const body = toProgramBody(base);
    const stored = {
      ...body,
      specMask: {
        bands: [
          { id: "eyewear", start: 520, stop: 540, step: 0.5, quantity: "OD", polarization: "sp", angleDeg: 0, angleRange: { fromDeg: 0, toDeg: 30 }, requirement: "min", value: 4 },
          { id: "lens", start: 900, stop: 910, quantity: "T", polarization: "u", angleDeg: 5, cone: { fNumber: 2 }, requirement: "avgMin", value: 80 },
        ],
      },
    } as unknown as Program;
    const again = toProgramBody(formValuesFromProgram(stored));
    expect(again.specMask.bands).toEqual([
      expect.objectContaining({ id: "eyewear", step: 0.5, polarization: "sp", angleRange: { fromDeg: 0, toDeg: 30 } }),
      expect.objectContaining({ id: "lens", angleDeg: 5, cone: { fNumber: 2 } }),
    ]);
  });
});
