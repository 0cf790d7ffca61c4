// The layer editor: toolbar (add, insert, duplicate, delete, move, undo/redo), the layer grid and the
// media/substrate settings. Editing is local; the page saves a new revision when asked.
import { useEffect, useRef } from "react";
import type { Dispatch } from "react";
import type { EditorAction, EditorState } from "../lib/editor-state.ts";
import type { MaterialOption } from "../lib/materials.ts";
import { LayerTable } from "./layer-table.tsx";
import { MediaSettings } from "./media-settings.tsx";
import { FormulaEntry } from "./formula-entry.tsx";

export interface LayerEditorProps {
  state: EditorState;
  dispatch: Dispatch<EditorAction>;
  materials: readonly MaterialOption[];
  selected: number | null;
  onSelect: (index: number | null) => void;
  threadLayers?: ReadonlySet<number>;
  changedLayers?: ReadonlySet<number>;
  readOnly?: boolean;
}

const btn =
  "rounded border border-ink-300 bg-white px-2 py-1 text-xs font-medium text-ink-800 hover:bg-paper-deep disabled:cursor-not-allowed disabled:opacity-40";

function isTextInput(el: EventTarget | null): boolean {
  if (!(el instanceof HTMLElement)) return false;
  return el.isContentEditable || el.tagName === "TEXTAREA" || (el.tagName === "INPUT" && (el as HTMLInputElement).type !== "checkbox");
}

export function LayerEditor(props: LayerEditorProps) {
  const { state, dispatch, selected, readOnly } = props;
  const rootRef = useRef<HTMLDivElement>(null);
  const count = state.present.layers.length;
  const sel = selected !== null && selected < count ? selected : null;

  useEffect(() => {
    // Ctrl+Z / Ctrl+Shift+Z (and Ctrl+Y) anywhere on the page except inside a text field, which keeps its own undo.
    const onKey = (e: KeyboardEvent) => {
      if (!(e.ctrlKey || e.metaKey) || isTextInput(e.target)) return;
      const k = e.key.toLowerCase();
      if (k === "z" && !e.shiftKey) {
        e.preventDefault();
        dispatch({ type: "undo" });
      } else if ((k === "z" && e.shiftKey) || k === "y") {
        e.preventDefault();
        dispatch({ type: "redo" });
      }
    };
    window.addEventListener("keydown", onKey);
    return () => window.removeEventListener("keydown", onKey);
  }, [dispatch]);

  return (
    <div ref={rootRef} className="space-y-3">
      <div role="toolbar" aria-label="Layer actions" className="flex flex-wrap items-center gap-1.5">
        <button type="button" className={btn} disabled={readOnly} onClick={() => { dispatch({ type: "add-layer" }); props.onSelect(count); }}>
          Add layer
        </button>
        <button type="button" className={btn} disabled={readOnly || sel === null} onClick={() => sel !== null && dispatch({ type: "insert-layer", index: sel })} title="Insert (key: Insert)">
          Insert before
        </button>
        <button type="button" className={btn} disabled={readOnly || sel === null} onClick={() => { if (sel !== null) { dispatch({ type: "duplicate-layer", index: sel }); props.onSelect(sel + 1); } }} title="Duplicate (Ctrl+D)">
          Duplicate
        </button>
        <button type="button" className={btn} disabled={readOnly || sel === null} onClick={() => { if (sel !== null) { dispatch({ type: "delete-layer", index: sel }); props.onSelect(count > 1 ? Math.min(sel, count - 2) : null); } }} title="Delete (key: Delete)">
          Delete
        </button>
        <button type="button" className={btn} disabled={readOnly || sel === null || sel === 0} onClick={() => { if (sel !== null) { dispatch({ type: "move-layer", index: sel, by: -1 }); props.onSelect(sel - 1); } }} title="Move toward the substrate (Alt+↑)" aria-label="Move layer up">
          ↑ Move up
        </button>
        <button type="button" className={btn} disabled={readOnly || sel === null || sel >= count - 1} onClick={() => { if (sel !== null) { dispatch({ type: "move-layer", index: sel, by: 1 }); props.onSelect(sel + 1); } }} title="Move toward the incident medium (Alt+↓)" aria-label="Move layer down">
          ↓ Move down
        </button>
        <span className="mx-1 h-5 w-px bg-ink-100" aria-hidden />
        <button type="button" className={btn} disabled={state.past.length === 0} onClick={() => dispatch({ type: "undo" })} title="Undo (Ctrl+Z)">
          Undo
        </button>
        <button type="button" className={btn} disabled={state.future.length === 0} onClick={() => dispatch({ type: "redo" })} title="Redo (Ctrl+Shift+Z)">
          Redo
        </button>
        <span className="ml-auto text-xs text-ink-500 tabular" aria-live="polite">
          {count} layer{count === 1 ? "" : "s"} · {totalThickness(state)} nm total
        </span>
      </div>
      <LayerTable
        design={state.present}
        materials={props.materials}
        dispatch={dispatch}
        selected={sel}
        onSelect={props.onSelect}
        threadLayers={props.threadLayers}
        changedLayers={props.changedLayers}
        readOnly={readOnly}
      />
      <p className="text-xs text-ink-500">
        Arrow keys move between cells · Enter edits · Escape cancels · Space toggles a lock · Alt+↑/↓ moves a layer · Insert, Ctrl+D, Delete
      </p>
      <MediaSettings design={state.present} materials={props.materials} dispatch={dispatch} readOnly={readOnly} />
      {readOnly ? null : <FormulaEntry design={state.present} materials={props.materials} dispatch={dispatch} />}
    </div>
  );
}

function totalThickness(state: EditorState): string {
  return state.present.layers.reduce((s, l) => s + l.thickness, 0).toFixed(1);
}
