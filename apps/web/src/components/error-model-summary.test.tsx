import { describe, expect, it } from "vitest";
import { render, screen } from "@testing-library/react";
import type { ErrorModel } from "@stackproof/optics";
import { ErrorModelSummary } from "./error-model-summary.tsx";

const thickness = { relativePct: 0.5, absoluteNm: 0.3, distribution: "normal" as const };

describe("ErrorModelSummary", () => {
  it("states a process model in plain words and marks the thickness figures it replaces as unused", () => {
    // The optics package's error-model rule: with a process, the process produces every layer's thickness
    // (packages/optics/src/studies/error-model.ts).
    const model: ErrorModel = {
      thickness,
      systematicPct: 0.5,
      process: {
        control: { method: "optical", noisePct: 0.05 },
        plan: [
          { wavelength: 905, criterion: "turning" },
          { wavelength: 905, criterion: "turning" },
        ],
      },
    } as ErrorModel;
    render(<ErrorModelSummary model={model} />);
    expect(screen.getByTestId("error-model-words")).toHaveTextContent(
      /optical monitoring \(T\), turning points at 905 nm on the part, 0\.05 % photometric noise/,
    );
    expect(
      screen.getByText(/0\.5 % \+ 0\.3 nm, normal; not used: the process sets every thickness/),
    ).toBeInTheDocument();
  });

  it("states independent errors as such, with no 'not used' mark", () => {
    render(<ErrorModelSummary model={{ thickness } as ErrorModel} />);
    expect(screen.getByTestId("error-model-words")).toHaveTextContent(
      "independent thickness errors 0.5 % + 0.3 nm per layer (normal)",
    );
    expect(screen.queryByText(/not used/)).not.toBeInTheDocument();
  });
});
