import { describe, expect, it } from "vitest";
import { render } from "@testing-library/react";
import type { SpecBand } from "@stackproof/optics";
import { SpectrumChart } from "./spectrum-chart.tsx";
import { forbiddenRegions } from "../lib/mask-geometry.ts";

const bands: SpecBand[] = [
  { id: "pass", label: "Passband", start: 500, stop: 600, quantity: "T", polarization: "u", angleDeg: 0, requirement: "min", value: 90 },
  { id: "block", label: "Blocking", start: 650, stop: 700, quantity: "T", polarization: "u", angleDeg: 0, requirement: "max", value: 1, tolerance: 0.5 },
  { id: "od", start: 650, stop: 700, quantity: "OD", polarization: "u", angleDeg: 0, requirement: "min", value: 3 },
];

const wl = Array.from({ length: 301 }, (_, i) => 450 + i);
// T is 95 % except a dip to 80 % at 540–549 nm and a leak of 5 % at 660–669 nm
const T = wl.map((w) => (w >= 540 && w < 550 ? 80 : w >= 660 && w < 670 ? 5 : w >= 650 ? 0.1 : 95));

describe("spectrum chart", () => {
  const regions = forbiddenRegions(bands, new Map([["pass", false], ["block", false], ["od", true]]));

  it("draws each band of the plotted scale as a forbidden region on the correct side of its limit", () => {
    const { container } = render(
      <SpectrumChart width={800} height={300} scale="percent" domain={{ start: 450, stop: 750 }} curves={[{ id: "T", label: "T", quantity: "T", wavelengths: wl, values: T, color: "#000", primary: true }]} regions={regions} title="test" />,
    );
    const drawn = [...container.querySelectorAll("[data-region]")];
    expect(drawn.map((g) => g.getAttribute("data-region"))).toEqual(["pass", "block"]); // the OD band belongs to the OD scale
    const pass = container.querySelector('[data-region="pass"] rect') as SVGRectElement;
    const block = container.querySelector('[data-region="block"] rect') as SVGRectElement;
    // plot area: 300 − 14 − 42 = 244 px tall, y = 0 % at 244 px. min band: shaded from the limit down to 0 %.
    expect(Number(pass.getAttribute("y"))).toBeCloseTo(244 * (1 - 0.9), 5);
    expect(Number(pass.getAttribute("y")) + Number(pass.getAttribute("height"))).toBeCloseTo(244, 5);
    // max band with tolerance: limit 1 + 0.5 = 1.5 %, shaded from the top (100 %) down to the limit.
    expect(Number(block.getAttribute("y"))).toBe(0);
    expect(Number(block.getAttribute("height"))).toBeCloseTo(244 * (1 - 0.015), 5);
    // x extent: 736 px wide over 450–750 nm
    expect(Number(pass.getAttribute("x"))).toBeCloseTo((736 * 50) / 300, 5);
    expect(Number(pass.getAttribute("width"))).toBeCloseTo((736 * 100) / 300, 5);
  });

  it("draws the verdict's violation points, not violations recomputed from the curve on screen", () => {
    // the curve shown (0°) has no violation of "pass"; the verdict (e.g. at the band's 20° p) has two points
    const { container } = render(
      <SpectrumChart
        width={800}
        height={300}
        scale="percent"
        domain={{ start: 450, stop: 750 }}
        curves={[{ id: "T", label: "T", quantity: "T", wavelengths: wl, values: wl.map(() => 95), color: "#000", primary: true }]}
        regions={regions}
        violations={[
          { bandId: "pass", quantity: "T", wavelength: 540, value: 80, angleDeg: 20, polarization: "p" },
          { bandId: "pass", quantity: "T", wavelength: 541, value: 81, angleDeg: 20, polarization: "p" },
          { bandId: "od", quantity: "OD", wavelength: 660, value: 1.3, angleDeg: 0, polarization: "u" },
        ]}
        title="test"
      />,
    );
    expect(container.querySelectorAll('[data-violation="pass"]')).toHaveLength(2);
    expect(container.querySelectorAll('[data-violation="od"]')).toHaveLength(0); // OD points belong to the OD scale
    const dot = container.querySelector('[data-violation="pass"]') as SVGCircleElement;
    expect(Number(dot.getAttribute("cy"))).toBeCloseTo(244 * (1 - 0.8), 5);
  });

  it("draws OD bands on the OD scale", () => {
    const od = T.map((t) => -Math.log10(t / 100));
    const { container } = render(
      <SpectrumChart width={600} height={300} scale="od" domain={{ start: 450, stop: 750 }} curves={[{ id: "OD", label: "OD", quantity: "OD", wavelengths: wl, values: od, color: "#000", primary: true }]} regions={regions} title="test" />,
    );
    expect([...container.querySelectorAll("[data-region]")].map((g) => g.getAttribute("data-region"))).toEqual(["od"]);
    expect(container.querySelector('[data-region="od"]')?.getAttribute("data-side")).toBe("below");
  });
});
