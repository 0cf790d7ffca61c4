// Reading a stored release snapshot for the page and the PDF: which band limits each spectrum panel draws, where a
// curve is broken, and the error model in words. Pure functions of the stored JSON (no database).
import { describe, expect, it } from "vitest";
import { describeErrorModel, plotSegments, readReleaseRecord } from "../../src/domain/release-record.ts";

const band = (b: Record<string, unknown>) => ({
  step: 1,
  quantity: "T",
  polarization: "u",
  angleDeg: 0,
  ...b,
});
// A receiver mask like the demo's Kestrel: a passband in an f/2 cone, the same passband over 0–10°, blocking at 0°.
const bands = [
  band({ id: "pass-cone", start: 897, stop: 913, cone: { fNumber: 2 }, requirement: "avgMin", value: 90 }),
  band({
    id: "pass-field",
    start: 897,
    stop: 913,
    angleRange: { fromDeg: 0, toDeg: 10, stepDeg: 2 },
    requirement: "min",
    value: 80,
  }),
  band({ id: "block-short", start: 860, stop: 870, step: 5, requirement: "avgMax", value: 1 }),
  band({ id: "block-long", start: 940, stop: 950, step: 5, requirement: "avgMax", value: 1 }),
];
const series = (conditions: string | undefined, wavelengths: number[]) => ({
  quantity: "T",
  polarization: "u",
  angleDeg: 0,
  ...(conditions !== undefined ? { conditions } : {}),
  wavelengths,
  nominal: wavelengths.map(() => 50),
  low: null,
  high: null,
  lowP: null,
  highP: null,
});
const passWl = Array.from({ length: 17 }, (_, i) => 897 + i);
const blockWl = [860, 865, 870, 940, 945, 950];
const snapshot = (plot: unknown[]) => ({ revision: { specMask: { bands } }, plot });
const ids = (p: { bands: { id: string }[] }) => p.bands.map((b) => b.id);

describe("release record plots", () => {
  it("draw on each panel only the limits of the bands evaluated under its conditions", () => {
    // the conditions words are optics' bandConditionsText, stored with each series at release
    const r = readReleaseRecord(
      snapshot([
        series("f/2 cone (14.48° half-angle) about 0°, unpolarized", passWl),
        series("0–10°, unpolarized", passWl),
        series("0°, unpolarized", blockWl),
      ]),
      "released",
    );
    expect(r.plots.map(ids)).toEqual([["pass-cone"], ["pass-field"], ["block-short", "block-long"]]);
  });

  it("on records filed before conditions were stored, match angle and polarization, within the panel's wavelengths", () => {
    const r = readReleaseRecord(
      snapshot([series(undefined, passWl), series(undefined, blockWl)]),
      "released",
    );
    // the two passband series cannot be told apart any more, but blocking limits stay off the passband panel
    expect(r.plots.map(ids)).toEqual([
      ["pass-cone", "pass-field"],
      ["block-short", "block-long"],
    ]);
  });

  it("break a curve at the gap between two bands, not where the step merely changes", () => {
    expect(plotSegments([860, 865, 870, 940, 945, 950])).toEqual([
      [0, 1, 2],
      [3, 4, 5],
    ]);
    // 0.5 nm samples then 5 nm samples of the same group: one curve
    expect(plotSegments([500, 500.5, 501, 501.5, 506.5, 511.5, 516.5])).toEqual([[0, 1, 2, 3, 4, 5, 6]]);
    expect(plotSegments([])).toEqual([]);
    expect(plotSegments([700])).toEqual([[0]]);
  });
});

describe("release record error model", () => {
  it("is worded by the optics package, and a stored model it cannot read is said to be so", () => {
    expect(
      describeErrorModel({
        thickness: { relativePct: 0.5, absoluteNm: 0.3, distribution: "normal" },
        process: { control: { method: "crystal", toolingPct: 0.6 } },
      }),
    ).toBe("quartz-crystal control, tooling error 0.6 %");
    expect(
      describeErrorModel({ thickness: { relativePct: 1, absoluteNm: 0.3, distribution: "normal" } }),
    ).toBe("independent thickness errors 1 % + 0.3 nm per layer (normal)");
    expect(describeErrorModel({ process: { control: { method: "plasma" } } })).toMatch(/not readable/);
    expect(describeErrorModel(null)).toBe("not recorded");
    expect(readReleaseRecord({ yieldRun: { errorModel: "garbage" } }, "released").run?.errorModelText).toBe(
      "not recorded",
    );
  });
});
