// Nudge (the local optimizer) from the workspace: nominal (merit of the mask) or yield-centred, in a worker. The result is a
// preview — changed layers before/after and the new curve on the chart — until it is kept as a new revision.
import { useRef, useState, memo } from "react";
import type { Design, ErrorModel, RefineForYieldResult, RefineResult, SpecMask } from "@stackproof/optics";
import { runEngineJob } from "../../../workers/pool.ts";

export interface RefinementPanelProps {
  design: Design;
  mask: SpecMask;
  errorModel: ErrorModel;
  defaults: { trials: number; seed: string };
  onPreview: (design: Design | null) => void;
  onKeep: (design: Design, note: string) => void;
  canKeep: boolean;
  keeping: boolean;
  keepError: string | null;
}

type Outcome = { mode: "nominal"; r: RefineResult } | { mode: "yield"; r: RefineForYieldResult };

const field = "mt-0.5 w-full rounded border border-ink-300 bg-white px-2 py-1 text-sm tabular";

export const RefinementPanel = memo(function RefinementPanel(props: RefinementPanelProps) {
  const [mode, setMode] = useState<"nominal" | "yield">("nominal");
  const [marginGoal, setMarginGoal] = useState("0.1");
  const [iterations, setIterations] = useState("30");
  const [maxChange, setMaxChange] = useState("30");
  const [state, setState] = useState<{ s: "idle" } | { s: "running"; started: number } | { s: "done"; out: Outcome } | { s: "error"; message: string }>({ s: "idle" });
  const abort = useRef<AbortController | null>(null);

  const run = async () => {
    const ctrl = new AbortController();
    abort.current = ctrl;
    setState({ s: "running", started: Date.now() });
    props.onPreview(null);
    const goal = Number(marginGoal);
    const maxIterations = Math.max(1, Math.min(200, Math.round(Number(iterations)) || 30));
    // Each layer stays within ±maxChange % of its current thickness: an unbounded search can grow a layer that is
    // nearly index-matched to its neighbour without limit, which no chamber would deposit.
    const f = Math.max(1, Math.min(100, Number(maxChange) || 30)) / 100;
    const layerBounds = props.design.layers.map((l, index) => ({ index, min: l.thickness * (1 - f), max: l.thickness * (1 + f) }));
    const options = { marginGoal: Number.isFinite(goal) && goal >= 0 ? goal : 0.1, maxIterations, layerBounds };
    try {
      const out: Outcome =
        mode === "nominal"
          ? { mode, r: await runEngineJob((api) => api.refineDesign(props.design, props.mask, options), ctrl.signal) }
          : {
              mode,
              r: await runEngineJob(
                (api) =>
                  api.refineForYield(
                    { design: props.design, mask: props.mask, errorModel: props.errorModel, trials: Math.min(props.defaults.trials, 400), seed: props.defaults.seed },
                    { ...options, maxIterations: Math.min(maxIterations, 15), crnTrials: 32 },
                  ),
                ctrl.signal,
              ),
            };
      setState({ s: "done", out });
      if (out.r.changedLayers.length > 0) props.onPreview(out.r.design);
    } catch (e) {
      setState(ctrl.signal.aborted ? { s: "idle" } : { s: "error", message: e instanceof Error ? e.message : String(e) });
    }
  };

  const discard = () => {
    setState({ s: "idle" });
    props.onPreview(null);
  };

  const note = (o: Outcome): string =>
    o.mode === "nominal"
      ? `Nudged for the nominal merit: ${o.r.changedLayers.length} layer(s) changed, merit ${o.r.meritBefore.toPrecision(3)} → ${o.r.meritAfter.toPrecision(3)}`
      : `Nudged for yield: ${o.r.changedLayers.length} layer(s) changed, yield ${(o.r.yieldBefore * 100).toFixed(1)} % → ${(o.r.yieldAfter * 100).toFixed(1)} % over ${o.r.evaluationTrials} trials`;

  return (
    <section aria-labelledby="refine-h" className="space-y-3">
      <h2 id="refine-h" className="text-base font-semibold">
        Nudge: local optimization of layer thicknesses
      </h2>
      <p className="text-xs text-ink-700">Adjusts the thickness of unlocked layers (material and order stay). Locked layers are kept.</p>
      <div className="flex flex-wrap items-end gap-3 text-xs text-ink-700">
        <fieldset className="flex gap-3">
          <legend className="sr-only">Objective</legend>
          <label className="flex items-center gap-1">
            <input type="radio" name="refine-mode" checked={mode === "nominal"} onChange={() => setMode("nominal")} /> Nominal merit
          </label>
          <label className="flex items-center gap-1">
            <input type="radio" name="refine-mode" checked={mode === "yield"} onChange={() => setMode("yield")} /> Yield (simulated builds)
          </label>
        </fieldset>
        <label className="w-36" title="How far inside each band's limit Nudge aims: percentage points for R and T bands, OD for optical-density bands. Reported merits use the real limits.">
          Margin goal (% pts / OD)
          <input className={field} value={marginGoal} onChange={(e) => setMarginGoal(e.target.value)} inputMode="decimal" />
        </label>
        <label className="w-28">
          Max change (±%)
          <input className={field} value={maxChange} onChange={(e) => setMaxChange(e.target.value)} inputMode="decimal" />
        </label>
        <label className="w-24">
          Iterations
          <input className={field} value={iterations} onChange={(e) => setIterations(e.target.value)} inputMode="numeric" />
        </label>
        {state.s === "running" ? (
          <>
            <span aria-live="polite">Refining in a worker…</span>
            <button type="button" className="rounded border border-verdict-fail px-2 py-1 text-verdict-fail" onClick={() => abort.current?.abort()}>
              Cancel
            </button>
          </>
        ) : (
          <button type="button" onClick={() => void run()} className="rounded bg-ink-900 px-3 py-1.5 text-sm font-semibold text-paper" disabled={props.design.layers.length === 0}>
            Nudge
          </button>
        )}
      </div>
      {state.s === "error" ? <p role="alert" className="text-sm text-verdict-fail">Nudge failed: {state.message}</p> : null}
      {state.s === "done" ? (
        <div className="space-y-2" data-testid="refine-result">
          <p className="text-sm">
            {state.out.mode === "nominal" ? (
              <>
                Merit {state.out.r.meritBefore.toPrecision(3)} → <strong>{state.out.r.meritAfter.toPrecision(3)}</strong> in {state.out.r.iterations} iterations.
              </>
            ) : (
              <>
                Yield {(state.out.r.yieldBefore * 100).toFixed(1)} % → <strong>{(state.out.r.yieldAfter * 100).toFixed(1)} %</strong> ({state.out.r.evaluationTrials} trials), mean merit {state.out.r.meanMeritBefore.toPrecision(3)} → {state.out.r.meanMeritAfter.toPrecision(3)}.
              </>
            )}{" "}
            {state.out.r.changedLayers.length === 0 ? "No layer changed: the start is already as good as this search finds." : "The dashed curve on the chart is the refined stack."}
          </p>
          {state.out.r.changedLayers.length > 0 ? (
            <table className="w-full max-w-lg text-sm" aria-label="Layers changed by Nudge">
              <thead className="text-left text-xs text-ink-500">
                <tr>
                  <th className="py-1 font-medium">Layer</th>
                  <th className="py-1 font-medium">Material</th>
                  <th className="py-1 text-right font-medium">Before (nm)</th>
                  <th className="py-1 text-right font-medium">After (nm)</th>
                  <th className="py-1 text-right font-medium">Δ (nm)</th>
                </tr>
              </thead>
              <tbody>
                {state.out.r.changedLayers.map((c) => (
                  <tr key={c.index} className="border-t border-ink-100">
                    <td className="py-0.5 tabular">{c.index + 1}</td>
                    <td className="py-0.5 font-mono text-xs">{props.design.layers[c.index]?.material}</td>
                    <td className="py-0.5 text-right tabular">{c.before.toFixed(2)}</td>
                    <td className="py-0.5 text-right tabular">{c.after.toFixed(2)}</td>
                    <td className="py-0.5 text-right tabular">{(c.after - c.before > 0 ? "+" : "") + (c.after - c.before).toFixed(2)}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          ) : null}
          <div className="flex gap-2">
            {props.canKeep && state.out.r.changedLayers.length > 0 ? (
              <button type="button" disabled={props.keeping} onClick={() => state.s === "done" && props.onKeep(state.out.r.design, note(state.out))} className="rounded bg-film-teal px-3 py-1.5 text-sm font-semibold text-white disabled:opacity-40">
                {props.keeping ? "Saving…" : "Keep as new revision"}
              </button>
            ) : null}
            <button type="button" onClick={discard} className="rounded border border-ink-300 px-3 py-1.5 text-sm">
              Discard
            </button>
          </div>
          {props.keepError ? <p role="alert" className="text-xs text-verdict-fail">{props.keepError}</p> : null}
        </div>
      ) : null}
    </section>
  );
});
