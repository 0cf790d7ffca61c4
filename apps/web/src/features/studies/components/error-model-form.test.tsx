import { describe, expect, it, vi } from "vitest";
import { render, screen, waitFor } from "@testing-library/react";
import userEvent from "@testing-library/user-event";
import { ErrorModelForm } from "./error-model-form.tsx";
import { studyDefaults } from "../lib/study-form.ts";

const programModel = { thickness: { relativePct: 1, absoluteNm: 0.5, distribution: "normal" as const }, systematicPct: 0.5, indexDriftPct: 0.3 };

describe("error-model form", () => {
  it("starts from the program's error model and submits a valid study", async () => {
    const user = userEvent.setup();
    const onRun = vi.fn();
    render(<ErrorModelForm defaultValues={studyDefaults(programModel, 2000, "halvorsen-1")} onRun={onRun} running={false} materials={["SiO2", "Ta2O5"]} />);
    expect(screen.getByLabelText("Relative (%)")).toHaveValue(1);
    expect(screen.getByLabelText("Trials")).toHaveValue(2000);
    await user.click(screen.getByRole("button", { name: "Run study in the browser" }));
    await waitFor(() => expect(onRun).toHaveBeenCalledTimes(1));
    expect(onRun.mock.calls[0]?.[0]).toEqual({
      errorModel: { thickness: { relativePct: 1, absoluteNm: 0.5, distribution: "normal" }, systematicPct: 0.5, indexDriftPct: 0.3 },
      trials: 2000,
      seed: "halvorsen-1",
    });
  });

  it("refuses values the optics ErrorModelSchema refuses, with a message beside the field", async () => {
    const user = userEvent.setup();
    const onRun = vi.fn();
    render(<ErrorModelForm defaultValues={studyDefaults(programModel, 2000, "s")} onRun={onRun} running={false} materials={[]} />);
    const rel = screen.getByLabelText("Relative (%)");
    await user.clear(rel);
    await user.type(rel, "-2"); // relativePct must be ≥ 0
    const trials = screen.getByLabelText("Trials");
    await user.clear(trials);
    await user.type(trials, "2.5"); // whole trials only
    const seed = screen.getByLabelText("Seed");
    await user.clear(seed);
    const trunc = screen.getByLabelText("Truncate at (σ, optional)");
    await user.type(trunc, "0.1"); // truncateSigma must be ≥ 0.5
    await user.click(screen.getByRole("button", { name: "Run study in the browser" }));
    await waitFor(() => expect(screen.getAllByRole("alert").length).toBeGreaterThanOrEqual(4));
    expect(onRun).not.toHaveBeenCalled();
    expect(rel).toHaveAttribute("aria-invalid", "true");
    expect(screen.getByText("Enter a whole number of trials")).toBeInTheDocument();
    expect(screen.getByText("A seed is needed so anyone can re-run the study")).toBeInTheDocument();

    await user.clear(rel);
    await user.type(rel, "0.8");
    await user.clear(trials);
    await user.type(trials, "500");
    await user.type(seed, "again");
    await user.clear(trunc);
    await user.click(screen.getByRole("button", { name: "Run study in the browser" }));
    await waitFor(() => expect(onRun).toHaveBeenCalledTimes(1));
    expect(onRun.mock.calls[0]?.[0]).toMatchObject({ trials: 500, seed: "again", errorModel: { thickness: { relativePct: 0.8 } } });
  });

  it("shows per-material spreads when the program names materials", async () => {
    const user = userEvent.setup();
    const onRun = vi.fn();
    const model = { ...programModel, systematicPct: { SiO2: 0.4, Ta2O5: 0.7 } };
    render(<ErrorModelForm defaultValues={studyDefaults(model, 100, "s")} onRun={onRun} running={false} materials={["SiO2", "Ta2O5"]} />);
    expect(screen.getByLabelText("Systematic Ta2O5 (%)")).toHaveValue(0.7);
    await user.click(screen.getByRole("button", { name: "Run study in the browser" }));
    await waitFor(() => expect(onRun).toHaveBeenCalledTimes(1));
    expect(onRun.mock.calls[0]?.[0].errorModel.systematicPct).toEqual({ SiO2: 0.4, Ta2O5: 0.7 });
  });
});
