// Layer table editor: a keyboard grid (arrow keys between cells, Enter to edit, Escape to cancel) over the
// design's layers in deposition order. Thickness is edited in nm or in QWOT at λ0; either converts live.
import { useEffect, useMemo, useRef, useState } from "react";
import type { Dispatch, KeyboardEvent } from "react";
import { getCoreRowModel, useReactTable } from "@tanstack/react-table";
import type { ColumnDef } from "@tanstack/react-table";
import type { Design, Layer } from "@stackproof/optics";
import type { EditorAction } from "../lib/editor-state.ts";
import { fromQwot, toQwot } from "../lib/materials.ts";
import type { MaterialOption } from "../lib/materials.ts";

type Row = Layer & { index: number };
const COLS = ["index", "material", "thickness", "qwot", "locked"] as const;
type ColId = (typeof COLS)[number];
const EDITABLE: readonly ColId[] = ["material", "thickness", "qwot", "locked"];

export interface LayerTableProps {
  design: Design;
  materials: readonly MaterialOption[];
  dispatch: Dispatch<EditorAction>;
  selected: number | null;
  onSelect: (index: number | null) => void;
  /** Layer indices with open review threads. */
  threadLayers?: ReadonlySet<number>;
  /** Layer indices changed compared with the saved revision. */
  changedLayers?: ReadonlySet<number>;
  readOnly?: boolean;
}

function fmtNum(v: number, digits: number): string {
  return Number.isFinite(v) ? v.toFixed(digits) : "—";
}

export function LayerTable(props: LayerTableProps) {
  const { design, materials, dispatch, selected, onSelect, readOnly } = props;
  const rows = useMemo<Row[]>(() => design.layers.map((l, index) => ({ ...l, index })), [design.layers]);
  const columns = useMemo<ColumnDef<Row>[]>(
    () => [
      { id: "index", header: "#" },
      { id: "material", header: "Material" },
      { id: "thickness", header: "Thickness (nm)" },
      { id: "qwot", header: `QWOT at ${design.referenceWavelength} nm` },
      { id: "locked", header: "Lock" },
    ],
    [design.referenceWavelength],
  );
  const table = useReactTable({ data: rows, columns, getCoreRowModel: getCoreRowModel(), getRowId: (r) => String(r.index) });
  const [active, setActive] = useState<{ row: number; col: number }>({ row: 0, col: 1 });
  const [editing, setEditingState] = useState<{ row: number; col: ColId; draft: string } | null>(null);
  // The edit in progress, readable from blur handlers that fire after Enter or Escape already ended it.
  const editRef = useRef<{ row: number; col: ColId; draft: string } | null>(null);
  const setEditing = (next: { row: number; col: ColId; draft: string } | null) => {
    editRef.current = next;
    setEditingState(next);
  };
  const [notice, setNotice] = useState<string | null>(null);
  const gridRef = useRef<HTMLTableElement>(null);
  const wantFocus = useRef(false);

  const rowCount = rows.length;
  const activeRow = Math.min(active.row, Math.max(0, rowCount - 1));

  useEffect(() => {
    if (!wantFocus.current) return;
    wantFocus.current = false;
    const el = gridRef.current?.querySelector<HTMLElement>(`[data-cell="${activeRow}:${active.col}"]`);
    if (el && document.activeElement !== el) el.focus();
  }, [activeRow, active.col, editing, rowCount]);

  const moveTo = (row: number, col: number) => {
    const r = Math.max(0, Math.min(rowCount - 1, row));
    const c = Math.max(0, Math.min(COLS.length - 1, col));
    wantFocus.current = true;
    setActive({ row: r, col: c });
    onSelect(r);
  };

  const startEdit = (row: number, col: ColId) => {
    if (readOnly) return;
    const layer = design.layers[row];
    if (!layer) return;
    if (col === "locked") {
      dispatch({ type: "update-layer", index: row, patch: { locked: !layer.locked } });
      return;
    }
    if (layer.locked && col !== "material") {
      setNotice(`Layer ${row + 1} is locked (its thickness is kept). Space on its lock cell unlocks it.`);
      return;
    }
    setNotice(null);
    const draft =
      col === "thickness" ? String(round(layer.thickness, 3)) : col === "qwot" ? String(round(toQwot(layer.thickness, layer.material, design), 4)) : layer.material;
    setEditing({ row, col, draft });
  };

  /** Why the draft cannot be taken, or null when it can. */
  const draftProblem = (ed: { col: ColId; draft: string }): string | null => {
    if (ed.col === "material" || ed.col === "locked") return null;
    const v = Number(ed.draft.trim().replace(",", "."));
    if (ed.draft.trim() === "" || !Number.isFinite(v)) return ed.col === "thickness" ? "Type a thickness in nm, e.g. 108.75" : "Type a QWOT, e.g. 1 for a quarter wave";
    if (v < 0) return "A thickness cannot be negative";
    return null;
  };

  /** Takes the draft; an unreadable one keeps the editor open with its text and says why. */
  const commit = (move: 0 | 1 = 0): boolean => {
    const editing = editRef.current;
    if (!editing) return true;
    if (draftProblem(editing)) return false;
    const layer = design.layers[editing.row];
    const v = Number(editing.draft.trim().replace(",", "."));
    if (layer && editing.col !== "material") {
      const thickness = editing.col === "thickness" ? v : fromQwot(v, layer.material, design);
      if (Number.isFinite(thickness) && Math.abs(thickness - layer.thickness) > 1e-12) {
        dispatch({ type: "update-layer", index: editing.row, patch: { thickness } });
      }
    }
    const col = COLS.indexOf(editing.col);
    setEditing(null);
    moveTo(editing.row + move, col);
    return true;
  };

  const onGridKey = (e: KeyboardEvent<HTMLTableElement>) => {
    if (editing) return;
    const { col } = active;
    const row = activeRow;
    const mod = e.ctrlKey || e.metaKey;
    if (e.altKey && (e.key === "ArrowUp" || e.key === "ArrowDown")) {
      if (readOnly) return;
      e.preventDefault();
      const by = e.key === "ArrowUp" ? -1 : 1;
      if (design.layers[row + by]) {
        dispatch({ type: "move-layer", index: row, by });
        moveTo(row + by, col);
      }
      return;
    }
    switch (e.key) {
      case "ArrowUp":
        e.preventDefault();
        moveTo(row - 1, col);
        return;
      case "ArrowDown":
        e.preventDefault();
        moveTo(row + 1, col);
        return;
      case "ArrowLeft":
        e.preventDefault();
        moveTo(row, col - 1);
        return;
      case "ArrowRight":
        e.preventDefault();
        moveTo(row, col + 1);
        return;
      case "Home":
        e.preventDefault();
        moveTo(mod ? 0 : row, mod ? col : 0);
        return;
      case "End":
        e.preventDefault();
        moveTo(mod ? rowCount - 1 : row, mod ? col : COLS.length - 1);
        return;
      case "Enter":
      case "F2": {
        const id = COLS[col];
        if (id && EDITABLE.includes(id)) {
          e.preventDefault();
          startEdit(row, id);
        }
        return;
      }
      case " ":
        if (COLS[col] === "locked") {
          e.preventDefault();
          startEdit(row, "locked");
        }
        return;
      case "Delete":
        if (readOnly || rowCount === 0) return;
        e.preventDefault();
        dispatch({ type: "delete-layer", index: row });
        moveTo(Math.min(row, rowCount - 2), col);
        return;
      case "Insert":
        if (readOnly) return;
        e.preventDefault();
        dispatch({ type: "insert-layer", index: row });
        moveTo(row, col);
        return;
      default:
        if (mod && e.key.toLowerCase() === "d" && !readOnly) {
          e.preventDefault();
          dispatch({ type: "duplicate-layer", index: row });
          moveTo(row + 1, col);
        }
    }
  };

  const cellCls = (r: number, c: number) =>
    `px-2 py-1 outline-none focus-visible:outline-2 focus-visible:-outline-offset-2 focus-visible:outline-film-teal ${
      r === activeRow && c === active.col ? "bg-film-teal/10" : ""
    }`;

  const layer = (r: number) => design.layers[r];

  return (
    <>
      {/* Layout containment: an edit relayouts the table's box, not the whole page. */}
      <div className="overflow-auto rounded-md border border-ink-100" style={{ maxHeight: 420, contain: "layout paint" }}>
      <table
        ref={gridRef}
        role="grid"
        aria-label="Layers, in deposition order (layer 1 is next to the substrate)"
        aria-rowcount={rowCount + 1}
        className="w-full border-collapse text-sm"
        onKeyDown={onGridKey}
      >
        <thead className="sticky top-0 z-10 bg-paper-deep text-left text-xs text-ink-700">
          {table.getHeaderGroups().map((hg) => (
            <tr key={hg.id}>
              {hg.headers.map((h) => (
                <th key={h.id} scope="col" className="px-2 py-1.5 font-semibold">
                  {typeof h.column.columnDef.header === "string" ? h.column.columnDef.header : h.id}
                </th>
              ))}
            </tr>
          ))}
        </thead>
        <tbody>
          {table.getRowModel().rows.map((row) => {
            const r = row.original.index;
            const l = row.original;
            const isSel = selected === r;
            return (
              <tr
                key={row.id}
                aria-selected={isSel}
                data-layer-row={r}
                className={`border-t border-ink-100 ${isSel ? "bg-film-amber/10" : ""} ${props.changedLayers?.has(r) ? "border-l-4 border-l-film-amber" : ""}`}
              >
                {COLS.map((colId, c) => {
                  const isEditing = editing?.row === r && editing.col === colId;
                  const common = {
                    role: "gridcell" as const,
                    "data-cell": `${r}:${c}`,
                    tabIndex: r === activeRow && c === active.col && !isEditing ? 0 : -1,
                    className: cellCls(r, c),
                    onClick: () => {
                      setActive({ row: r, col: c });
                      onSelect(r);
                    },
                    onFocus: (e: { target: EventTarget; currentTarget: EventTarget }) => {
                      // Focus that arrives by other means (a click, a screen reader) moves the grid's cursor too.
                      if (e.target === e.currentTarget && (r !== activeRow || c !== active.col)) setActive({ row: r, col: c });
                    },
                    onDoubleClick: () => {
                      if (EDITABLE.includes(colId)) startEdit(r, colId);
                    },
                  };
                  if (colId === "index") {
                    return (
                      <td key={colId} {...common}>
                        <span className="tabular text-ink-500">{r + 1}</span>
                        {props.threadLayers?.has(r) ? (
                          <span className="ml-1 inline-block h-2 w-2 rounded-full bg-film-violet" title="Open review thread on this layer" aria-label="open review thread" />
                        ) : null}
                      </td>
                    );
                  }
                  if (colId === "material") {
                    return (
                      <td key={colId} {...common}>
                        {isEditing ? (
                          <select
                            autoFocus
                            aria-label={`Material of layer ${r + 1}`}
                            className="w-full rounded border border-film-teal bg-white px-1 py-0.5"
                            value={editing.draft}
                            onChange={(e) => {
                              dispatch({ type: "update-layer", index: r, patch: { material: e.target.value } });
                              setEditing(null);
                              moveTo(r, c);
                            }}
                            onKeyDown={(e) => {
                              if (e.key === "Escape" || e.key === "Enter") {
                                e.preventDefault();
                                e.stopPropagation();
                                setEditing(null);
                                moveTo(r, c);
                              }
                            }}
                            onBlur={() => setEditing(null)}
                          >
                            {materials
                              .filter((m) => m.role === "layer" || m.role === "metal" || m.id === l.material)
                              .map((m) => (
                                <option key={m.id} value={m.id}>
                                  {m.id} — {m.name}
                                </option>
                              ))}
                          </select>
                        ) : (
                          <span className="font-mono">{l.material}</span>
                        )}
                      </td>
                    );
                  }
                  if (colId === "thickness" || colId === "qwot") {
                    const qwot = toQwot(l.thickness, l.material, design);
                    let live = "";
                    const problem = isEditing ? draftProblem(editing) : null;
                    if (isEditing && !problem) {
                      const v = Number(editing.draft.trim().replace(",", "."));
                      const cur = layer(r);
                      if (cur) {
                        live = colId === "thickness" ? `= ${fmtNum(toQwot(v, cur.material, design), 4)} QWOT` : `= ${fmtNum(fromQwot(v, cur.material, design), 2)} nm`;
                      }
                    }
                    return (
                      <td key={colId} {...common}>
                        {isEditing ? (
                          <div>
                            <input
                              autoFocus
                              inputMode="decimal"
                              aria-label={colId === "thickness" ? `Thickness of layer ${r + 1} in nm` : `QWOT of layer ${r + 1}`}
                              aria-describedby={`live-${r}-${colId}`}
                              aria-invalid={problem ? true : undefined}
                              className={`w-24 rounded border bg-white px-1 py-0.5 text-right tabular ${problem ? "border-verdict-fail" : "border-film-teal"}`}
                              value={editing.draft}
                              onChange={(e) => setEditing({ ...editing, draft: e.target.value })}
                              onKeyDown={(e) => {
                                if (e.key === "Enter") {
                                  e.preventDefault();
                                  e.stopPropagation();
                                  commit(0);
                                } else if (e.key === "Escape") {
                                  e.preventDefault();
                                  e.stopPropagation();
                                  setEditing(null);
                                  moveTo(r, c);
                                } else if (e.key === "Tab") {
                                  // Focus moves on either way (no keyboard trap); an unreadable draft stays open, marked.
                                  commit(0);
                                }
                              }}
                              onBlur={() => commit(0)}
                            />
                            <span id={`live-${r}-${colId}`} aria-live="polite" className={`ml-2 text-xs tabular ${problem ? "text-verdict-fail" : "text-ink-500"}`}>
                              {problem ? `${problem} (Escape keeps the old value)` : live}
                            </span>
                          </div>
                        ) : (
                          <span className={`tabular ${l.locked ? "text-ink-500" : ""}`}>
                            {colId === "thickness" ? fmtNum(l.thickness, 2) : fmtNum(qwot, 4)}
                          </span>
                        )}
                      </td>
                    );
                  }
                  return (
                    <td key={colId} {...common} aria-checked={Boolean(l.locked)} aria-label={`Lock layer ${r + 1}`}>
                      <span aria-hidden className={l.locked ? "text-film-amber" : "text-ink-300"}>
                        {l.locked ? "● locked" : "○"}
                      </span>
                    </td>
                  );
                })}
              </tr>
            );
          })}
          {rowCount === 0 ? (
            <tr>
              <td colSpan={COLS.length} className="px-3 py-6 text-center text-ink-500">
                No layers yet: the bare substrate. Add a layer to start.
              </td>
            </tr>
          ) : null}
        </tbody>
      </table>
      </div>
      <p role="status" className="pt-1 text-xs text-[#8a5210]">
        {notice}
      </p>
    </>
  );
}

function round(v: number, digits: number): number {
  const f = 10 ** digits;
  return Math.round(v * f) / f;
}
