import { describe, expect, it } from "vitest";
import { useState } from "react";
import { render, screen } from "@testing-library/react";
import userEvent from "@testing-library/user-event";
import { designFromQwots, evaluateSpec, type SpecMask } from "@stackproof/optics";
import { SpectrumPanel } from "./spectrum-panel.tsx";
import type { ChartView } from "./spectrum-panel.tsx";

const design = designFromQwots({
  name: "two layers",
  referenceWavelength: 550,
  layers: [
    { material: "Al2O3", qwot: 1 },
    { material: "MgF2", qwot: 1 },
  ],
  substrate: { material: "boro-crown", thicknessMm: 1, backside: false },
});

let latest: ChartView | null = null;

function Harness() {
  const [view, setView] = useState<ChartView>({
    settings: { start: 400, stop: 700, points: 200, angleDeg: 0, coneHalfAngleDeg: 0, polarization: "u" },
    quantities: ["R"],
    scale: "percent",
  });
  latest = view;
  return <SpectrumPanel design={design} mask={null} view={view} onViewChange={setView} />;
}

describe("spectrum panel range fields", () => {
  it("lets a range edge be retyped and takes it on Enter, not digit by digit", async () => {
    const user = userEvent.setup();
    render(<Harness />);
    const to = screen.getByLabelText("To (nm)");
    await user.clear(to);
    await user.type(to, "800");
    // Typing "8" alone would be below the start; the field keeps the text and the view waits.
    expect(latest?.settings.stop).toBe(700);
    expect((to as HTMLInputElement).value).toBe("800");
    await user.keyboard("{Enter}");
    expect(latest?.settings.stop).toBe(800);
  });

  it("puts the last good value back when an unusable one is left", async () => {
    const user = userEvent.setup();
    render(<Harness />);
    const from = screen.getByLabelText("From (nm)");
    await user.clear(from);
    await user.type(from, "900");
    expect(from.getAttribute("aria-invalid")).toBe("true");
    await user.tab();
    expect(latest?.settings.start).toBe(400);
    expect((from as HTMLInputElement).value).toBe("400");
  });

  it("takes an angle as it is typed", async () => {
    const user = userEvent.setup();
    render(<Harness />);
    const angle = screen.getByLabelText("Angle (°)");
    await user.clear(angle);
    await user.type(angle, "45");
    expect(latest?.settings.angleDeg).toBe(45);
  });
});

describe("colour requirements beside the chart", () => {
  const mask: SpecMask = {
    bands: [
      {
        id: "ar",
        start: 450,
        stop: 650,
        quantity: "R",
        polarization: "u",
        angleDeg: 0,
        requirement: "avgMax",
        value: 3,
      },
    ],
    colour: [
      {
        id: "tint",
        label: "Reflected tint",
        quantity: "R",
        illuminant: "D65",
        observer: "2",
        angleDeg: 0,
        polarization: "u",
        limit: { type: "box-ab", a: [-1, 1], b: [-1, 1] },
      },
      {
        id: "white",
        quantity: "T",
        illuminant: "D65",
        observer: "2",
        angleDeg: 0,
        polarization: "u",
        limit: { type: "box-xy", x: [0.3, 0.33], y: [0.31, 0.34] },
      },
    ],
  };

  function ColourHarness() {
    const [view, setView] = useState<ChartView>({
      settings: { start: 400, stop: 700, points: 200, angleDeg: 0, coneHalfAngleDeg: 0, polarization: "u" },
      quantities: ["R"],
      scale: "percent",
    });
    return <SpectrumPanel design={design} mask={mask} view={view} onViewChange={setView} />;
  }

  it("shows each colour verdict with its swatch, coordinates and pass/fail from the optics evaluation", () => {
    render(<ColourHarness />);
    const nominal = evaluateSpec(design, mask);
    const tint = nominal.bands[1]!;
    const white = nominal.bands[2]!;
    // the two-layer AR reflects a tinted residual outside a ±1 a*/b* box; its transmission stays near white
    expect(tint.pass).toBe(false);
    expect(white.pass).toBe(true);
    const tintItem = document.querySelector('[data-colour-requirement="tint"]') as HTMLElement;
    expect(tintItem).toHaveTextContent("fail");
    expect(tintItem).toHaveTextContent(
      `L* ${tint.colour!.L.toFixed(2)}, a* ${tint.colour!.a.toFixed(2)}, b* ${tint.colour!.b.toFixed(2)}`,
    );
    expect(tintItem).toHaveTextContent("reflected, D65, CIE 1931 2°, 0°, unpolarized");
    expect(
      screen.getByRole("img", {
        name: `Swatch of Reflected tint: ${tint.colour!.swatch} (hue at full brightness)`,
      }),
    ).toBeInTheDocument();
    const whiteItem = document.querySelector('[data-colour-requirement="white"]') as HTMLElement;
    expect(whiteItem).toHaveTextContent("pass");
    expect(whiteItem).toHaveTextContent(`x ${white.colour!.x.toFixed(4)}, y ${white.colour!.y.toFixed(4)}`);
    expect(screen.getByTestId("nominal-verdict")).toHaveTextContent("Nominal design misses 1 requirement(s)");
  });
});
