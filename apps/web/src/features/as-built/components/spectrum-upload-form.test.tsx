import { afterEach, describe, expect, it, vi } from "vitest";
import { render, screen, within } from "@testing-library/react";
import userEvent from "@testing-library/user-event";
import { QueryClientProvider } from "@tanstack/react-query";
import type { MeasuredSpectrum, SpectraPreview } from "@stackproof/contracts";
import { SpectrumUploadForm } from "./spectrum-upload-form.tsx";
import { createQueryClient } from "../../../lib/query-client.ts";
import { stubApi, type StubAnswer } from "../../../../test/stub-api.ts";

const fractions: SpectraPreview = {
  fileName: "k-02.csv",
  delimiter: ";",
  decimalComma: true,
  detectedScale: "fraction",
  reversed: false,
  rows: 3,
  wavelengthRange: [500, 600],
  columns: ["T"],
};
const stored: MeasuredSpectrum = {
  id: "m1",
  revisionId: "r1",
  label: "k-02",
  quantity: "T",
  angleDeg: 0,
  polarization: "u",
  wavelengths: [500, 550, 600],
  values: [97.5, 98.25, 96],
  createdAt: "2026-12-02T10:00:00.000Z",
};

function setup(preview: StubAnswer, upload: StubAnswer) {
  const stub = stubApi({
    "POST /api/v1/lots/preview": preview,
    "POST /api/v1/revisions/r1/measurements": upload,
  });
  const onUploaded = vi.fn();
  render(
    <QueryClientProvider client={createQueryClient()}>
      <SpectrumUploadForm revisionId="r1" onUploaded={onUploaded} />
    </QueryClientProvider>,
  );
  return { ...stub, onUploaded };
}
const file = () =>
  new File(["Wavelength (nm);T\n500;0,975\n550;0,9825\n600;0,96\n"], "k-02.csv", { type: "text/csv" });

afterEach(() => vi.unstubAllGlobals());

describe("SpectrumUploadForm", () => {
  it("shows how the file was read, preselects the detected scale and sends the confirmed choice", async () => {
    const { calls, onUploaded } = setup(fractions, { status: 201, body: stored });
    const user = userEvent.setup();
    const form = screen.getByRole("form", { name: "Upload a measured spectrum" });
    await user.upload(within(form).getByLabelText(/CSV file/), file());
    await within(form).findByText("How the file was read — confirm");
    expect(within(form).getByText(/separator “;”, decimal comma/)).toBeInTheDocument();
    expect(within(form).getByRole("radio", { name: "fractions" })).toBeChecked();
    // the user may overrule the detection: a dark part measured in percent
    await user.click(within(form).getByRole("radio", { name: "percent" }));
    await user.click(within(form).getByRole("button", { name: "Upload measurement" }));
    await vi.waitFor(() => expect(onUploaded).toHaveBeenCalledWith(stored));
    const sent = calls.find((c) => c.path === "/api/v1/revisions/r1/measurements")!.body as FormData;
    expect(sent.get("scale")).toBe("percent");
    expect(sent.get("quantity")).toBeNull();
    expect(sent.get("label")).toBe("k-02");
  });

  it("does not upload a file with several spectrum columns and says why", async () => {
    const { calls } = setup({ ...fractions, columns: ["P1", "P2"] }, { status: 201, body: stored });
    const user = userEvent.setup();
    const form = screen.getByRole("form", { name: "Upload a measured spectrum" });
    await user.upload(within(form).getByLabelText(/CSV file/), file());
    await within(form).findByText("How the file was read — confirm");
    await user.click(within(form).getByRole("button", { name: "Upload measurement" }));
    expect(
      await within(form).findByText(
        /has 2 spectrum columns; upload one spectrum here, or several parts as a lot/,
      ),
    ).toBeInTheDocument();
    expect(calls.some((c) => c.path === "/api/v1/revisions/r1/measurements")).toBe(false);
  });

  it("lists the server's refusal row by row and says that nothing was stored", async () => {
    setup(
      {
        status: 422,
        body: {
          error: {
            code: "invalid_csv",
            message: 'The spectra file has errors (row 3, column T: expected a number, got "n/a").',
            details: [{ row: 3, column: "T", message: 'expected a number, got "n/a"' }],
          },
        },
      },
      { status: 201, body: stored },
    );
    const user = userEvent.setup();
    const form = screen.getByRole("form", { name: "Upload a measured spectrum" });
    await user.upload(within(form).getByLabelText(/CSV file/), file());
    const problems = await within(form).findByRole("list", { name: "Problems in the file" });
    expect(problems).toHaveTextContent('line 3, column T: expected a number, got "n/a"');
    expect(within(form).getByText(/Nothing was stored/)).toBeInTheDocument();
  });
});
