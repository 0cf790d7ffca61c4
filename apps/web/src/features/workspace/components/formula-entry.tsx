// Build the layer stack from a formula such as "(HL)^8 H": a material per letter, QWOTs at λ0. The
// parsing and the QWOT → thickness conversion are the optics package's (designFromFormula); this only
// collects the inputs and shows where in the formula an error is.
import { useId, useMemo, useState } from "react";
import type { Dispatch } from "react";
import { designFromFormula, type Design, type Material } from "@stackproof/optics";
import type { EditorAction } from "../lib/editor-state.ts";
import type { MaterialOption } from "../lib/materials.ts";

const field = "mt-0.5 w-full rounded border border-ink-300 bg-white px-2 py-1 text-sm";
const btn =
  "rounded border border-ink-300 bg-white px-2 py-1 text-xs font-medium text-ink-800 hover:bg-paper-deep disabled:cursor-not-allowed disabled:opacity-40";

const DEFAULTS: Record<string, string[]> = {
  H: ["TiO2", "Ta2O5", "Nb2O5"],
  L: ["SiO2", "MgF2"],
  M: ["Al2O3"],
};

/** Distinct letters of a formula, in order of first appearance (whatever the formula's validity). */
function lettersOf(formula: string): string[] {
  return [...new Set(formula.match(/[A-Za-z]/g) ?? [])];
}

/** The 1-based column an optics RangeError names, if any. */
function errorColumn(message: string): number | null {
  const m = /column (\d+)/.exec(message);
  return m ? Number(m[1]) : null;
}

export function FormulaEntry({
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
  const [formula, setFormula] = useState("(HL)^4 H");
  const [lambda0, setLambda0] = useState(String(design.referenceWavelength));
  const [chosen, setChosen] = useState<Record<string, string>>({});
  const [result, setResult] = useState<{ error: string | null; message: string | null }>({
    error: null,
    message: null,
  });
  const layerMaterials = useMemo(
    () => materials.filter((m) => m.role === "layer" || m.role === "metal"),
    [materials],
  );
  const letters = lettersOf(formula);

  const materialFor = (letter: string): string => {
    const pick = chosen[letter];
    if (pick) return pick;
    const preferred = (DEFAULTS[letter.toUpperCase()] ?? []).find((idm) =>
      layerMaterials.some((m) => m.id === idm),
    );
    return preferred ?? layerMaterials[0]?.id ?? "";
  };

  const build = () => {
    const mapping: Record<string, string> = {};
    for (const l of letters) mapping[l] = materialFor(l);
    const lam = Number(lambda0);
    try {
      if (!(lam > 0) || !Number.isFinite(lam))
        throw new RangeError(`λ0: expected a wavelength > 0 nm, got ${lambda0 || "nothing"}`);
      const used = new Set(Object.values(mapping));
      const custom: Material[] = [...(design.materials ?? [])];
      for (const o of materials) {
        if (!o.builtIn && used.has(o.id) && !custom.some((m) => m.id === o.id)) {
          custom.push({ id: o.id, name: o.name, role: o.role, source: o.source, model: o.model });
        }
      }
      const built = designFromFormula({
        name: design.name,
        formula,
        materials: mapping,
        referenceWavelength: lam,
        substrate: design.substrate,
        incident: design.incident,
        exit: design.exit,
        ...(custom.length > 0 ? { customMaterials: custom } : {}),
      });
      dispatch({ type: "replace", design: built });
      setResult({
        error: null,
        message: `Built ${built.layers.length} layers at λ0 = ${lam} nm. Undo restores the previous stack.`,
      });
    } catch (e) {
      setResult({ error: e instanceof Error ? e.message : String(e), message: null });
    }
  };

  const col = result.error ? errorColumn(result.error) : null;
  return (
    <details className="rounded-md border border-ink-100 p-3 text-xs text-ink-700">
      <summary className="cursor-pointer text-xs font-semibold text-ink-800">Build from a formula</summary>
      <fieldset className="mt-2 grid gap-2" disabled={readOnly}>
        <p className="text-ink-500">
          Letters are quarter waves at λ0, a number before a letter or group multiplies it, ^n repeats it:
          <span className="font-mono"> (HL)^8 H</span>, <span className="font-mono">(0.5L H 0.5L)^7</span>.
          The first letter is the first layer on the substrate. The stack replaces the current layers.
        </p>
        <div className="grid grid-cols-[1fr_8rem] gap-3">
          <label htmlFor={`${id}-f`}>
            Formula
            <input
              id={`${id}-f`}
              className={`${field} font-mono`}
              value={formula}
              spellCheck={false}
              aria-invalid={result.error !== null}
              aria-describedby={result.error ? `${id}-err` : undefined}
              onChange={(e) => {
                setFormula(e.target.value);
                setResult({ error: null, message: null });
              }}
              onKeyDown={(e) => {
                if (e.key === "Enter") {
                  e.preventDefault();
                  build();
                }
              }}
            />
          </label>
          <label htmlFor={`${id}-l0`}>
            λ0 (nm)
            <input
              id={`${id}-l0`}
              type="number"
              min={1}
              className={`${field} font-mono`}
              value={lambda0}
              onChange={(e) => setLambda0(e.target.value)}
            />
          </label>
        </div>
        {letters.length > 0 ? (
          <div className="flex flex-wrap gap-3">
            {letters.map((l) => (
              <label key={l} htmlFor={`${id}-m-${l}`} className="w-40">
                <span className="font-mono font-semibold">{l}</span> is
                <select
                  id={`${id}-m-${l}`}
                  className={field}
                  value={materialFor(l)}
                  onChange={(e) => setChosen((c) => ({ ...c, [l]: e.target.value }))}
                >
                  {layerMaterials.map((m) => (
                    <option key={m.id} value={m.id}>
                      {m.id}
                    </option>
                  ))}
                </select>
              </label>
            ))}
          </div>
        ) : null}
        <div>
          <button type="button" className={btn} onClick={build}>
            Build stack
          </button>
        </div>
        {result.error ? (
          <div id={`${id}-err`} role="alert" className="text-verdict-fail">
            <p>{result.error}</p>
            {col !== null ? (
              <pre className="mt-1 font-mono text-xs" aria-hidden>
                {formula}
                {"\n"}
                {" ".repeat(Math.max(0, col - 1))}^
              </pre>
            ) : null}
          </div>
        ) : null}
        {result.message ? <p role="status">{result.message}</p> : null}
      </fieldset>
    </details>
  );
}
