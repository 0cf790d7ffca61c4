import { useId, useState } from "react";
import type { Dispatch } from "react";
import type { Design } from "@stackproof/optics";
import type { EditorAction } from "../lib/editor-state.ts";
import type { MaterialOption } from "../lib/materials.ts";

const field = "mt-0.5 w-full rounded border border-ink-300 bg-white px-2 py-1 text-sm";

export function MediaSettings({
  design,
  materials,
  dispatch,
  readOnly,
}: {
  design: Design;
  materials: readonly MaterialOption[];
  dispatch: Dispatch<EditorAction>;
  readOnly?: boolean;
}) {
  const id = useId();
  const media = materials.filter((m) => m.role === "medium" || m.role === "substrate");
  const substrates = materials.filter((m) => m.role === "substrate" || m.role === "medium");
  const options = (list: MaterialOption[], current: string) =>
    (list.some((m) => m.id === current) ? list : [...list, { id: current, name: current } as MaterialOption]).map((m) => (
      <option key={m.id} value={m.id}>
        {m.id === m.name ? m.id : `${m.name} (${m.id})`}
      </option>
    ));
  return (
    <fieldset className="grid grid-cols-2 gap-x-3 gap-y-2 rounded-md border border-ink-100 p-3 text-xs text-ink-700 sm:grid-cols-3" disabled={readOnly}>
      <legend className="px-1 text-xs font-semibold text-ink-800">Media and substrate</legend>
      <label htmlFor={`${id}-inc`}>
        Incident medium
        <select id={`${id}-inc`} className={field} value={design.incident} onChange={(e) => dispatch({ type: "set-media", patch: { incident: e.target.value } })}>
          {options(media, design.incident)}
        </select>
      </label>
      <label htmlFor={`${id}-sub`}>
        Substrate
        <select id={`${id}-sub`} className={field} value={design.substrate.material} onChange={(e) => dispatch({ type: "set-media", patch: { substrate: { material: e.target.value } } })}>
          {options(substrates, design.substrate.material)}
        </select>
      </label>
      <label htmlFor={`${id}-thk`}>
        Substrate thickness (mm)
        <DraftNumber
          id={`${id}-thk`}
          value={design.substrate.thicknessMm}
          min={0}
          step={0.1}
          ok={(v) => v >= 0}
          onCommit={(v) => dispatch({ type: "set-media", patch: { substrate: { thicknessMm: v } } })}
        />
      </label>
      <label htmlFor={`${id}-back`} className="flex items-center gap-2 self-end pb-1">
        <input
          id={`${id}-back`}
          type="checkbox"
          checked={design.substrate.backside}
          onChange={(e) => dispatch({ type: "set-media", patch: { substrate: { backside: e.target.checked } } })}
        />
        Count the back surface
      </label>
      <label htmlFor={`${id}-exit`}>
        Exit medium
        <select id={`${id}-exit`} className={field} value={design.exit} onChange={(e) => dispatch({ type: "set-media", patch: { exit: e.target.value } })}>
          {options(media, design.exit)}
        </select>
      </label>
      <label htmlFor={`${id}-ref`}>
        Reference λ0 (nm)
        <DraftNumber
          id={`${id}-ref`}
          value={design.referenceWavelength}
          min={1}
          ok={(v) => v > 0}
          onCommit={(v) => dispatch({ type: "set-media", patch: { referenceWavelength: v } })}
        />
      </label>
    </fieldset>
  );
}

/** A number box that may be cleared and retyped: the value is taken on Enter or when focus leaves, when usable. */
function DraftNumber(props: { id: string; value: number; min: number; step?: number; ok: (v: number) => boolean; onCommit: (v: number) => void }) {
  const [draft, setDraft] = useState<string | null>(null);
  const text = draft ?? String(props.value);
  const n = Number(text.trim().replace(",", "."));
  const bad = draft !== null && (text.trim() === "" || !Number.isFinite(n) || !props.ok(n));
  const take = () => {
    if (draft !== null && !bad && n !== props.value) props.onCommit(n);
    setDraft(null);
  };
  return (
    <input
      id={props.id}
      className={`${field} ${bad ? "border-verdict-fail" : ""}`}
      type="number"
      min={props.min}
      step={props.step ?? "any"}
      value={text}
      aria-invalid={bad ? true : undefined}
      title={bad ? `Not a usable value; leaving the field keeps ${props.value}` : undefined}
      onChange={(e) => setDraft(e.target.value)}
      onKeyDown={(e) => {
        if (e.key === "Enter") {
          e.preventDefault();
          take();
        } else if (e.key === "Escape") setDraft(null);
      }}
      onBlur={take}
    />
  );
}
