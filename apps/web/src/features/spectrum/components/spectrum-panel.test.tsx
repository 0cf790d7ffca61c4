import { describe, expect, it } from "vitest";
import { useState } from "react";
import { render, screen } from "@testing-library/react";
import userEvent from "@testing-library/user-event";
import { designFromQwots } from "@stackproof/optics";
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
