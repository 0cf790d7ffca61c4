// Tolerance studies: error-model form, Monte Carlo yield in a pool of Web Workers, results, sweep,
// sensitivity map, and verification of the browser result on the server.
import { useRef, useState, memo } from "react";
import type { Design, ErrorModel, SensitivityMap, SpecMask, SweepPoint, YieldResult, YieldStudy } from "@stackproof/optics";
import { runEngineJob, runSweepInPool, runYieldInPool } from "../../../workers/pool.ts";
import type { PoolProgress } from "../../../workers/pool.ts";
import { ErrorModelForm } from "./error-model-form.tsx";
import { CriticalLayers, MarginHistogram, SensitivityHeatmap, SweepChart } from "./study-charts.tsx";
import { VerifyOnServer } from "./verify-on-server.tsx";
import { studyDefaults } from "../lib/study-form.ts";
import type { StudyFormValues } from "../lib/study-form.ts";
import { useElementWidth } from "../lib/use-width.ts";

export interface StudiesPanelProps {
  revisionId: string;
  design: Design;
  mask: SpecMask;
  errorModel: ErrorModel;
  defaults: { trials: number; seed: string };
  targetYield: number;
  /** the editor holds changes not saved as a revision: the server can only verify saved revisions */
  dirty: boolean;
  canVerify: boolean;
  range: { start: number; stop: number };
  onResult: (result: YieldResult | null) => void;
}

type Run =
  | { state: "idle" }
  | { state: "running"; progress: PoolProgress | null }
  | { state: "done"; result: YieldResult; study: YieldStudy; ms: number; stale: boolean }
  | { state: "error"; message: string }
  | { state: "cancelled" };

export function pct(v: number, digits = 1): string {
  return `${(v * 100).toFixed(digits)} %`;
}

function duration(ms: number): string {
  if (ms < 1000) return `${Math.round(ms)} ms`;
  const s = ms / 1000;
  return s < 90 ? `${s.toFixed(1)} s` : `${Math.floor(s / 60)} min ${Math.round(s % 60)} s`;
}

export const StudiesPanel = memo(function StudiesPanel(props: StudiesPanelProps) {
  const [run, setRun] = useState<Run>({ state: "idle" });
  const [sweep, setSweep] = useState<{ state: "idle" } | { state: "running"; done: number; total: number } | { state: "done"; points: SweepPoint[] } | { state: "error"; message: string }>({ state: "idle" });
  const [sens, setSens] = useState<{ state: "idle" } | { state: "running" } | { state: "done"; map: SensitivityMap } | { state: "error"; message: string }>({ state: "idle" });
  const abort = useRef<AbortController | null>(null);
  const [ref, width] = useElementWidth<HTMLDivElement>(640);
  const materials = props.design.layers.map((l) => l.material);
  const unique = [...new Set(materials)].sort();
  const unit = props.mask.bands.every((b) => b.quantity === "OD") ? "OD" : props.mask.bands.some((b) => b.quantity === "OD") ? "% or OD" : "%";

  const start = async (values: StudyFormValues) => {
    abort.current?.abort();
    const ctrl = new AbortController();
    abort.current = ctrl;
    const study: YieldStudy = { design: props.design, mask: props.mask, errorModel: values.errorModel, trials: values.trials, seed: values.seed };
    setRun({ state: "running", progress: null });
    setSweep({ state: "idle" });
    props.onResult(null);
    const t0 = performance.now();
    try {
      const result = await runYieldInPool(study, { signal: ctrl.signal, onProgress: (p) => setRun({ state: "running", progress: p }) });
      setRun({ state: "done", result, study, ms: performance.now() - t0, stale: false });
      props.onResult(result);
    } catch (e) {
      if (ctrl.signal.aborted) setRun({ state: "cancelled" });
      else setRun({ state: "error", message: e instanceof Error ? e.message : String(e) });
    }
  };
  const cancel = () => abort.current?.abort();

  const runSweep = async (study: YieldStudy) => {
    const ctrl = new AbortController();
    abort.current = ctrl;
    const trials = Math.min(study.trials, 1000);
    const scales = [0.25, 0.5, 0.75, 1, 1.25, 1.5, 2, 2.5];
    setSweep({ state: "running", done: 0, total: scales.length });
    try {
      const points = await runSweepInPool({ ...study, trials }, scales, { signal: ctrl.signal, onProgress: (p) => setSweep({ state: "running", done: p.done, total: p.total }) });
      setSweep({ state: "done", points });
    } catch (e) {
      setSweep(ctrl.signal.aborted ? { state: "idle" } : { state: "error", message: e instanceof Error ? e.message : String(e) });
    }
  };

  const runSensitivity = async () => {
    setSens({ state: "running" });
    const first = props.mask.bands[0];
    const n = 120;
    const wavelengths = Array.from({ length: n }, (_, i) => props.range.start + ((props.range.stop - props.range.start) * i) / (n - 1));
    try {
      const map = await runEngineJob((api) =>
        api.sensitivityMap(props.design, {
          wavelengths,
          angleDeg: first?.angleDeg ?? 0,
          polarization: first?.polarization === "sp" || !first ? "u" : first.polarization,
          quantity: first?.quantity === "R" ? "R" : "T",
        }),
      );
      setSens({ state: "done", map });
    } catch (e) {
      setSens({ state: "error", message: e instanceof Error ? e.message : String(e) });
    }
  };

  const progress = run.state === "running" ? run.progress : null;
  const result = run.state === "done" ? run.result : null;
  const meetsTarget = result ? result.interval.low >= props.targetYield : false;
  // Two result columns only when the panel itself is wide enough (it sits in a tab beside or below the editor).
  const twoCols = width >= 900;
  const colW = Math.max(240, Math.min(560, (twoCols ? width / 2 : width) - 16));

  return (
    <section aria-labelledby="studies-h" className="space-y-4" ref={ref}>
      <h2 id="studies-h" className="text-base font-semibold">
        Tolerance study
      </h2>
      <ErrorModelForm
        key={props.revisionId}
        defaultValues={studyDefaults(props.errorModel, props.defaults.trials, props.defaults.seed)}
        onRun={(v) => void start(v)}
        running={run.state === "running"}
        materials={unique}
      />
      {run.state === "running" ? (
        <div className="space-y-1" data-testid="study-progress">
          <div className="flex items-center gap-3 text-xs text-ink-700">
            <progress
              className="h-2 flex-1 accent-film-teal"
              max={progress?.total ?? 1}
              value={progress?.done ?? 0}
              aria-label="Trials simulated"
            />
            <span className="tabular" aria-live="polite">
              {progress ? `${progress.done} / ${progress.total} trials · ${progress.workers} workers` : "Starting workers…"}
              {progress?.remainingMs != null ? ` · about ${duration(progress.remainingMs)} left` : ""}
            </span>
            <button type="button" onClick={cancel} className="rounded border border-verdict-fail px-2 py-0.5 text-xs text-verdict-fail">
              Cancel
            </button>
          </div>
        </div>
      ) : null}
      {run.state === "error" ? (
        <p role="alert" className="text-sm text-verdict-fail">
          The study failed: {run.message}
        </p>
      ) : null}
      {run.state === "cancelled" ? <p className="text-sm text-ink-700">The study was cancelled; nothing was kept.</p> : null}
      {result && run.state === "done" ? (
        <div className="space-y-4">
          <div className="flex flex-wrap items-baseline gap-x-6 gap-y-2" data-testid="browser-yield">
            <div>
              <div className="text-xs text-ink-500">Browser yield</div>
              <div className={`text-3xl font-semibold tabular ${meetsTarget ? "text-verdict-pass" : "text-verdict-fail"}`}>{pct(result.yield)}</div>
            </div>
            <div className="text-sm text-ink-700">
              95 % interval (Wilson) {pct(result.interval.low)} – {pct(result.interval.high)}
              <br />
              {result.passCount} of {result.trials} builds pass · seed “{result.seed}” · {duration(run.ms)}
            </div>
            <div className="text-sm">
              Target {pct(props.targetYield, 0)}:{" "}
              <strong className={meetsTarget ? "text-verdict-pass" : result.interval.high >= props.targetYield ? "text-verdict-warn" : "text-verdict-fail"}>
                {meetsTarget ? "met (whole interval above)" : result.interval.high >= props.targetYield ? "not shown (interval straddles the target)" : "missed"}
              </strong>
            </div>
          </div>
          <YieldBar result={result} target={props.targetYield} />
          {result.cautions.map((c) => (
            <p key={c} className="rounded border border-verdict-warn/40 bg-verdict-warn/5 p-2 text-xs text-verdict-warn">
              {c}
            </p>
          ))}
          <VerifyOnServer
            revisionId={props.revisionId}
            study={run.study}
            clientResult={result}
            disabledReason={props.dirty ? "The stack has unsaved edits: save it as a revision, then run and verify the study on that revision." : !props.canVerify ? "Your role cannot start server runs." : null}
          />
          <div className={`grid gap-4 ${twoCols ? "grid-cols-2" : "grid-cols-1"}`}>
            <div>
              <h3 className="mb-1 text-sm font-semibold">Worst margin of each build</h3>
              <MarginHistogram histogram={result.marginHistogram} width={colW} unit={unit} />
            </div>
            <div>
              <h3 className="mb-1 text-sm font-semibold">Failures per band</h3>
              <table className="w-full text-sm">
                <thead className="text-left text-xs text-ink-500">
                  <tr>
                    <th className="py-1 font-medium">Band</th>
                    <th className="py-1 text-right font-medium">Failing builds</th>
                    <th className="py-1 text-right font-medium">Share</th>
                  </tr>
                </thead>
                <tbody>
                  {result.bandFailures.map((b) => {
                    const band = props.mask.bands.find((x) => x.id === b.id);
                    return (
                      <tr key={b.id} className="border-t border-ink-100">
                        <td className="py-1">{band?.label ?? b.id}</td>
                        <td className="py-1 text-right tabular">{b.count}</td>
                        <td className="py-1 text-right tabular">{pct(b.count / result.trials)}</td>
                      </tr>
                    );
                  })}
                </tbody>
              </table>
              <h3 className="mb-1 mt-4 text-sm font-semibold">Layer criticality</h3>
              <p className="mb-1 text-xs text-ink-500">Correlation of each layer’s thickness error with failure (largest of signed and absolute).</p>
              {result.passCount === 0 || result.passCount === result.trials ? (
                <p className="text-xs text-ink-500">{result.passCount === 0 ? "Every build fails, so no single layer stands out: the nominal design itself needs work." : "Every build passes: no layer drives failures at this process quality."}</p>
              ) : (
                <CriticalLayers layers={result.criticalLayers} width={colW} materials={materials} />
              )}
            </div>
          </div>
          <div className={`grid gap-4 ${twoCols ? "grid-cols-2" : "grid-cols-1"}`}>
            <div>
              <div className="mb-1 flex items-center gap-2">
                <h3 className="text-sm font-semibold">Yield against process quality</h3>
                {sweep.state !== "running" ? (
                  <button type="button" className="rounded border border-ink-300 px-2 py-0.5 text-xs" onClick={() => void runSweep(run.study)}>
                    {sweep.state === "done" ? "Run again" : "Run sweep"}
                  </button>
                ) : (
                  <span className="text-xs text-ink-500" aria-live="polite">
                    {sweep.done}/{sweep.total} scales…
                  </span>
                )}
              </div>
              {sweep.state === "done" ? <SweepChart points={sweep.points} target={props.targetYield} width={colW} /> : null}
              {sweep.state === "error" ? <p role="alert" className="text-xs text-verdict-fail">{sweep.message}</p> : null}
              {sweep.state === "idle" ? <p className="text-xs text-ink-500">Yield with every σ of the error model scaled from ×0.25 to ×2.5 (up to 1000 trials per point, same draws at every scale).</p> : null}
            </div>
          </div>
        </div>
      ) : null}
      <div>
        <div className="mb-1 flex items-center gap-2">
          <h3 className="text-sm font-semibold">Sensitivity map</h3>
          <button type="button" className="rounded border border-ink-300 px-2 py-0.5 text-xs" disabled={sens.state === "running"} onClick={() => void runSensitivity()}>
            {sens.state === "running" ? "Computing…" : sens.state === "done" ? "Recompute for the current stack" : "Compute"}
          </button>
        </div>
        {sens.state === "done" ? <SensitivityHeatmap map={sens.map} width={Math.min(980, width - 8)} materials={materials} /> : null}
        {sens.state === "error" ? <p role="alert" className="text-xs text-verdict-fail">{sens.message}</p> : null}
      </div>
    </section>
  );
});

function YieldBar({ result, target }: { result: YieldResult; target: number }) {
  return (
    <figure className="w-full max-w-xl" aria-label={`Yield ${pct(result.yield)}, 95 % interval ${pct(result.interval.low)} to ${pct(result.interval.high)}, target ${pct(target, 0)}`}>
      <div className="relative h-5 w-full rounded bg-ink-100" aria-hidden>
        <div className="absolute inset-y-0 rounded bg-film-teal-soft" style={{ left: `${result.interval.low * 100}%`, width: `${Math.max(0.5, (result.interval.high - result.interval.low) * 100)}%` }} />
        <div className="absolute inset-y-0 w-0.5 bg-film-teal" style={{ left: `${result.yield * 100}%` }} />
        <div className="absolute -inset-y-1 w-0.5 bg-film-amber" style={{ left: `${target * 100}%` }} title="target" />
      </div>
      <div className="relative mt-0.5 h-3 text-[10px] text-ink-500 tabular" aria-hidden>
        {[0, 0.25, 0.5, 0.75, 1].map((t) => (
          <span key={t} className="absolute whitespace-nowrap" style={{ left: `${t * 100}%`, transform: t === 0 ? undefined : t === 1 ? "translateX(-100%)" : "translateX(-50%)" }}>
            {t * 100} %
          </span>
        ))}
      </div>
      <figcaption className="mt-1 flex flex-wrap gap-x-4 text-xs text-ink-700">
        <span className="flex items-center gap-1.5">
          <span className="inline-block h-3 w-0.5 bg-film-teal" aria-hidden /> yield
        </span>
        <span className="flex items-center gap-1.5">
          <span className="inline-block h-3 w-4 rounded bg-film-teal-soft" aria-hidden /> 95 % interval
        </span>
        <span className="flex items-center gap-1.5">
          <span className="inline-block h-3 w-0.5 bg-film-amber" aria-hidden /> program target
        </span>
      </figcaption>
    </figure>
  );
}
