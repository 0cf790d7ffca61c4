import { afterEach, describe, expect, it, vi } from "vitest";
import { render, screen, within } from "@testing-library/react";
import userEvent from "@testing-library/user-event";
import { QueryClientProvider } from "@tanstack/react-query";
import { MemoryRouter } from "react-router";
import { ReleaseGate } from "./release-gate.tsx";
import { createQueryClient } from "../../../lib/query-client.ts";
import type { Role } from "../../../lib/session.ts";
import type { Gate, ReleaseSummary, RevisionStatus } from "@stackproof/contracts";
import { stubApi, type StubAnswer } from "../../../../test/stub-api.ts";

// The evidence and deviation parts of a gate answer (no evidence run yet, the program's own mask).
const evidenceNone: Pick<Gate, "evidence" | "deviation"> = {
  evidence: {
    programVersion: 1,
    targetYield: 0.95,
    confidence: 0.95,
    minTrials: 2000,
    seed: "ev-0123456789abcdef-m01234567",
    seedRule: "server-assigned",
    errorModelVersion: "01234567",
    errorModelText: "optical monitoring (T), turning points at 905 nm on the part, 0.05 % photometric noise",
    run: null,
    figures: null,
  },
  deviation: { required: false, accepted: false, bands: [], current: null },
};

const blockedGate: Gate = {
  checks: [
    { id: "verified_yield", ok: false, message: "Verified yield 91.2 % is below the target 95 %." },
    { id: "blocking_threads", ok: false, message: "1 blocking thread is open." },
    { id: "independent_approver", ok: true, message: "You are not the author." },
    { id: "state", ok: true, message: "The revision is under review." },
  ],
  canApprove: false,
  canRelease: false,
  yieldRunId: null,
  ...evidenceNone,
};

const clearGate: Gate = {
  checks: blockedGate.checks.map((c) => ({ ...c, ok: true })),
  canApprove: true,
  canRelease: false,
  yieldRunId: "run1",
  ...evidenceNone,
};

function setup(
  roles: Role[],
  status: RevisionStatus,
  gate: unknown,
  extra: Record<string, StubAnswer> = {},
  userId = "u-approver",
) {
  const stub = stubApi({
    "GET /api/v1/auth/me": {
      user: { id: userId, email: "x@halvorsen.example", name: "Test Person" },
      workspace: { id: "w", name: "Halvorsen Thinfilm Works", demo: true },
      roles,
    },
    "GET /api/v1/revisions/rev1/gate": gate,
    ...extra,
  });
  render(
    <QueryClientProvider client={createQueryClient()}>
      <MemoryRouter>
        <ReleaseGate revisionId="rev1" designId="d1" status={status} authorId="u-designer" />
      </MemoryRouter>
    </QueryClientProvider>,
  );
  return stub;
}

afterEach(() => vi.unstubAllGlobals());

describe("ReleaseGate", () => {
  it("lists each check with its verdict and the server's message", async () => {
    setup(["approver"], "in_review", blockedGate);
    const list = await screen.findByRole("list", { name: "Sign-off conditions" });
    expect(within(list).getAllByRole("listitem")).toHaveLength(4);
    const yieldCheck = list.querySelector('[data-check="verified_yield"]');
    expect(yieldCheck).toHaveTextContent("Evidence run: lower yield bound meets the target: not met");
    expect(within(list).getByText("Verified yield 91.2 % is below the target 95 %.")).toBeInTheDocument();
  });

  it("states the evidence run's error model in the server's plain words", async () => {
    setup(["approver"], "in_review", blockedGate);
    const model = await screen.findByTestId("evidence-error-model");
    expect(model).toHaveTextContent(
      "Error model: optical monitoring (T), turning points at 905 nm on the part, 0.05 % photometric noise",
    );
  });

  it("keeps sign-off disabled with the failing checks as its reason", async () => {
    setup(["approver"], "in_review", blockedGate);
    const approve = await screen.findByRole("button", { name: "Sign off" });
    await vi.waitFor(() =>
      expect(approve).toHaveAccessibleDescription(/below the target 95 %.*1 blocking thread is open/),
    );
    expect(approve).toBeDisabled();
    // Sending back and withdrawing need no gate.
    expect(screen.getByRole("button", { name: "Send back for rework" })).toBeEnabled();
    expect(screen.getByRole("button", { name: "Withdraw" })).toBeEnabled();
    expect(screen.queryByRole("button", { name: "Submit for review" })).not.toBeInTheDocument();
  });

  it("enables sign-off when every check passes", async () => {
    setup(["approver"], "in_review", clearGate);
    const approve = await screen.findByRole("button", { name: "Sign off" });
    await vi.waitFor(() => expect(approve).toBeEnabled());
  });

  it("shows a reviewer only the review action, and a designer only theirs", async () => {
    setup(["reviewer"], "in_review", blockedGate);
    expect(await screen.findByRole("button", { name: "Send back for rework" })).toBeInTheDocument();
    expect(screen.queryByRole("button", { name: "Sign off" })).not.toBeInTheDocument();
    expect(screen.queryByRole("button", { name: "Release" })).not.toBeInTheDocument();
    expect(screen.queryByRole("button", { name: "Withdraw" })).not.toBeInTheDocument();
  });

  it("offers a designer to submit a draft, never to sign off", async () => {
    setup(["designer"], "draft", { ...blockedGate, canApprove: false }, {}, "u-designer");
    expect(await screen.findByRole("button", { name: "Submit for review" })).toBeEnabled();
    expect(screen.queryByRole("button", { name: "Sign off" })).not.toBeInTheDocument();
  });

  it("tells an approver who wrote the revision that someone else must sign it off", async () => {
    setup(["approver", "designer"], "in_review", clearGate, {}, "u-designer");
    const approve = await screen.findByRole("button", { name: "Sign off" });
    expect(approve).toBeDisabled();
    expect(approve).toHaveAccessibleDescription(
      "You wrote this revision; another program manager has to sign it off.",
    );
  });

  it("shows the server's message when it refuses a transition", async () => {
    const { calls } = setup(["approver"], "in_review", clearGate, {
      "POST /api/v1/revisions/rev1/transitions": {
        status: 422,
        body: {
          error: { code: "gate_failed", message: "No server-verified yield run at or above the target." },
        },
      },
    });
    const user = userEvent.setup();
    const approve = await screen.findByRole("button", { name: "Sign off" });
    await vi.waitFor(() => expect(approve).toBeEnabled());
    await user.click(approve);
    const dialog = await screen.findByRole("dialog", { name: "Sign off?" });
    await user.type(within(dialog).getByLabelText("Decision note (optional)"), "Meets the mask.");
    await user.click(within(dialog).getByRole("button", { name: "Sign off" }));
    expect(
      await screen.findByText("No server-verified yield run at or above the target."),
    ).toBeInTheDocument();
    expect(screen.getByText("The server refused: a sign-off condition is not met.")).toBeInTheDocument();
    expect(calls.find((c) => c.method === "POST")?.body).toEqual({
      action: "approve",
      note: "Meets the mask.",
    });
  });

  it("asks for a note before sending a revision back", async () => {
    const { calls } = setup(["reviewer"], "in_review", blockedGate);
    const user = userEvent.setup();
    await user.click(await screen.findByRole("button", { name: "Send back for rework" }));
    const dialog = await screen.findByRole("dialog");
    await user.click(within(dialog).getByRole("button", { name: "Send back for rework" }));
    expect(within(dialog).getByText("Write a short note; it goes on the record.")).toBeInTheDocument();
    expect(calls.some((c) => c.method === "POST")).toBe(false);
    await user.keyboard("{Escape}");
    expect(screen.queryByRole("dialog")).not.toBeInTheDocument();
  });

  it("after release, links the filed record and drops the no longer relevant state check", async () => {
    const released: Gate = {
      checks: [
        ...clearGate.checks.filter((c) => c.id !== "state"),
        {
          id: "state",
          ok: false,
          message: "The revision is released; only a revision in review can be approved.",
        },
      ],
      canApprove: false,
      canRelease: false,
      yieldRunId: "run1",
      ...evidenceNone,
    };
    const row: ReleaseSummary = {
      id: "rel9",
      releasedAt: "2026-11-20T10:00:00Z",
      releasedBy: { id: "u-approver", name: "Test Person" },
      status: "released",
      program: { id: "p1", name: "Fjord lidar window", protective: false },
      design: { id: "d1", name: "Bandpass 905" },
      revision: { id: "rev1", number: 2, hash: "abc" },
      yield: { yield: 0.97, low: 0.95, high: 0.98, trials: 2000, lowerBound: 0.962, confidence: 0.95 },
    };
    setup(["approver"], "released", released, {
      "GET /api/v1/releases": { items: [row], nextCursor: null },
    });
    const link = await screen.findByRole("link", { name: "Open the release record" });
    expect(link).toHaveAttribute("href", "/releases/rel9");
    const list = screen.getByRole("list", { name: "Sign-off conditions" });
    expect(list.querySelector('[data-check="state"]')).toBeNull();
    // An approver may still withdraw a released revision; nothing else is offered.
    expect(screen.getByRole("button", { name: "Withdraw" })).toBeEnabled();
    expect(screen.queryByRole("button", { name: "Release" })).not.toBeInTheDocument();
  });
});
