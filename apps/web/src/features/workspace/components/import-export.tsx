import { useRef, useState } from "react";
import type { Design } from "@stackproof/optics";
import { importDesign } from "../api/import-design.ts";
import { designToCsv, designToJson, downloadText, fileBaseName } from "../lib/export.ts";

const btn = "rounded border border-ink-300 bg-white px-2 py-1 text-xs font-medium text-ink-800 hover:bg-paper-deep disabled:opacity-40";

export function ImportExport({
  design,
  revisionNumber,
  onImported,
  canImport,
}: {
  design: Design;
  revisionNumber?: number;
  onImported: (design: Design, warnings: string[]) => void;
  canImport: boolean;
}) {
  const input = useRef<HTMLInputElement>(null);
  const [state, setState] = useState<{ busy: boolean; message: string | null; error: boolean }>({ busy: false, message: null, error: false });
  const onFile = async (file: File | undefined) => {
    if (!file) return;
    setState({ busy: true, message: null, error: false });
    try {
      const r = await importDesign(file);
      // A CSV holds layers only: keep this design's media, substrate and λ0 (the server filled in defaults).
      const csv = /\.csv$/i.test(file.name) || file.type === "text/csv";
      const next = csv
        ? { ...design, layers: r.stack.layers.map((l) => (l.locked ? l : { material: l.material, thickness: l.thickness })) }
        : r.stack;
      onImported(next, r.warnings);
      const notes = csv ? ["layers replaced; media, substrate and reference wavelength kept"] : r.warnings;
      setState({
        busy: false,
        error: false,
        message: `Imported ${r.stack.layers.length} layers from ${file.name} — ${notes.join("; ")}. Undo restores the previous stack.`,
      });
    } catch (e) {
      setState({ busy: false, error: true, message: `Could not import ${file.name}: ${e instanceof Error ? e.message : String(e)}` });
    } finally {
      if (input.current) input.current.value = "";
    }
  };
  const base = fileBaseName(design, revisionNumber);
  return (
    <div className="flex flex-wrap items-center gap-1.5">
      {canImport ? (
        <>
          <input ref={input} type="file" accept=".csv,.json,text/csv,application/json" className="sr-only" id="design-import" onChange={(e) => void onFile(e.target.files?.[0])} />
          <label htmlFor="design-import" className={`${btn} cursor-pointer`} aria-disabled={state.busy}>
            {state.busy ? "Importing…" : "Import CSV/JSON"}
          </label>
        </>
      ) : null}
      <button type="button" className={btn} onClick={() => downloadText(`${base}.json`, designToJson(design), "application/json")}>
        Export JSON
      </button>
      <button type="button" className={btn} onClick={() => downloadText(`${base}.csv`, designToCsv(design), "text/csv")}>
        Export CSV
      </button>
      {state.message ? (
        <p role={state.error ? "alert" : "status"} className={`w-full text-xs ${state.error ? "text-verdict-fail" : "text-ink-700"}`}>
          {state.message}
        </p>
      ) : null}
    </div>
  );
}
