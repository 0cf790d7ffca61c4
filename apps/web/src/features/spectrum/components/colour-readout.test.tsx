import { describe, expect, it } from "vitest";
import { render, screen } from "@testing-library/react";
import userEvent from "@testing-library/user-event";
import { parseDesign } from "@stackproof/optics";
import { ColourReadout } from "./colour-readout.tsx";

// bare glass n = 1.52 reflects the illuminant's own colour (a* = b* = 0) and 4.26 % of it (Fresnel, Hecht)
const glass = parseDesign({
  format: "stackproof.design/v1",
  name: "bare glass",
  referenceWavelength: 550,
  layers: [],
  substrate: { material: "g", thicknessMm: 1, backside: false },
  materials: [
    { id: "g", name: "glass", role: "substrate", source: "test", model: { kind: "constant", n: 1.52 } },
  ],
});

describe("colour readout", () => {
  it("shows the illuminant's chromaticity for bare glass and follows the illuminant choice", async () => {
    const user = userEvent.setup();
    render(<ColourReadout design={glass} angleDeg={0} polarization="u" />);
    const reflected = () => document.querySelector('[data-colour="Reflected"]')!.textContent ?? "";
    expect(reflected()).toMatch(/4\.26/);
    expect(reflected()).toMatch(/0\.3127, 0\.3290/); // D65 white point, CIE 15:2004
    expect(reflected()).toMatch(/0\.00, 0\.00$/);
    await user.selectOptions(screen.getByLabelText("Illuminant"), "A");
    expect(reflected()).toMatch(/0\.4476, 0\.4074/); // illuminant A white point, CIE 15:2004
  });
});
