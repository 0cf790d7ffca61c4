import { describe, expect, it } from "vitest";
import { render, screen, within } from "@testing-library/react";
import userEvent from "@testing-library/user-event";
import { MemoryRouter } from "react-router";
import { OverviewTable } from "./overview-table.tsx";
import type { OverviewRow } from "../api/get-overview.ts";

function row(
  id: string,
  name: string,
  status: OverviewRow["latestRevision"]["status"],
  yieldValue: number | null,
  createdAt: string,
  author = "Ingrid Solberg",
): OverviewRow {
  return {
    design: { id, name },
    program: { id: "p1", name: "Fjord lidar window", targetYield: 0.95, protective: false },
    latestRevision: { id: `${id}-r`, number: 2, status, authorName: author, createdAt },
    latestVerifiedYield:
      yieldValue === null ? null : { yield: yieldValue, low: yieldValue - 0.02, high: yieldValue + 0.015, runId: `${id}-run` },
    openBlockingThreads: 0,
    openThreads: 0,
  };
}

const rows = [
  row("d1", "Bandpass 905", "in_review", 0.964, "2026-11-03T10:00:00Z"),
  row("d2", "Hot mirror 750", "draft", 0.81, "2026-11-05T10:00:00Z", "Per Aasen"),
  row("d3", "AR visible", "released", null, "2026-10-01T10:00:00Z"),
];

function designOrder() {
  const body = screen.getAllByRole("rowgroup")[1]!;
  return within(body)
    .getAllByRole("row")
    .map((r) => within(r).getAllByRole("link")[0]!.textContent);
}

function renderTable() {
  render(
    <MemoryRouter>
      <OverviewTable rows={rows} />
    </MemoryRouter>,
  );
}

describe("OverviewTable", () => {
  it("starts newest first and links each design", () => {
    renderTable();
    expect(designOrder()).toEqual(["Hot mirror 750", "Bandpass 905", "AR visible"]);
    expect(screen.getByRole("link", { name: "Bandpass 905" })).toHaveAttribute("href", "/designs/d1");
  });

  it("shows yield against target with the verdict", () => {
    renderTable();
    const bandpass = screen.getByRole("link", { name: "Bandpass 905" }).closest("tr");
    expect(bandpass).toHaveTextContent(/96\.4\s%\s\(94\.4–97\.9\)\s*\/ target 95 %/);
    expect(screen.getAllByText("/ target 95 %").length).toBeGreaterThan(0);
    expect(screen.getByText("meets the target")).toBeInTheDocument();
    expect(screen.getByText("below the target")).toBeInTheDocument();
    expect(screen.getByText("No verified run")).toBeInTheDocument();
  });

  it("sorts by a column when its header is pressed", async () => {
    renderTable();
    const user = userEvent.setup();
    await user.click(screen.getByRole("button", { name: /Design/ }));
    expect(designOrder()).toEqual(["AR visible", "Bandpass 905", "Hot mirror 750"]);
    expect(screen.getByRole("columnheader", { name: /Design/ })).toHaveAttribute("aria-sort", "ascending");
    await user.click(screen.getByRole("button", { name: /Verified yield/ }));
    // TanStack sorts numbers descending first.
    expect(designOrder()).toEqual(["Bandpass 905", "Hot mirror 750", "AR visible"]);
  });

  it("filters by text and by state", async () => {
    renderTable();
    const user = userEvent.setup();
    await user.type(screen.getByLabelText("Filter designs"), "aasen");
    expect(designOrder()).toEqual(["Hot mirror 750"]);
    expect(screen.getByText("1 of 3 designs")).toBeInTheDocument();
    await user.clear(screen.getByLabelText("Filter designs"));
    await user.selectOptions(screen.getByLabelText("State"), "released");
    expect(designOrder()).toEqual(["AR visible"]);
    await user.type(screen.getByLabelText("Filter designs"), "bandpass");
    expect(screen.getByText("No design matches")).toBeInTheDocument();
  });
});
