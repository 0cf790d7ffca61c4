// As-built: measured spectra of built coatings against the revision's curve, their difference, a fit (in a
// worker, with progress and cancel) that reports what the measurement can tell, and the lots of measured parts.
import { useMemo, useState, memo } from "react";
import { modelAtMeasurement } from "@stackproof/optics";
import type { BuiltFitResult, Design, ErrorModel, SpecMask } from "@stackproof/optics";
import { scaleLinear } from "@visx/scale";
import { LinePath, Line } from "@visx/shape";
import { AxisBottom, AxisLeft } from "@visx/axis";
import { Group } from "@visx/group";
import { useFitJob } from "../hooks/use-fit-job.ts";
import { FitReport } from "./fit-report.tsx";
import { LotPanel } from "./lot-panel.tsx";
import { SpectrumUploadForm } from "./spectrum-upload-form.tsx";
import { useMeasurements } from "../api/measurements.ts";
import type { MeasuredSpectrum } from "../api/measurements.ts";

export interface MeasuredOverlay {
  id: string;
  label: string;
  quantity: "R" | "T";
  wavelengths: number[];
  values: number[];
  kind: "measured" | "fitted";
}

export interface AsBuiltPanelProps {
  revisionId: string;
  /** the saved revision's stack (measurements belong to a revision, not to unsaved edits) */
  design: Design;
  canUpload: boolean;
  width: number;
  /** the program's error model: the prior of the per-layer fit */
  errorModel?: ErrorModel;
  programId?: string;
  mask?: SpecMask;
  onOverlay: (overlays: MeasuredOverlay[]) => void;
}

function modelValues(design: Design, m: MeasuredSpectrum): number[] | string {
  try {
    return modelAtMeasurement(design, m);
  } catch (e) {
    return e instanceof Error ? e.message : String(e);
  }
}

export const AsBuiltPanel = memo(function AsBuiltPanel(props: AsBuiltPanelProps) {
  const list = useMeasurements(props.revisionId);
  const [selected, setSelected] = useState<string | null>(null);
  const job = useFitJob();
  const [baseline, setBaseline] = useState({ offset: false, shift: false });
  const m = (list.data ?? []).find((x) => x.id === selected) ?? null;
  const model = useMemo(() => (m ? modelValues(props.design, m) : null), [m, props.design]);

  const show = (next: MeasuredSpectrum | null, fitted?: BuiltFitResult) => {
    setSelected(next?.id ?? null);
    if (!next) return props.onOverlay([]);
    const overlays: MeasuredOverlay[] = [
      {
        id: `measured-${next.id}`,
        label: `Measured ${next.quantity}: ${next.label}`,
        quantity: next.quantity,
        wavelengths: next.wavelengths,
        values: next.values,
        kind: "measured",
      },
    ];
    const fv = fitted?.models[fitted.chosen]?.fitted[0];
    if (fv)
      overlays.push({
        id: `fitted-${next.id}`,
        label: `Fitted ${next.quantity}`,
        quantity: next.quantity,
        wavelengths: next.wavelengths,
        values: fv,
        kind: "fitted",
      });
    props.onOverlay(overlays);
  };

  const runFit = async () => {
    if (!m) return;
    const r = await job.run(
      m.id,
      props.design,
      [
        {
          wavelengths: m.wavelengths,
          values: m.values,
          quantity: m.quantity,
          angleDeg: m.angleDeg,
          polarization: m.polarization,
        },
      ],
      {
        ...(props.errorModel ? { errorModel: props.errorModel } : {}),
        baseline: {
          ...(baseline.offset ? { offset: "fit" as const } : {}),
          ...(baseline.shift ? { shiftNm: "fit" as const } : {}),
        },
      },
    );
    if (r) show(m, r);
  };
  const fitted = job.state.s === "done" && job.state.key === m?.id ? job.state.result : null;
  const fittedSpectrum = fitted?.models[fitted.chosen]?.fitted[0] ?? null;

  return (
    <section aria-labelledby="asbuilt-h" className="space-y-3">
      <h2 id="asbuilt-h" className="text-base font-semibold">
        As built
      </h2>
      {list.isPending ? <p className="text-sm text-ink-500">Loading measurements…</p> : null}
      {list.error ? (
        <p role="alert" className="text-sm text-verdict-fail">
          Could not load measurements: {list.error.message}
        </p>
      ) : null}
      {list.data && list.data.length === 0 ? (
        <p className="text-sm text-ink-500">No measured spectra for this revision yet.</p>
      ) : null}
      {list.data && list.data.length > 0 ? (
        <ul className="flex flex-wrap gap-2" aria-label="Measured spectra">
          {list.data.map((x) => (
            <li key={x.id}>
              <button
                type="button"
                aria-pressed={x.id === selected}
                onClick={() => show(x.id === selected ? null : x)}
                className={`rounded border px-2 py-1 text-xs ${x.id === selected ? "border-film-amber bg-film-amber/10" : "border-ink-300 bg-white"}`}
              >
                {x.label} · {x.quantity} · {x.angleDeg}° {x.polarization === "u" ? "unpol." : x.polarization}
              </button>
            </li>
          ))}
        </ul>
      ) : null}
      {m && Array.isArray(model) ? (
        <div className="space-y-2">
          <DifferenceChart m={m} model={model} fitted={fittedSpectrum} width={Math.min(props.width, 620)} />
          <div className="flex flex-wrap items-center gap-3 text-xs">
            <button
              type="button"
              onClick={() => void runFit()}
              disabled={job.state.s === "running"}
              className="rounded bg-ink-900 px-3 py-1.5 text-sm font-semibold text-paper disabled:opacity-40"
            >
              {job.state.s === "running" ? "Fitting in a worker…" : "Fit the built part"}
            </button>
            {job.state.s === "running" ? (
              <>
                <progress max={1} value={job.state.fraction} aria-label="Fit progress" className="w-32" />
                <span>{job.state.stage}</span>
                <button
                  type="button"
                  onClick={job.cancel}
                  className="rounded border border-ink-300 bg-white px-2 py-1"
                >
                  Cancel
                </button>
              </>
            ) : null}
            <label className="flex items-center gap-1">
              <input
                type="checkbox"
                checked={baseline.offset}
                onChange={(e) => setBaseline({ ...baseline, offset: e.target.checked })}
              />
              fit a baseline offset
            </label>
            <label className="flex items-center gap-1">
              <input
                type="checkbox"
                checked={baseline.shift}
                onChange={(e) => setBaseline({ ...baseline, shift: e.target.checked })}
              />
              fit a wavelength shift
            </label>
            {job.state.s === "cancelled" ? <span>Fit cancelled.</span> : null}
          </div>
          {!props.errorModel ? (
            <p className="text-xs text-ink-500">
              Without the program’s error model only the tooling models are fitted.
            </p>
          ) : null}
          {job.state.s === "error" ? (
            <p role="alert" className="text-xs text-verdict-fail">
              {job.state.message}
            </p>
          ) : null}
          {fitted ? (
            <div data-testid="asbuilt-worker-fit">
              <FitReport fit={fitted} width={Math.min(props.width, 620)} />
            </div>
          ) : null}
        </div>
      ) : null}
      {m && typeof model === "string" ? (
        <p role="alert" className="text-xs text-verdict-fail">
          The model cannot be evaluated at the measured wavelengths: {model}
        </p>
      ) : null}
      {props.canUpload ? (
        <SpectrumUploadForm revisionId={props.revisionId} onUploaded={(created) => show(created)} />
      ) : null}
      {props.programId && props.mask ? (
        <LotPanel
          revisionId={props.revisionId}
          programId={props.programId}
          design={props.design}
          canUpload={props.canUpload}
          width={props.width}
        />
      ) : null}
    </section>
  );
});

function DifferenceChart({
  m,
  model,
  fitted,
  width,
}: {
  m: MeasuredSpectrum;
  model: number[];
  fitted: number[] | null;
  width: number;
}) {
  const mg = { top: 8, right: 22, bottom: 44, left: 44 };
  const height = 160;
  const iw = Math.max(10, width - mg.left - mg.right);
  const ih = height - mg.top - mg.bottom;
  const diff = m.values.map((v, i) => v - (model[i] ?? 0));
  const diffFit = fitted ? m.values.map((v, i) => v - (fitted[i] ?? 0)) : null;
  const lim = Math.max(0.5, ...diff.map(Math.abs));
  const x = scaleLinear<number>({
    domain: [m.wavelengths[0] ?? 0, m.wavelengths[m.wavelengths.length - 1] ?? 1],
    range: [0, iw],
  });
  const y = scaleLinear<number>({ domain: [-lim, lim], range: [ih, 0] });
  const idx = m.wavelengths.map((_, i) => i);
  return (
    <svg
      width={width}
      height={height}
      role="img"
      aria-label="Measured minus modelled spectrum"
      data-testid="asbuilt-difference"
    >
      <Group left={mg.left} top={mg.top}>
        <Line from={{ x: 0, y: y(0) }} to={{ x: iw, y: y(0) }} stroke="#a9b6c8" />
        <LinePath<number>
          data={idx}
          x={(i) => x(m.wavelengths[i] ?? 0)}
          y={(i) => y(diff[i] ?? 0)}
          stroke="#d98a2b"
          strokeWidth={1.5}
          fill="none"
        />
        {diffFit ? (
          <LinePath<number>
            data={idx}
            x={(i) => x(m.wavelengths[i] ?? 0)}
            y={(i) => y(diffFit[i] ?? 0)}
            stroke="#1f7f7a"
            strokeWidth={1.2}
            strokeDasharray="4 3"
            fill="none"
          />
        ) : null}
        <AxisLeft
          scale={y}
          numTicks={4}
          label={`Δ${m.quantity} (%)`}
          labelOffset={26}
          tickLabelProps={{ fontSize: 10, fill: "#2c4669", textAnchor: "end", dx: -2, dy: 3 }}
          labelProps={{ fontSize: 11, fill: "#2c4669", textAnchor: "middle" }}
          stroke="#5a708f"
        />
        <AxisBottom
          top={ih}
          scale={x}
          numTicks={6}
          label="Wavelength (nm) — amber: measured − design, teal dashed: measured − fit"
          labelOffset={8}
          tickLabelProps={{ fontSize: 10, fill: "#2c4669", textAnchor: "middle" }}
          labelProps={{ fontSize: 10, fill: "#2c4669", textAnchor: "middle" }}
          stroke="#5a708f"
        />
      </Group>
    </svg>
  );
}
