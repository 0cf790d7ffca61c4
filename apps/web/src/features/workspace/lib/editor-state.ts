// Local editing state of a design: every change is a new immutable Design, kept in an undo history.
// Nothing here talks to the server; "save as new revision" sends `present` when the designer asks.
import type { Design, Layer } from "@stackproof/optics";

export const HISTORY_LIMIT = 200;

export interface EditorState {
  present: Design;
  past: Design[];
  future: Design[];
}

export type MediaPatch = Partial<Pick<Design, "incident" | "exit" | "referenceWavelength" | "name">> & {
  substrate?: Partial<Design["substrate"]>;
};

export type EditorAction =
  | { type: "reset"; design: Design }
  | { type: "replace"; design: Design }
  | { type: "update-layer"; index: number; patch: Partial<Layer> }
  | { type: "add-layer"; layer?: Layer }
  | { type: "insert-layer"; index: number; layer?: Layer }
  | { type: "delete-layer"; index: number }
  | { type: "duplicate-layer"; index: number }
  | { type: "move-layer"; index: number; by: -1 | 1 }
  | { type: "set-media"; patch: MediaPatch }
  | { type: "undo" }
  | { type: "redo" };

export function initEditor(design: Design): EditorState {
  return { present: design, past: [], future: [] };
}

function defaultLayer(design: Design, near: number): Layer {
  const neighbour = design.layers[near] ?? design.layers[design.layers.length - 1];
  // A new layer alternates with its neighbour where possible: H after L and L after H.
  const materials = [...new Set(design.layers.map((l) => l.material))];
  const other = neighbour ? materials.find((m) => m !== neighbour.material) : undefined;
  return { material: other ?? neighbour?.material ?? "SiO2", thickness: neighbour?.thickness ?? 100 };
}

function withLayers(design: Design, layers: Layer[]): Design {
  return { ...design, layers };
}

function apply(design: Design, action: EditorAction): Design {
  const layers = design.layers;
  switch (action.type) {
    case "update-layer": {
      const current = layers[action.index];
      if (!current) return design;
      const next = { ...current, ...action.patch };
      const keys = Object.keys(action.patch) as (keyof Layer)[];
      if (keys.every((k) => (k === "locked" ? Boolean(current.locked) === Boolean(next.locked) : current[k] === next[k]))) return design;
      if (next.locked === false) delete next.locked;
      return withLayers(design, layers.map((l, i) => (i === action.index ? next : l)));
    }
    case "add-layer":
      return withLayers(design, [...layers, action.layer ?? defaultLayer(design, layers.length - 1)]);
    case "insert-layer": {
      const at = Math.max(0, Math.min(layers.length, action.index));
      const layer = action.layer ?? defaultLayer(design, at);
      return withLayers(design, [...layers.slice(0, at), layer, ...layers.slice(at)]);
    }
    case "delete-layer":
      if (!layers[action.index]) return design;
      return withLayers(design, layers.filter((_, i) => i !== action.index));
    case "duplicate-layer": {
      const l = layers[action.index];
      if (!l) return design;
      return withLayers(design, [...layers.slice(0, action.index + 1), { ...l }, ...layers.slice(action.index + 1)]);
    }
    case "move-layer": {
      const to = action.index + action.by;
      const a = layers[action.index];
      const b = layers[to];
      if (!a || !b) return design;
      const next = layers.slice();
      next[action.index] = b;
      next[to] = a;
      return withLayers(design, next);
    }
    case "set-media": {
      const { substrate, ...rest } = action.patch;
      return { ...design, ...rest, substrate: { ...design.substrate, ...substrate } };
    }
    case "replace":
      return action.design;
    default:
      return design;
  }
}

export function editorReducer(state: EditorState, action: EditorAction): EditorState {
  switch (action.type) {
    case "reset":
      return initEditor(action.design);
    case "undo": {
      const prev = state.past[state.past.length - 1];
      if (!prev) return state;
      return { present: prev, past: state.past.slice(0, -1), future: [state.present, ...state.future] };
    }
    case "redo": {
      const next = state.future[0];
      if (!next) return state;
      return { present: next, past: [...state.past, state.present], future: state.future.slice(1) };
    }
    default: {
      const next = apply(state.present, action);
      if (next === state.present) return state;
      return { present: next, past: [...state.past, state.present].slice(-HISTORY_LIMIT), future: [] };
    }
  }
}

/** True when two designs describe the same stack (used for the "unsaved changes" marker). */
export function sameDesign(a: Design, b: Design): boolean {
  return JSON.stringify(a) === JSON.stringify(b);
}
