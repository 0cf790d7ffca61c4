import { describe, expect, it } from "vitest";
import { useReducer } from "react";
import { render, screen } from "@testing-library/react";
import userEvent from "@testing-library/user-event";
import { designFromQwots, layerQwots } from "@stackproof/optics";
import type { Design } from "@stackproof/optics";
import { FormulaEntry } from "./formula-entry.tsx";
import { editorReducer, initEditor } from "../lib/editor-state.ts";
import type { EditorState } from "../lib/editor-state.ts";
import { libraryOptions } from "../lib/materials.ts";

const start: Design = designFromQwots({
  name: "one layer",
  referenceWavelength: 550,
  layers: [{ material: "MgF2", qwot: 1 }],
  substrate: { material: "fused-silica", thicknessMm: 1, backside: true },
});

let latest: EditorState | null = null;
function Harness() {
  const [state, dispatch] = useReducer(editorReducer, start, initEditor);
  latest = state;
  return <FormulaEntry design={state.present} materials={libraryOptions()} dispatch={dispatch} />;
}

describe("formula entry", () => {
  it("shows the column of a formula error and builds the stack once it is right", async () => {
    const user = userEvent.setup();
    render(<Harness />);
    await user.click(screen.getByText("Build from a formula"));
    const input = screen.getByLabelText("Formula");
    await user.clear(input);
    await user.type(input, "(HL^2");
    await user.click(screen.getByRole("button", { name: "Build stack" }));
    expect(screen.getByRole("alert").textContent).toMatch(/column 6: expected "\)" to close the group/);
    expect(latest?.present.layers).toHaveLength(1); // nothing replaced

    await user.clear(input);
    await user.type(input, "(HL)^2 H");
    await user.selectOptions(screen.getByLabelText(/H is/), "Ta2O5");
    await user.clear(screen.getByLabelText("λ0 (nm)"));
    await user.type(screen.getByLabelText("λ0 (nm)"), "633");
    await user.click(screen.getByRole("button", { name: "Build stack" }));
    const d = latest!.present;
    expect(d.layers.map((l) => l.material)).toEqual(["Ta2O5", "SiO2", "Ta2O5", "SiO2", "Ta2O5"]);
    expect(d.referenceWavelength).toBe(633);
    // quarter waves at λ0, converted by the optics package
    for (const q of layerQwots(d)) expect(q).toBeCloseTo(1, 10);
    expect(screen.getByRole("status").textContent).toMatch(/Built 5 layers/);
  });
});
