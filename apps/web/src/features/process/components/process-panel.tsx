// Process comparison panel of the revision workspace: candidate processes (per material a control
// method and its parameters), the monitoring plan per layer, yield side by side, per-layer realised
// errors, and the monitoring traces of one sample build. Computed in a Web Worker (process.worker.ts).
import { memo, useMemo, useState } from "react";
import * as Comlink from "comlink";
import { describeProcess } from "@stackproof/optics";
import type { Control, Design, ErrorModel, MonitoringStep, MonitoringTrace, ProcessComparisonEntry, SpecMask, YieldStudy } from "@stackproof/optics";
import { Button, Notice, SelectField, TextField } from "../../../components/ui/index.ts";
import { useProcessWorker } from "../hooks/use-process-worker.ts";
import { useElementWidth } from "../hooks/use-width.ts";
import {
  defaultCandidates,
  defaultControl,
  defaultPlan,
  materialsOf,
  METHOD_FIELDS,
  METHOD_LABELS,
  toProcess,
  uniformCandidate,
  usesOptical,
} from "../lib/process-form.ts";
import type { Candidate, Method, PlanState } from "../lib/process-form.ts";
import { LayerErrorTable, MonitoringTraceGrid, processColor, YieldComparisonChart } from "./process-charts.tsx";

export interface ProcessPanelProps {
  design: Design;
  mask: SpecMask;
  /** the program's error model: its index terms apply to every process; it is the "independent" candidate */
  errorModel: ErrorModel;
  defaults: { trials: number; seed: string };
  targetYield: number;
}

type Run =
  | { state: "idle" }
  | { state: "running"; done: number; total: number }
  | { state: "done"; entries: ProcessComparisonEntry[]; study: YieldStudy }
  | { state: "error"; message: string }
  | { state: "cancelled" };

type Traces = { state: "idle" } | { state: "running" } | { state: "done"; candidate: string; traces: MonitoringTrace[] } | { state: "error"; message: string };

const num = (v: string, fallback: number) => {
  const x = Number(v);
  return Number.isFinite(x) ? x : fallback;
};

export const ProcessPanel = memo(function ProcessPanel(props: ProcessPanelProps) {
  const { design } = props;
  const [candidates, setCandidates] = useState<Candidate[]>(() => defaultCandidates(design));
  const [plan, setPlan] = useState<PlanState>(() => defaultPlan(design));
  const [trials, setTrials] = useState(() => Math.min(2000, props.defaults.trials));
  const [run, setRun] = useState<Run>({ state: "idle" });
  const [traces, setTraces] = useState<Traces>({ state: "idle" });
  const [ref, width] = useElementWidth<HTMLElement>(720);
  const worker = useProcessWorker();
  const materials = materialsOf(design);
  // the plan follows the design when its layer count changes
  const planState: PlanState = useMemo(
    () => (plan.steps.length === design.layers.length ? plan : { ...plan, steps: defaultPlan(design).steps }),
    [plan, design],
  );
  const steps = planState.steps;
  const anyOptical = candidates.some((c) => !c.independent && Object.values(c.controls).some((x) => x.method === "optical"));

  const processes = useMemo(() => candidates.map((c) => toProcess(c, planState, design)), [candidates, planState, design]);
  const descriptions = useMemo(
    () =>
      processes.map((p) => {
        try {
          return p ? describeProcess(p) : describeProcess(props.errorModel);
        } catch {
          return "";
        }
      }),
    [processes, props.errorModel],
  );

  const update = (id: string, f: (c: Candidate) => Candidate) => setCandidates((cs) => cs.map((c) => (c.id === id ? f(c) : c)));
  const setStep = (j: number, patch: Partial<MonitoringStep>) =>
    setPlan({ ...planState, steps: steps.map((s, k) => (k === j ? { ...s, ...patch } : s)) });

  const start = async () => {
    const base: ErrorModel = { ...props.errorModel };
    delete base.process;
    const study: YieldStudy = { design, mask: props.mask, errorModel: base, trials, seed: props.defaults.seed, envelopeSamples: 0 };
    const handle = worker.start();
    setRun({ state: "running", done: 0, total: trials * processes.length });
    setTraces({ state: "idle" });
    try {
      const entries = await Promise.race([
        handle.api.compare(study, processes, Comlink.proxy((done: number, total: number) => {
          if (!handle.disposed()) setRun({ state: "running", done, total });
        })),
        handle.cancelled,
      ]);
      setRun({ state: "done", entries, study });
      handle.dispose();
      const firstOptical = entries.findIndex((e) => usesOptical(e.errorModel));
      if (firstOptical >= 0) void showTraces(entries[firstOptical] as ProcessComparisonEntry, study);
    } catch (e) {
      if (e instanceof DOMException && e.name === "AbortError") setRun({ state: "cancelled" });
      else setRun({ state: "error", message: e instanceof Error ? e.message : String(e) });
    }
  };

  const showTraces = async (entry: ProcessComparisonEntry, study: YieldStudy) => {
    setTraces({ state: "running" });
    const handle = worker.start();
    try {
      const out = await Promise.race([handle.api.traces(design, entry.errorModel, study.seed, 0), handle.cancelled]);
      setTraces({ state: "done", candidate: entry.label, traces: out.traces });
    } catch (e) {
      setTraces(e instanceof DOMException && e.name === "AbortError" ? { state: "idle" } : { state: "error", message: e instanceof Error ? e.message : String(e) });
    } finally {
      handle.dispose();
    }
  };

  const running = run.state === "running";
  return (
    <section aria-labelledby="process-h" className="space-y-4" ref={ref}>
      <div>
        <h2 id="process-h" className="text-base font-semibold">
          Process comparison
        </h2>
        <p className="text-xs text-ink-600">
          Yield of this design under the way the chamber controls each layer: time, quartz crystal or optical monitoring (each layer grown on the stack as
          actually built). The program's index drift and noise apply to every process.
        </p>
      </div>

      <div className="grid gap-3" style={{ gridTemplateColumns: `repeat(${Math.max(1, Math.min(candidates.length, Math.floor(width / 300)))}, minmax(0, 1fr))` }}>
        {candidates.map((c, i) => (
          <fieldset key={c.id} className="space-y-2 rounded-lg border border-ink-100 p-3" data-testid="process-candidate">
            <legend className="px-1 text-sm font-medium" style={{ color: processColor(i) }}>
              Process {i + 1}
            </legend>
            <TextField label="Name" value={c.label} onChange={(e) => update(c.id, (x) => ({ ...x, label: e.target.value }))} />
            {c.independent ? (
              <p className="text-xs text-ink-600">The program's independent-error model.</p>
            ) : (
              materials.map((m) => {
                const ctl = c.controls[m] ?? defaultControl("crystal");
                return (
                  <div key={m} className="space-y-1 rounded-md bg-paper/60 p-2">
                    <SelectField
                      label={`${m}: control`}
                      value={ctl.method}
                      options={(Object.keys(METHOD_LABELS) as Method[]).map((k) => ({ value: k, label: METHOD_LABELS[k] }))}
                      onChange={(e) => update(c.id, (x) => ({ ...x, controls: { ...x.controls, [m]: defaultControl(e.target.value as Method) } }))}
                    />
                    <div className="grid grid-cols-2 gap-1">
                      {METHOD_FIELDS[ctl.method].map((f) => (
                        <TextField
                          key={f.key}
                          label={`${f.label} (${f.unit})`}
                          type="number"
                          step={f.step}
                          min={f.key === "overshootNm" ? undefined : 0}
                          value={String((ctl as unknown as Record<string, number>)[f.key] ?? 0)}
                          onChange={(e) =>
                            update(c.id, (x) => ({
                              ...x,
                              controls: { ...x.controls, [m]: { ...ctl, [f.key]: num(e.target.value, 0) } as Control },
                            }))
                          }
                        />
                      ))}
                    </div>
                  </div>
                );
              })
            )}
            {c.independent ? null : (
              <div className="grid grid-cols-3 gap-1">
                <TextField
                  label="Uniformity a (1/mm²)"
                  hint="thickness ∝ 1 + a·r², calibrated at the centre; 0 = uniform"
                  type="number"
                  step={1e-6}
                  value={String(c.plate.a)}
                  onChange={(e) => update(c.id, (x) => ({ ...x, plate: { ...x.plate, a: num(e.target.value, 0) } }))}
                />
                <TextField label="Parts from r (mm)" type="number" min={0} value={String(c.plate.minMm)} onChange={(e) => update(c.id, (x) => ({ ...x, plate: { ...x.plate, minMm: Math.max(0, num(e.target.value, 0)) } }))} />
                <TextField label="to r (mm)" type="number" min={0} value={String(c.plate.maxMm)} onChange={(e) => update(c.id, (x) => ({ ...x, plate: { ...x.plate, maxMm: Math.max(0, num(e.target.value, 0)) } }))} />
              </div>
            )}
            <p className="text-xs text-ink-600" data-testid="process-description">
              {descriptions[i]}
            </p>
            {candidates.length > 1 ? (
              <Button variant="ghost" size="sm" onClick={() => setCandidates((cs) => cs.filter((x) => x.id !== c.id))}>
                Remove
              </Button>
            ) : null}
          </fieldset>
        ))}
      </div>
      <div className="flex flex-wrap items-end gap-2">
        {candidates.length < 6 ? (
          <>
            <Button variant="secondary" size="sm" onClick={() => setCandidates((cs) => [...cs, uniformCandidate(design, "time", "Time / rate")])}>
              Add time control
            </Button>
            <Button variant="secondary" size="sm" onClick={() => setCandidates((cs) => [...cs, uniformCandidate(design, "optical", "Optical monitoring")])}>
              Add optical monitoring
            </Button>
          </>
        ) : null}
      </div>

      {anyOptical ? (
        <details className="rounded-lg border border-ink-100 p-3" open={design.layers.length <= 30}>
          <summary className="cursor-pointer text-sm font-medium">Monitoring plan ({steps.filter((s) => s.criterion === "turning").length} turning points, {steps.filter((s) => s.criterion === "level").length} levels)</summary>
          <div className="mt-2 flex flex-wrap items-end gap-3">
            <TextField
              label="Witness chip changed every (layers)"
              type="number"
              min={1}
              value={String(planState.witnessEvery)}
              onChange={(e) => setPlan({ ...planState, witnessEvery: Math.max(1, Math.round(num(e.target.value, 4))) })}
              wrapperClassName="w-56"
            />
            <Button variant="ghost" size="sm" onClick={() => setPlan(defaultPlan(design))}>
              Reset to the design's defaults
            </Button>
          </div>
          <div className="mt-2 max-h-72 overflow-auto">
            <table className="w-full text-xs" data-testid="monitoring-plan">
              <caption className="sr-only">Monitoring plan per layer, used for layers under optical monitoring</caption>
              <thead className="sticky top-0 bg-white text-left text-ink-700">
                <tr>
                  <th scope="col" className="px-1">Layer</th>
                  <th scope="col" className="px-1">Wavelength (nm)</th>
                  <th scope="col" className="px-1">Monitored on</th>
                  <th scope="col" className="px-1">Cut</th>
                </tr>
              </thead>
              <tbody>
                {steps.map((s, j) => (
                  <tr key={j}>
                    <th scope="row" className="px-1 text-left font-normal">{`L${j + 1} ${design.layers[j]?.material ?? ""}`}</th>
                    <td className="px-1">
                      <input aria-label={`Layer ${j + 1} monitoring wavelength, nm`} type="number" min={1} className="w-24 rounded border border-ink-200 px-1" value={s.wavelength} onChange={(e) => setStep(j, { wavelength: Math.max(1, num(e.target.value, s.wavelength)) })} />
                    </td>
                    <td className="px-1">
                      <select aria-label={`Layer ${j + 1} monitored on`} className="rounded border border-ink-200" value={s.on} onChange={(e) => setStep(j, { on: e.target.value as "part" | "witness" })}>
                        <option value="part">part</option>
                        <option value="witness">witness chip</option>
                      </select>
                    </td>
                    <td className="px-1">
                      <select aria-label={`Layer ${j + 1} cut criterion`} className="rounded border border-ink-200" value={s.criterion} onChange={(e) => setStep(j, { criterion: e.target.value as "turning" | "level" })}>
                        <option value="turning">turning point</option>
                        <option value="level">level</option>
                      </select>
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        </details>
      ) : null}

      <div className="flex flex-wrap items-end gap-3">
        <TextField label="Trials per process" type="number" min={100} max={200000} value={String(trials)} onChange={(e) => setTrials(Math.max(100, Math.min(200000, Math.round(num(e.target.value, 2000)))))} wrapperClassName="w-44" />
        <p className="pb-2 text-xs text-ink-600">Seed {props.defaults.seed}</p>
        {running ? (
          <Button variant="secondary" onClick={() => worker.stop()}>
            Cancel
          </Button>
        ) : (
          <Button onClick={() => void start()} data-testid="run-process-comparison">
            Compare processes
          </Button>
        )}
      </div>
      {run.state === "running" ? (
        <div className="flex items-center gap-3 text-xs text-ink-700" data-testid="process-progress">
          <progress className="h-2 flex-1 accent-film-teal" max={run.total} value={run.done} aria-label="Trials simulated" />
          <span className="tabular" aria-live="polite">{`${run.done} / ${run.total} trials`}</span>
        </div>
      ) : null}
      {run.state === "cancelled" ? <Notice tone="info">Comparison cancelled.</Notice> : null}
      {run.state === "error" ? <Notice tone="error" title="The comparison could not run">{run.message}</Notice> : null}
      {run.state === "done" ? (
        <div className="space-y-4" data-testid="process-results">
          <YieldComparisonChart entries={run.entries} target={props.targetYield} width={Math.max(320, width)} />
          <p className="text-xs text-ink-600">
            {`${run.study.trials} trials per process, seed ${run.study.seed}. Bars: yield; black line: 95 % Wilson interval; dashed red: the program's target.`}
          </p>
          <h3 className="text-sm font-semibold">Realised thickness error per layer</h3>
          <LayerErrorTable entries={run.entries} />
          <h3 className="text-sm font-semibold">Monitoring traces of one sample build</h3>
          <div className="flex flex-wrap gap-2">
            {run.entries.map((e, i) =>
              usesOptical(e.errorModel) ? (
                <Button key={i} size="sm" variant="secondary" onClick={() => void showTraces(e, run.study)}>
                  {`Traces: ${e.label}`}
                </Button>
              ) : null,
            )}
          </div>
          {traces.state === "running" ? <p className="text-xs text-ink-600">Simulating the build…</p> : null}
          {traces.state === "error" ? <Notice tone="error">{traces.message}</Notice> : null}
          {traces.state === "done" ? (
            <div className="space-y-1">
              <p className="text-xs text-ink-600">
                {`${traces.candidate}, build 0 of the seed: signal (%) against deposited thickness (nm) per monitored layer; dashed grey: the nominal signal; red dot: where the cut fired; dashed red: final thickness after overshoot; amber: level trigger; grey line: nominal thickness.`}
              </p>
              <MonitoringTraceGrid traces={traces.traces} width={Math.max(320, width)} />
            </div>
          ) : null}
        </div>
      ) : null}
    </section>
  );
});
