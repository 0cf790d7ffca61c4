import { afterEach, describe, expect, it, vi } from "vitest";
import { render, screen, within } from "@testing-library/react";
import userEvent from "@testing-library/user-event";
import { QueryClientProvider } from "@tanstack/react-query";
import { MemoryRouter } from "react-router";
import { ProgramForm } from "./program-form.tsx";
import { createQueryClient } from "../../../lib/query-client.ts";
import { stubApi } from "../../../../test/stub-api.ts";
import type { Program } from "../api/get-program.ts";

// Fictional demo program of Halvorsen Thinfilm Works.
const program: Program = {
  id: "p1",
  name: "Harbour lidar window",
  customer: "Halvorsen Marine Sensing",
  description: "",
  application: "lidar sensor window",
  protective: false,
  targetYield: 0.95,
  minEvidenceTrials: 2000,
  confidence: 0.95,
  version: 1,
  specMask: {
    bands: [
      {
        id: "nir-ar",
        label: "NIR AR",
        start: 880,
        stop: 940,
        quantity: "R",
        polarization: "u",
        angleDeg: 0,
        requirement: "max",
        value: 0.5,
      },
    ],
  },
  errorModel: {
    thickness: { relativePct: 0.8, absoluteNm: 0.3, distribution: "normal", truncateSigma: 3 },
    systematicPct: { Ta2O5: 0.5, SiO2: 0.4 },
    indexNoisePct: 0.1,
  },
  studyDefaults: { trials: 2000, seed: "HTW-2026-017" },
  createdAt: "2026-11-02T09:00:00.000Z",
};

function renderForm(props: { program?: Program } = {}) {
  const onSaved = vi.fn();
  render(
    <QueryClientProvider client={createQueryClient()}>
      <MemoryRouter>
        <ProgramForm program={props.program} onSaved={onSaved} />
      </MemoryRouter>
    </QueryClientProvider>,
  );
  return onSaved;
}

afterEach(() => vi.unstubAllGlobals());

describe("ProgramForm", () => {
  it("shows its own checks at the fields and sends nothing", async () => {
    const { calls } = stubApi({});
    renderForm();
    const user = userEvent.setup();
    await user.clear(screen.getByLabelText(/Target yield/));
    await user.type(screen.getByLabelText(/Target yield/), "120");
    await user.type(screen.getByLabelText("Band 1 start (nm)"), "700");
    await user.type(screen.getByLabelText("Band 1 stop (nm)"), "400");
    await user.click(screen.getByRole("button", { name: "Create program" }));

    expect(await screen.findByText("Give the program a name.")).toBeInTheDocument();
    expect(screen.getByLabelText(/Target yield/)).toHaveAccessibleDescription(
      /Enter a percentage from 0 to 100\./,
    );
    // The optics package's band schema: stop must not be below start.
    expect(screen.getByLabelText("Band 1 stop (nm)")).toHaveAccessibleDescription(
      "stop must be ≥ start (700 nm)",
    );
    expect(screen.getByLabelText("Band 1 value")).toHaveAccessibleDescription("Enter a number.");
    expect(calls).toHaveLength(0);
  });

  it("sends the target yield as a fraction and the mask and error model as the optics schemas read them", async () => {
    const { calls } = stubApi({
      "POST /api/v1/programs": { status: 201, body: { ...program, id: "p-new" } },
    });
    const onSaved = renderForm();
    const user = userEvent.setup();
    await user.type(screen.getByLabelText(/^Name/), "Cabin camera cover");
    await user.clear(screen.getByLabelText(/Target yield/));
    await user.type(screen.getByLabelText(/Target yield/), "97.5");
    await user.clear(screen.getByLabelText(/relative σ/));
    await user.type(screen.getByLabelText(/relative σ/), "0.8");
    await user.type(screen.getByLabelText(/Systematic thickness/), "TiO2 = 0.5, SiO2 = 0.3");
    await user.type(screen.getByLabelText("Band 1 start (nm)"), "420");
    await user.type(screen.getByLabelText("Band 1 stop (nm)"), "680");
    await user.type(screen.getByLabelText("Band 1 value"), "0.5");
    await user.type(screen.getByLabelText("Band 1 tolerance"), "0.05");
    await user.click(screen.getByRole("button", { name: "Create program" }));

    await vi.waitFor(() => expect(onSaved).toHaveBeenCalled());
    expect(calls).toHaveLength(1);
    const body = calls[0]?.body as Record<string, unknown>;
    expect(body.targetYield).toBe(0.975);
    expect(body.studyDefaults).toEqual({ trials: 2000, seed: "stackproof" });
    expect(body.errorModel).toEqual({
      thickness: { relativePct: 0.8, absoluteNm: 0, distribution: "normal" },
      systematicPct: { TiO2: 0.5, SiO2: 0.3 },
    });
    expect(body.specMask).toEqual({
      protective: false,
      bands: [
        {
          id: "band-1",
          start: 420,
          stop: 680,
          quantity: "R",
          polarization: "u",
          angleDeg: 0,
          requirement: "max",
          value: 0.5,
          tolerance: 0.05,
        },
      ],
    });
  });

  it("adds and removes bands; the last band stays", async () => {
    const { calls } = stubApi({ "PATCH /api/v1/programs/p1": program });
    const onSaved = renderForm({ program });
    const user = userEvent.setup();
    const list = screen.getByRole("list", { name: "Spec bands" });
    expect(within(list).getAllByRole("listitem")).toHaveLength(1);
    expect(screen.getByRole("button", { name: "Remove band 1" })).toBeDisabled();

    await user.click(screen.getByRole("button", { name: "Add band" }));
    expect(within(list).getAllByRole("listitem")).toHaveLength(2);
    await user.type(screen.getByLabelText("Band 2 start (nm)"), "1000");
    await user.type(screen.getByLabelText("Band 2 stop (nm)"), "1100");
    await user.selectOptions(screen.getByLabelText("Band 2 quantity"), "OD");
    await user.selectOptions(screen.getByLabelText("Band 2 requirement"), "min");
    await user.type(screen.getByLabelText("Band 2 value"), "4");
    // Remove the first band: the new one remains, now as band 1.
    await user.click(screen.getByRole("button", { name: "Remove band 1" }));
    expect(within(list).getAllByRole("listitem")).toHaveLength(1);
    expect(screen.getByLabelText("Band 1 id")).toHaveValue("band-2");

    await user.click(screen.getByRole("button", { name: "Save program" }));
    await vi.waitFor(() => expect(onSaved).toHaveBeenCalled());
    const body = calls[0]?.body as {
      targetYield: number;
      specMask: { bands: unknown[] };
      errorModel: unknown;
    };
    expect(calls[0]?.method).toBe("PATCH");
    expect(body.targetYield).toBe(0.95);
    expect(body.errorModel).toEqual(program.errorModel);
    expect(body.specMask.bands).toEqual([
      {
        id: "band-2",
        start: 1000,
        stop: 1100,
        quantity: "OD",
        polarization: "u",
        angleDeg: 0,
        requirement: "min",
        value: 4,
      },
    ]);
  });

  it("creates an angle range with 's and p each', a cone about a chief ray, and a colour requirement", async () => {
    const { calls } = stubApi({ "PATCH /api/v1/programs/p1": program });
    const onSaved = renderForm({ program });
    const user = userEvent.setup();
    // band 1: every angle 0–30° in 2° steps, s and p each
    await user.selectOptions(screen.getByLabelText("Band 1 polarization"), "sp");
    await user.selectOptions(screen.getByLabelText("Band 1 incidence"), "range");
    expect(screen.queryByLabelText("Band 1 angle (°)")).not.toBeInTheDocument();
    await user.type(screen.getByLabelText("Band 1 angles from (°)"), "0");
    await user.type(screen.getByLabelText("Band 1 angles to (°)"), "95");
    await user.type(screen.getByLabelText("Band 1 angle step (°)"), "2");
    // band 2: an f/2 cone about a 5° chief ray, averaged transmittance
    await user.click(screen.getByRole("button", { name: "Add band" }));
    await user.type(screen.getByLabelText("Band 2 start (nm)"), "1062");
    await user.type(screen.getByLabelText("Band 2 stop (nm)"), "1066");
    await user.selectOptions(screen.getByLabelText("Band 2 quantity"), "T");
    await user.selectOptions(screen.getByLabelText("Band 2 requirement"), "avgMin");
    await user.type(screen.getByLabelText("Band 2 value"), "90");
    await user.selectOptions(screen.getByLabelText("Band 2 incidence"), "cone");
    await user.clear(screen.getByLabelText("Band 2 chief ray (°)"));
    await user.type(screen.getByLabelText("Band 2 chief ray (°)"), "5");
    await user.type(screen.getByLabelText("Band 2 cone f-number"), "2");
    // a reflected-colour box under illuminant A, 10° observer
    await user.click(screen.getByRole("button", { name: "Add colour requirement" }));
    await user.selectOptions(screen.getByLabelText("Colour 1 illuminant"), "A");
    await user.selectOptions(screen.getByLabelText("Colour 1 observer"), "10");
    await user.type(screen.getByLabelText("Colour 1 a* from"), "-2");
    await user.type(screen.getByLabelText("Colour 1 a* to"), "2");
    await user.type(screen.getByLabelText("Colour 1 b* from"), "3");
    await user.type(screen.getByLabelText("Colour 1 b* to"), "1");

    await user.click(screen.getByRole("button", { name: "Save program" }));
    // the form's own checks, at the fields; nothing is sent
    expect(await screen.findByLabelText("Band 1 angles to (°)")).toHaveAccessibleDescription(
      "Enter an angle from 0 to below 90°.",
    );
    expect(screen.getByLabelText("Colour 1 b* to")).toHaveAccessibleDescription(
      "The upper end must not be below the lower end.",
    );
    expect(calls).toHaveLength(0);

    await user.clear(screen.getByLabelText("Band 1 angles to (°)"));
    await user.type(screen.getByLabelText("Band 1 angles to (°)"), "30");
    await user.clear(screen.getByLabelText("Colour 1 b* from"));
    await user.type(screen.getByLabelText("Colour 1 b* from"), "-3");
    await user.click(screen.getByRole("button", { name: "Save program" }));
    await vi.waitFor(() => expect(onSaved).toHaveBeenCalled());
    const body = calls[0]?.body as { specMask: { bands: unknown[]; colour: unknown[] } };
    expect(body.specMask.bands).toEqual([
      {
        id: "nir-ar",
        label: "NIR AR",
        start: 880,
        stop: 940,
        quantity: "R",
        polarization: "sp",
        angleDeg: 0,
        angleRange: { fromDeg: 0, toDeg: 30, stepDeg: 2 },
        requirement: "max",
        value: 0.5,
      },
      {
        id: "band-2",
        start: 1062,
        stop: 1066,
        quantity: "T",
        polarization: "u",
        angleDeg: 5,
        cone: { fNumber: 2 },
        requirement: "avgMin",
        value: 90,
      },
    ]);
    expect(body.specMask.colour).toEqual([
      {
        id: "colour-1",
        quantity: "R",
        illuminant: "A",
        observer: "10",
        angleDeg: 0,
        polarization: "u",
        limit: { type: "box-ab", a: [-2, 2], b: [-3, 1] },
      },
    ]);
  });

  it("shows the caution when the program is marked protective", async () => {
    stubApi({});
    renderForm({ program });
    const user = userEvent.setup();
    expect(screen.queryByRole("note", { name: "Protective filter caution" })).not.toBeInTheDocument();
    await user.click(screen.getByLabelText(/Protective filter/));
    expect(screen.getByRole("note", { name: "Protective filter caution" })).toHaveTextContent(
      "not a certification",
    );
  });

  it("puts the server's validation messages at the fields", async () => {
    stubApi({
      "PATCH /api/v1/programs/p1": {
        status: 400,
        body: {
          error: {
            code: "validation_failed",
            message: "body.specMask.bands.0.angleDeg: Too big: expected number to be <90",
            details: [
              { path: "specMask.bands.0.angleDeg", message: "Too big: expected number to be <90" },
              { path: "studyDefaults.seed", message: "seed already used" },
            ],
          },
        },
      },
    });
    const onSaved = renderForm({ program });
    const user = userEvent.setup();
    await user.click(screen.getByRole("button", { name: "Save program" }));
    expect(await screen.findByRole("alert")).toHaveTextContent("The program was not saved");
    expect(screen.getByLabelText("Band 1 angle (°)")).toHaveAccessibleDescription(
      "Too big: expected number to be <90",
    );
    expect(screen.getByLabelText(/Default seed/)).toHaveAccessibleDescription(/seed already used/);
    expect(onSaved).not.toHaveBeenCalled();
  });

  it("says plainly when the server refuses the person's roles", async () => {
    stubApi({
      "POST /api/v1/programs": {
        status: 403,
        body: { error: { code: "forbidden", message: "This needs one of the roles: admin, approver." } },
      },
    });
    renderForm({ program: undefined });
    const user = userEvent.setup();
    await user.type(screen.getByLabelText(/^Name/), "Cabin camera cover");
    await user.type(screen.getByLabelText("Band 1 start (nm)"), "420");
    await user.type(screen.getByLabelText("Band 1 stop (nm)"), "680");
    await user.type(screen.getByLabelText("Band 1 value"), "0.5");
    await user.click(screen.getByRole("button", { name: "Create program" }));
    expect(await screen.findByRole("alert")).toHaveTextContent(
      "Only program managers and administrators can create programs.",
    );
  });
});
