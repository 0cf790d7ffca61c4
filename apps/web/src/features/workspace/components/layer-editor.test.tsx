import { describe, expect, it } from "vitest";
import { useReducer, useState } from "react";
import { render, screen, within, act } from "@testing-library/react";
import userEvent from "@testing-library/user-event";
import { designFromQwots, getMaterial, refractiveIndex } from "@stackproof/optics";
import type { Design } from "@stackproof/optics";
import { LayerEditor } from "./layer-editor.tsx";
import { editorReducer, initEditor } from "../lib/editor-state.ts";
import type { EditorState } from "../lib/editor-state.ts";
import { libraryOptions } from "../lib/materials.ts";

const start: Design = designFromQwots({
  name: "three layers",
  referenceWavelength: 550,
  layers: [
    { material: "Al2O3", qwot: 1 },
    { material: "ZrO2", qwot: 2 },
    { material: "MgF2", qwot: 1 },
  ],
  substrate: { material: "boro-crown", thicknessMm: 1, backside: true },
});

let latest: EditorState | null = null;

function Harness() {
  const [state, dispatch] = useReducer(editorReducer, start, initEditor);
  const [selected, setSelected] = useState<number | null>(null);
  latest = state;
  return <LayerEditor state={state} dispatch={dispatch} materials={libraryOptions()} selected={selected} onSelect={setSelected} />;
}

const materialsNow = () => (latest?.present.layers ?? []).map((l) => l.material);
const cell = (row: number, col: number) => document.querySelector<HTMLElement>(`[data-cell="${row}:${col}"]`) as HTMLElement;

describe("layer editor", () => {
  it("adds, inserts, duplicates, deletes and reorders layers", async () => {
    const user = userEvent.setup();
    render(<Harness />);
    expect(screen.getAllByRole("row")).toHaveLength(4); // header + 3 layers

    await user.click(screen.getByRole("button", { name: "Add layer" }));
    expect(materialsNow()).toHaveLength(4);

    await user.click(cell(1, 1)); // select layer 2 (ZrO2)
    await user.click(screen.getByRole("button", { name: "Insert before" }));
    expect(materialsNow()).toHaveLength(5);
    expect(materialsNow()[2]).toBe("ZrO2"); // the old layer 2 moved down one place

    await user.click(cell(2, 1));
    await user.click(screen.getByRole("button", { name: "Duplicate" }));
    expect(materialsNow().slice(2, 4)).toEqual(["ZrO2", "ZrO2"]);

    await user.click(screen.getByRole("button", { name: "Delete" }));
    expect(materialsNow()).toHaveLength(5);

    await user.click(cell(0, 1)); // Al2O3 at the bottom of the stack
    await user.click(screen.getByRole("button", { name: "Move layer down" }));
    expect(materialsNow()[1]).toBe("Al2O3");
    await user.click(screen.getByRole("button", { name: "Move layer up" }));
    expect(materialsNow()[0]).toBe("Al2O3");
  });

  it("converts between nm and QWOT at the reference wavelength, live while typing", async () => {
    const user = userEvent.setup();
    render(<Harness />);
    // QWOT = 4 n d / λ0 (quarter-wave optical thickness, Macleod, Thin-Film Optical Filters).
    const n = refractiveIndex(getMaterial("MgF2").model, 550).n;
    await user.dblClick(cell(2, 3)); // QWOT of layer 3 (MgF2)
    const input = screen.getByRole("textbox", { name: "QWOT of layer 3" });
    await user.clear(input);
    await user.type(input, "2");
    expect(screen.getByText(`= ${((2 * 550) / (4 * n)).toFixed(2)} nm`)).toBeInTheDocument();
    await user.keyboard("{Enter}");
    expect(latest?.present.layers[2]?.thickness).toBeCloseTo((2 * 550) / (4 * n), 9);

    await user.dblClick(cell(2, 2)); // thickness in nm
    const nm = screen.getByRole("textbox", { name: "Thickness of layer 3 in nm" });
    await user.clear(nm);
    await user.type(nm, "100");
    expect(screen.getByText(`= ${((4 * n * 100) / 550).toFixed(4)} QWOT`)).toBeInTheDocument();
    await user.keyboard("{Enter}");
    expect(latest?.present.layers[2]?.thickness).toBe(100);
    expect(within(cell(2, 3)).getByText(((4 * n * 100) / 550).toFixed(4))).toBeInTheDocument();
  });

  it("undoes and redoes with Ctrl+Z and Ctrl+Shift+Z", async () => {
    const user = userEvent.setup();
    render(<Harness />);
    await user.click(screen.getByRole("button", { name: "Add layer" }));
    await user.click(screen.getByRole("button", { name: "Add layer" }));
    expect(materialsNow()).toHaveLength(5);
    await user.click(document.body);
    await user.keyboard("{Control>}z{/Control}");
    expect(materialsNow()).toHaveLength(4);
    await user.keyboard("{Control>}z{/Control}");
    expect(materialsNow()).toHaveLength(3);
    await user.keyboard("{Control>}{Shift>}z{/Shift}{/Control}");
    expect(materialsNow()).toHaveLength(4);
    expect(screen.getByRole("button", { name: "Redo" })).toBeEnabled();
  });

  it("is usable from the keyboard: arrows move, Enter edits, Escape cancels, Alt+arrow reorders", async () => {
    const user = userEvent.setup();
    render(<Harness />);
    act(() => cell(0, 2).focus());
    await user.keyboard("{ArrowDown}");
    expect(cell(1, 2)).toHaveFocus();
    await user.keyboard("{ArrowRight}");
    expect(cell(1, 3)).toHaveFocus();
    await user.keyboard("{ArrowLeft}{Enter}");
    const input = screen.getByRole("textbox", { name: "Thickness of layer 2 in nm" });
    expect(input).toHaveFocus();
    await user.clear(input);
    await user.type(input, "123.5{Enter}");
    expect(latest?.present.layers[1]?.thickness).toBe(123.5);
    expect(cell(1, 2)).toHaveFocus();

    await user.keyboard("{Enter}");
    const again = screen.getByRole("textbox", { name: "Thickness of layer 2 in nm" });
    await user.clear(again);
    await user.type(again, "999{Escape}");
    expect(latest?.present.layers[1]?.thickness).toBe(123.5);

    await user.keyboard("{Alt>}{ArrowUp}{/Alt}");
    expect(materialsNow()[0]).toBe("ZrO2");
    expect(cell(0, 2)).toHaveFocus();

    await user.keyboard("{End}");
    expect(cell(0, 4)).toHaveFocus();
    await user.keyboard(" ");
    expect(latest?.present.layers[0]?.locked).toBe(true);
  });

  it("keeps an unreadable thickness open with the reason instead of dropping it", async () => {
    const user = userEvent.setup();
    render(<Harness />);
    const before = latest?.present.layers[1]?.thickness;
    await user.click(cell(1, 2));
    await user.keyboard("{Enter}");
    const input = screen.getByRole("textbox", { name: "Thickness of layer 2 in nm" });
    await user.clear(input);
    await user.type(input, "99x{Enter}");
    // Still editing, with the typed text and the reason; the layer is unchanged.
    expect(screen.getByRole("textbox", { name: "Thickness of layer 2 in nm" })).toHaveProperty("value", "99x");
    expect(input.getAttribute("aria-invalid")).toBe("true");
    expect(screen.getByText(/Type a thickness in nm/)).toBeTruthy();
    expect(latest?.present.layers[1]?.thickness).toBe(before);
    await user.clear(input);
    await user.type(input, "120{Enter}");
    expect(latest?.present.layers[1]?.thickness).toBe(120);
    expect(screen.queryByRole("textbox", { name: "Thickness of layer 2 in nm" })).toBeNull();
  });
});
