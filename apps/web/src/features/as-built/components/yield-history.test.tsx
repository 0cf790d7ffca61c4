import { afterEach, describe, expect, it, vi } from "vitest";
import { render, screen, within } from "@testing-library/react";
import userEvent from "@testing-library/user-event";
import { QueryClientProvider } from "@tanstack/react-query";
import type { CalibrationView } from "@stackproof/contracts";
import type { ErrorModel } from "@stackproof/optics";
import { YieldHistory } from "./yield-history.tsx";
import { createQueryClient } from "../../../lib/query-client.ts";
import { stubApi } from "../../../../test/stub-api.ts";

const current: ErrorModel = {
  thickness: { relativePct: 0, absoluteNm: 0, distribution: "normal" },
  process: { control: { MgF2: { method: "crystal", toolingPct: 0, noisePct: 0.2, terminationNm: 0.1 } } },
};
const processProposed: ErrorModel = {
  ...current,
  process: { control: { MgF2: { method: "crystal", toolingPct: 1.19, noisePct: 0.2, terminationNm: 0.1 } } },
};
const view: CalibrationView = {
  current,
  calibration: {
    runs: 4,
    parts: 4,
    random: null,
    systematic: { MgF2: { sigmaPct: 1.19, lowPct: 0.67, highPct: 4.4, dof: 3, meanPct: -0.13 } },
    indexDrift: {},
    proposed: {
      thickness: { relativePct: 0, absoluteNm: 0, distribution: "normal" },
      systematicPct: { MgF2: 1.19 },
    },
    notes: [],
    process: {
      runs: 4,
      parameters: [
        {
          material: "MgF2",
          method: "crystal",
          parameter: "toolingPct",
          value: 1.19,
          low: 0.67,
          high: 4.44,
          current: 0,
          interval: "chi-square",
          dof: 3,
          runs: 4,
          consistent: false,
        },
      ],
      layers: [],
      proposed: processProposed,
      notes: [
        "all materials: too few determinable layers per run to estimate the crystal noise; the program's 0.2 % is kept.",
      ],
    },
  },
  history: [],
  adoptWith: "PATCH /api/v1/programs/p1 with …",
};

function setup(canAdopt: boolean) {
  const stub = stubApi({
    "GET /api/v1/programs/p1/calibration": view,
    "PATCH /api/v1/programs/p1": { status: 200, body: {} },
  });
  render(
    <QueryClientProvider client={createQueryClient()}>
      <YieldHistory programId="p1" canAdopt={canAdopt} />
    </QueryClientProvider>,
  );
  return stub;
}

afterEach(() => vi.unstubAllGlobals());

describe("YieldHistory calibration", () => {
  it("shows the calibrated process parameters next to the model's values, with the interval's kind", async () => {
    setup(false);
    const table = await screen.findByRole("table", { name: "Calibrated process parameters" });
    const row = within(table).getByText("tooling σ (per run)").closest("tr")!;
    expect(row).toHaveTextContent("MgF2");
    expect(row).toHaveTextContent("1.19 % (0.67 %–4.44 %)");
    expect(row).toHaveTextContent("0.00 % — outside");
    expect(row).toHaveTextContent("chi-square, ν = 3");
    expect(
      screen.getByText(/too few determinable layers per run to estimate the crystal noise/),
    ).toBeInTheDocument();
    expect(screen.queryByRole("button", { name: /Adopt/ })).not.toBeInTheDocument();
  });

  it("lets an approver adopt the calibrated process model through the program update", async () => {
    const { calls } = setup(true);
    const user = userEvent.setup();
    await user.click(await screen.findByRole("button", { name: "Adopt the calibrated process model" }));
    await vi.waitFor(() => expect(calls.some((c) => c.method === "PATCH")).toBe(true));
    expect(calls.find((c) => c.method === "PATCH")!.body).toEqual({ errorModel: processProposed });
    // the independent-error proposal is still offered, saying what it drops
    expect(
      screen.getByRole("button", { name: "Adopt independent errors instead (drops the process model)" }),
    ).toBeInTheDocument();
  });
});
