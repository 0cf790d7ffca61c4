import { describe, expect, it, vi, afterEach } from "vitest";
import { render, screen } from "@testing-library/react";
import { createMemoryRouter, RouterProvider } from "react-router";
import { QueryClientProvider } from "@tanstack/react-query";
import { AppShell } from "./app-shell.tsx";
import { createQueryClient } from "../lib/query-client.ts";
import { requireSession } from "../lib/session.ts";
import { demoSession, healthyServer, stubApi } from "../../test/stub-api.ts";

function renderShell() {
  const client = createQueryClient();
  const router = createMemoryRouter([
    { path: "/sign-in", element: <p>sign-in page</p> },
    {
      element: <AppShell />,
      loader: ({ request }) => requireSession(request, client),
      children: [{ index: true, element: <p>inside</p> }],
    },
  ]);
  return render(
    <QueryClientProvider client={client}>
      <RouterProvider router={router} />
    </QueryClientProvider>,
  );
}

afterEach(() => vi.unstubAllGlobals());

describe("AppShell", () => {
  it("shows the name, the navigation, who is signed in and the server's health", async () => {
    stubApi({
      "GET /api/health": healthyServer,
      "GET /api/v1/auth/me": demoSession,
      "GET /api/v1/outbox": { status: 404 },
    });
    renderShell();
    expect(await screen.findByText("inside")).toBeInTheDocument();
    expect(screen.getByText("Stackproof")).toBeInTheDocument();
    expect(screen.getByRole("navigation", { name: "Main" })).toBeInTheDocument();
    expect(screen.getByText("Ingrid Solberg")).toBeInTheDocument();
    expect(screen.getByRole("button", { name: "Sign out" })).toBeInTheDocument();
    expect(await screen.findByText("Server healthy")).toBeInTheDocument();
  });

  it("says so when the server cannot be reached", async () => {
    stubApi({ "GET /api/health": { status: 503, body: {} }, "GET /api/v1/auth/me": demoSession });
    renderShell();
    expect(await screen.findByText("Server unreachable")).toBeInTheDocument();
  });

  it("sends a signed-out person to sign-in", async () => {
    stubApi({
      "GET /api/v1/auth/me": {
        status: 401,
        body: { error: { code: "unauthenticated", message: "Sign in first." } },
      },
    });
    renderShell();
    expect(await screen.findByText("sign-in page")).toBeInTheDocument();
  });

  it("shows People and Audit log to an admin, only the basics to a designer", async () => {
    stubApi({
      "GET /api/health": healthyServer,
      "GET /api/v1/auth/me": { ...demoSession, roles: ["admin"] },
      "GET /api/v1/outbox": { items: [], nextCursor: null },
    });
    renderShell();
    const nav = await screen.findByRole("navigation", { name: "Main" });
    expect(nav).toHaveTextContent("People");
    expect(nav).toHaveTextContent("Audit log");
    expect(await screen.findByRole("link", { name: "Outbox" })).toBeInTheDocument();
  });
});
