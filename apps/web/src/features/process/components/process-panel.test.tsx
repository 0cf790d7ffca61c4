import { describe, expect, it } from "vitest";
import { render, screen, within } from "@testing-library/react";
import userEvent from "@testing-library/user-event";
import { designFromQwots, parseErrorModel } from "@stackproof/optics";
import { ProcessPanel } from "./process-panel.tsx";
import { defaultCandidates, defaultPlan, toProcess } from "../lib/process-form.ts";

// Narrowband all-quarter-wave filter at 905 nm (common practice, no source), library materials.
const design = designFromQwots({
  name: "NB 905",
  referenceWavelength: 905,
  layers: [["Ta2O5", 1], ["SiO2", 1], ["Ta2O5", 1], ["SiO2", 2], ["Ta2O5", 1], ["SiO2", 1], ["Ta2O5", 1]].map(([material, qwot]) => ({ material: material as string, qwot: qwot as number })),
  substrate: { material: "fused-silica", thicknessMm: 1, backside: false },
});
const mask = { bands: [{ id: "pass", start: 903, stop: 907, quantity: "T" as const, polarization: "u" as const, angleDeg: 0, requirement: "avgMin" as const, value: 50 }] };
const errorModel = { thickness: { relativePct: 1, absoluteNm: 0.3, distribution: "normal" as const }, indexDriftPct: 0.2 };

describe("process panel", () => {
  it("builds valid error models from its default candidates; the default plan uses turning points at λ0 for the quarter-wave stack", () => {
    const plan = defaultPlan(design);
    expect(plan.steps.map((s) => s.criterion)).toEqual(design.layers.map(() => "turning"));
    expect(plan.steps.every((s) => s.wavelength === 905 && s.on === "part")).toBe(true);
    const processes = defaultCandidates(design).map((c) => toProcess(c, plan, design));
    expect(processes[0]).toBeNull();
    for (const p of processes.slice(1)) expect(() => parseErrorModel({ ...errorModel, process: p })).not.toThrow();
    const onPlate = toProcess({ ...defaultCandidates(design)[1]!, plate: { a: -2e-6, minMm: 150, maxMm: 20 } }, plan, design);
    expect(parseErrorModel({ ...errorModel, process: onPlate }).process?.uniformity).toEqual({ a: -2e-6, radiusMm: { min: 20, max: 150 }, referenceRadiusMm: 0 });
  });

  it("shows the candidates, their plain-words description and the monitoring plan; switching a material's control changes its fields", async () => {
    const user = userEvent.setup();
    render(<ProcessPanel design={design} mask={mask} errorModel={errorModel} defaults={{ trials: 2000, seed: "nb-905" }} targetYield={0.9} />);
    const cards = screen.getAllByTestId("process-candidate");
    expect(cards).toHaveLength(3);
    expect(within(cards[2]!).getByTestId("process-description")).toHaveTextContent("optical monitoring (T), turning points at 905 nm on the part, 0.3 % photometric noise");
    expect(within(screen.getByTestId("monitoring-plan")).getAllByRole("row")).toHaveLength(design.layers.length + 1);
    await user.selectOptions(within(cards[1]!).getByLabelText("SiO2: control"), "time");
    expect(within(cards[1]!).getByLabelText("Rate drift (%)")).toBeInTheDocument();
    expect(within(cards[1]!).getByTestId("process-description")).toHaveTextContent("SiO2: time control");
  });
});
