import { describe, expect, it } from "vitest";
import {
  fieldForPath,
  fractionToPercentText,
  parsePerMaterial,
  programFormSchema,
  defaultFormValues,
} from "./program-form-model.ts";

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
});
