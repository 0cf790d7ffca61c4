import { describe, expect, it, vi } from "vitest";
import { useState } from "react";
import { render, screen } from "@testing-library/react";
import userEvent from "@testing-library/user-event";
import { Dialog } from "./dialog.tsx";
import { Tabs } from "./tabs.tsx";
import { TextField } from "./fields.tsx";
import { ErrorState } from "./error-state.tsx";
import { StatusPill } from "./status-pill.tsx";
import { ApiError } from "../../lib/api-client.ts";

function DialogHarness({ onClose }: { onClose: () => void }) {
  const [open, setOpen] = useState(false);
  return (
    <>
      <button onClick={() => setOpen(true)}>Open</button>
      <Dialog
        open={open}
        onClose={() => {
          onClose();
          setOpen(false);
        }}
        title="Confirm"
        footer={<button>Go</button>}
      >
        <input aria-label="Note" />
      </Dialog>
    </>
  );
}

describe("UI kit", () => {
  it("Dialog takes focus, keeps Tab inside, closes on Escape and gives focus back", async () => {
    const onClose = vi.fn();
    render(<DialogHarness onClose={onClose} />);
    const user = userEvent.setup();
    const opener = screen.getByRole("button", { name: "Open" });
    await user.click(opener);
    const dialog = screen.getByRole("dialog", { name: "Confirm" });
    expect(dialog).toHaveAttribute("aria-modal", "true");
    expect(screen.getByRole("button", { name: "Close" })).toHaveFocus();
    await user.tab();
    expect(screen.getByLabelText("Note")).toHaveFocus();
    await user.tab();
    expect(screen.getByRole("button", { name: "Go" })).toHaveFocus();
    await user.tab();
    expect(screen.getByRole("button", { name: "Close" })).toHaveFocus();
    await user.keyboard("{Escape}");
    expect(onClose).toHaveBeenCalledOnce();
    expect(screen.queryByRole("dialog")).not.toBeInTheDocument();
    expect(opener).toHaveFocus();
  });

  it("Tabs move with the arrow keys and label their panel", async () => {
    render(
      <Tabs
        label="Views"
        items={[
          { id: "a", label: "First", content: <p>one</p> },
          { id: "b", label: "Second", content: <p>two</p> },
        ]}
      />,
    );
    const user = userEvent.setup();
    const first = screen.getByRole("tab", { name: "First" });
    expect(first).toHaveAttribute("aria-selected", "true");
    expect(screen.getByRole("tabpanel", { name: "First" })).toHaveTextContent("one");
    first.focus();
    await user.keyboard("{ArrowRight}");
    expect(screen.getByRole("tab", { name: "Second" })).toHaveFocus();
    expect(screen.getByRole("tabpanel", { name: "Second" })).toHaveTextContent("two");
    expect(first).toHaveAttribute("tabindex", "-1");
  });

  it("TextField ties hint and error to the input", () => {
    render(<TextField label="Trials" hint="At most 100 000." error="Give a whole number." />);
    const input = screen.getByLabelText("Trials");
    expect(input).toHaveAttribute("aria-invalid", "true");
    expect(input).toHaveAccessibleDescription("At most 100 000. Give a whole number.");
  });

  it("ErrorState shows the server's message; StatusPill uses Stackproof's words", () => {
    render(
      <>
        <ErrorState error={new ApiError(409, "state_conflict", "The revision was already signed off.")} />
        <StatusPill status="changes_requested" />
      </>,
    );
    expect(screen.getByRole("alert")).toHaveTextContent("The revision was already signed off.");
    expect(screen.getByText("Needs rework")).toBeInTheDocument();
  });
});
