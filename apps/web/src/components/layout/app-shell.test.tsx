import { describe, expect, it, vi, afterEach } from "vitest";
import { render, screen } from "@testing-library/react";
import { createMemoryRouter, RouterProvider } from "react-router";
import { QueryClientProvider } from "@tanstack/react-query";
import { AppShell } from "./app-shell.tsx";
import { createQueryClient } from "../../lib/query-client.ts";

function renderShell() {
  const router = createMemoryRouter([{ element: <AppShell />, children: [{ index: true, element: <p>inside</p> }] }]);
  return render(
    <QueryClientProvider client={createQueryClient()}>
      <RouterProvider router={router} />
    </QueryClientProvider>,
  );
}

afterEach(() => vi.unstubAllGlobals());

describe("AppShell", () => {
  it("shows the name, the navigation and the server's health", async () => {
    vi.stubGlobal(
      "fetch",
      vi.fn(async () =>
        new Response(
          JSON.stringify({ status: "ok", version: "0.1.0", engineVersion: "0.1.0", database: "ok", migrations: { applied: 1, available: 1, upToDate: true } }),
          { status: 200 },
        ),
      ),
    );
    renderShell();
    expect(screen.getByText("Stackproof")).toBeInTheDocument();
    expect(screen.getByRole("navigation", { name: "Main" })).toBeInTheDocument();
    expect(await screen.findByText("Server healthy")).toBeInTheDocument();
    expect(screen.getByText("inside")).toBeInTheDocument();
  });

  it("says so when the server cannot be reached", async () => {
    vi.stubGlobal("fetch", vi.fn(async () => new Response("{}", { status: 503 })));
    renderShell();
    expect(await screen.findByText("Server unreachable")).toBeInTheDocument();
  });
});
