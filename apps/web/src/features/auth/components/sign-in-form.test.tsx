import { afterEach, describe, expect, it, vi } from "vitest";
import { render, screen } from "@testing-library/react";
import userEvent from "@testing-library/user-event";
import { QueryClientProvider } from "@tanstack/react-query";
import { MemoryRouter } from "react-router";
import { SignInForm } from "./sign-in-form.tsx";
import { createQueryClient } from "../../../lib/query-client.ts";
import { demoSession, stubApi } from "../../../../test/stub-api.ts";

function renderForm(onSignedIn = vi.fn()) {
  render(
    <QueryClientProvider client={createQueryClient()}>
      <MemoryRouter>
        <SignInForm onSignedIn={onSignedIn} />
      </MemoryRouter>
    </QueryClientProvider>,
  );
  return onSignedIn;
}

afterEach(() => vi.unstubAllGlobals());

describe("SignInForm", () => {
  it("checks the fields before asking the server", async () => {
    const { calls } = stubApi({});
    renderForm();
    const user = userEvent.setup();
    await user.type(screen.getByLabelText("E-mail"), "not-an-address");
    await user.click(screen.getByRole("button", { name: "Sign in" }));
    expect(await screen.findByText("That does not look like an e-mail address.")).toBeInTheDocument();
    expect(screen.getByText("Enter your password.")).toBeInTheDocument();
    // The error is read with the field.
    const email = screen.getByLabelText("E-mail");
    expect(email).toHaveAttribute("aria-invalid", "true");
    expect(email).toHaveAccessibleDescription("That does not look like an e-mail address.");
    expect(calls).toHaveLength(0);
  });

  it("shows the server's refusal in its own words", async () => {
    stubApi({
      "POST /api/v1/auth/sign-in": {
        status: 401,
        body: { error: { code: "bad_credentials", message: "E-mail or password is wrong." } },
      },
    });
    const onSignedIn = renderForm();
    const user = userEvent.setup();
    await user.type(screen.getByLabelText("E-mail"), "designer@halvorsen.example");
    await user.type(screen.getByLabelText("Password"), "wrong-password");
    await user.click(screen.getByRole("button", { name: "Sign in" }));
    expect(await screen.findByRole("alert")).toHaveTextContent("E-mail or password is wrong.");
    expect(onSignedIn).not.toHaveBeenCalled();
  });

  it("says how long to wait after too many attempts", async () => {
    stubApi({
      "POST /api/v1/auth/sign-in": {
        status: 429,
        headers: { "Retry-After": "300" },
        body: { error: { code: "rate_limited", message: "Too many attempts." } },
      },
    });
    renderForm();
    const user = userEvent.setup();
    await user.type(screen.getByLabelText("E-mail"), "designer@halvorsen.example");
    await user.type(screen.getByLabelText("Password"), "x");
    await user.click(screen.getByRole("button", { name: "Sign in" }));
    expect(await screen.findByRole("alert")).toHaveTextContent("Too many attempts. Try again in 5 minutes.");
  });

  it("signs in and hands over the session", async () => {
    const { calls } = stubApi({ "POST /api/v1/auth/sign-in": demoSession });
    const onSignedIn = renderForm();
    const user = userEvent.setup();
    await user.type(screen.getByLabelText("E-mail"), "designer@halvorsen.example");
    await user.type(screen.getByLabelText("Password"), "stackproof-demo");
    await user.click(screen.getByRole("button", { name: "Sign in" }));
    await vi.waitFor(() => expect(onSignedIn).toHaveBeenCalled());
    expect(onSignedIn.mock.calls[0]?.[0]).toEqual(demoSession);
    expect(calls[0]?.body).toEqual({ email: "designer@halvorsen.example", password: "stackproof-demo" });
  });
});
