// Program page: predicted against actual yield of every measured lot over time, and the error model calibrated
// from the fitted parts, offered as a new error model for an approver to adopt.
import { scaleLinear } from "@visx/scale";
import { Line, LinePath } from "@visx/shape";
import { AxisBottom, AxisLeft } from "@visx/axis";
import { Group } from "@visx/group";
import type { ProcessCalibration, ProcessParameterEstimate } from "@stackproof/optics";
import { useAdoptErrorModel, useCalibration, type CalibrationView } from "../api/lots.ts";

const pct = (v: number) => `${v.toFixed(2)} %`;

const PARAMETER_NAMES: Record<ProcessParameterEstimate["parameter"], string> = {
  toolingPct: "tooling σ (per run)",
  noisePct: "crystal noise σ (per layer)",
  rateErrorPct: "rate error σ (per run)",
  rateDriftPct: "rate drift σ",
  driftCorrelation: "drift correlation ρ (layer to layer)",
  withinLayerPct: "within-layer σ",
  opticalScale: "optical noise scale (× the model's spreads)",
};

/** A process parameter's value in its unit: ρ and the optical scale are plain numbers, the rest percent. */
const value = (p: ProcessParameterEstimate, v: number) =>
  p.parameter === "driftCorrelation" || p.parameter === "opticalScale" ? v.toFixed(2) : pct(v);

/** The program's process model calibrated: each identifiable parameter with its interval next to the model's value. */
function ProcessCalibrationView({ process }: { process: ProcessCalibration }) {
  const off = process.layers.filter((l) => !l.consistent);
  return (
    <div className="space-y-1" data-testid="process-calibration">
      <p>Process model, calibrated from {process.runs} runs (95 % intervals):</p>
      {process.parameters.length > 0 ? (
        <table className="border-collapse text-left" aria-label="Calibrated process parameters">
          <thead>
            <tr className="text-ink-500">
              <th className="pr-3 font-medium">Parameter</th>
              <th className="pr-3 font-medium">Material</th>
              <th className="pr-3 font-medium">Estimate (interval)</th>
              <th className="pr-3 font-medium">Model now</th>
              <th className="pr-3 font-medium">Interval</th>
            </tr>
          </thead>
          <tbody>
            {process.parameters.map((p) => (
              <tr key={`${p.material ?? "all"}-${p.parameter}`} data-consistent={p.consistent}>
                <td className="pr-3">{PARAMETER_NAMES[p.parameter]}</td>
                <td className="pr-3">{p.material ?? "all"}</td>
                <td className="pr-3 font-mono">
                  {value(p, p.value)} ({value(p, p.low)}–{value(p, p.high)})
                </td>
                <td className={`pr-3 font-mono ${p.consistent ? "" : "text-verdict-fail"}`}>
                  {value(p, p.current)}
                  {p.consistent ? "" : " — outside"}
                </td>
                <td className="pr-3 text-ink-500">
                  {p.interval}
                  {p.dof !== undefined ? `, ν = ${p.dof}` : ""}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      ) : null}
      {process.layers.length > 0 ? (
        <p>
          Optical monitoring: {process.layers.length - off.length} of {process.layers.length} layers’ realised
          σ agree with the model
          {off.length > 0
            ? `; outside: ${off.map((l) => `layer ${l.layer + 1} (${l.material}) ${pct(l.realisedPct)} (${pct(l.lowPct)}–${pct(l.highPct)}) against ${pct(l.predictedPct)}`).join("; ")}`
            : ""}
          .
        </p>
      ) : null}
      {process.notes.map((n) => (
        <p key={n} role="note">
          {n}
        </p>
      ))}
    </div>
  );
}

export function YieldHistory({
  programId,
  canAdopt,
  width = 640,
}: {
  programId: string;
  canAdopt: boolean;
  width?: number;
}) {
  const cal = useCalibration(programId);
  const adopt = useAdoptErrorModel(programId);
  if (cal.isPending) return <p className="text-sm text-ink-500">Loading measured lots…</p>;
  if (cal.error)
    return (
      <p role="alert" className="text-sm text-verdict-fail">
        {cal.error.message}
      </p>
    );
  const c = cal.data;
  return (
    <section aria-labelledby="yield-history-h" className="space-y-3">
      <h2 id="yield-history-h" className="text-base font-semibold">
        As built: predicted and actual yield
      </h2>
      {c.history.length === 0 ? (
        <p className="text-sm text-ink-500">No measured lots yet.</p>
      ) : (
        <HistoryChart history={c.history} width={width} />
      )}
      {c.calibration ? (
        <div className="space-y-1 text-xs text-ink-700" data-testid="calibration">
          <p>
            Calibrated from {c.calibration.parts} fitted parts of {c.calibration.runs} runs (95 % intervals):
          </p>
          <ul className="list-disc pl-5">
            {c.calibration.random ? (
              <li>
                random per layer: {pct(c.calibration.random.sigmaPct)} ({pct(c.calibration.random.lowPct)}–
                {pct(c.calibration.random.highPct)}); model now {pct(c.current.thickness.relativePct)}
              </li>
            ) : null}
            {Object.entries(c.calibration.systematic).map(([m, s]) => (
              <li key={m}>
                tooling σ {m}: {pct(s.sigmaPct)} ({pct(s.lowPct)}–{pct(s.highPct)}), mean{" "}
                {s.meanPct >= 0 ? "+" : ""}
                {s.meanPct.toFixed(2)} %
              </li>
            ))}
            {Object.entries(c.calibration.indexDrift).map(([m, s]) => (
              <li key={m}>
                index drift σ {m}: {pct(s.sigmaPct)} ({pct(s.lowPct)}–{pct(s.highPct)})
              </li>
            ))}
          </ul>
          {c.calibration.notes.map((n) => (
            <p key={n} role="note">
              {n}
            </p>
          ))}
          {c.calibration.process ? <ProcessCalibrationView process={c.calibration.process} /> : null}
          {canAdopt ? (
            <div className="flex flex-wrap gap-2">
              {c.calibration.process?.proposed ? (
                <button
                  type="button"
                  disabled={adopt.isPending}
                  onClick={() => adopt.mutate(c.calibration!.process!.proposed!)}
                  className="rounded border border-ink-300 bg-white px-3 py-1 text-sm"
                >
                  {adopt.isPending ? "Adopting…" : "Adopt the calibrated process model"}
                </button>
              ) : null}
              <button
                type="button"
                disabled={adopt.isPending}
                onClick={() => adopt.mutate(c.calibration!.proposed)}
                className="rounded border border-ink-300 bg-white px-3 py-1 text-sm"
              >
                {adopt.isPending
                  ? "Adopting…"
                  : c.current.process
                    ? "Adopt independent errors instead (drops the process model)"
                    : "Adopt as the program's error model"}
              </button>
            </div>
          ) : (
            <p className="text-ink-500">An approver can adopt this as the program’s error model.</p>
          )}
          {adopt.isSuccess ? (
            <p role="status">Adopted. Yield evidence must be re-run under the new error model.</p>
          ) : null}
          {adopt.error ? (
            <p role="alert" className="text-verdict-fail">
              {adopt.error.message}
            </p>
          ) : null}
        </div>
      ) : (
        <p className="text-xs text-ink-500">Fit measured parts to calibrate the error model.</p>
      )}
    </section>
  );
}

function HistoryChart({ history, width }: { history: CalibrationView["history"]; width: number }) {
  const mg = { top: 10, right: 16, bottom: 40, left: 44 };
  const height = 200;
  const iw = Math.max(10, width - mg.left - mg.right);
  const ih = height - mg.top - mg.bottom;
  const t = history.map((h) => Date.parse(h.runDate));
  const t0 = Math.min(...t);
  const t1 = Math.max(...t);
  const x = scaleLinear<number>({ domain: t0 === t1 ? [t0 - 864e5, t1 + 864e5] : [t0, t1], range: [0, iw] });
  const y = scaleLinear<number>({ domain: [0, 100], range: [ih, 0] });
  const idx = history.map((_, i) => i);
  // one tick per run date while they fit; sub-day ticks would repeat the same date
  const days = [...new Set(t)].sort((a, b) => a - b);
  const pred = idx.filter((i) => history[i]!.summary.predicted);
  const act = idx.filter((i) => history[i]!.summary.yield !== null);
  return (
    <svg
      width={width}
      height={height}
      role="img"
      aria-label="Predicted and actual yield of each measured lot over time"
      data-testid="yield-history"
    >
      <Group left={mg.left} top={mg.top}>
        <LinePath<number>
          data={pred}
          x={(i) => x(t[i]!)}
          y={(i) => y(history[i]!.summary.predicted!.yield * 100)}
          stroke="#5a708f"
          strokeDasharray="4 3"
          fill="none"
        />
        {pred.map((i) => (
          <circle
            key={`p${i}`}
            cx={x(t[i]!)}
            cy={y(history[i]!.summary.predicted!.yield * 100)}
            r={3}
            fill="#5a708f"
          >
            <title>{`${history[i]!.runId}: predicted ${(history[i]!.summary.predicted!.yield * 100).toFixed(1)} %`}</title>
          </circle>
        ))}
        {act.map((i) => {
          const s = history[i]!.summary;
          return (
            <g key={`a${i}`}>
              {s.interval ? (
                <Line
                  from={{ x: x(t[i]!), y: y(s.interval.low * 100) }}
                  to={{ x: x(t[i]!), y: y(s.interval.high * 100) }}
                  stroke="#d98a2b"
                  strokeWidth={1.5}
                />
              ) : null}
              <rect x={x(t[i]!) - 3.5} y={y(s.yield! * 100) - 3.5} width={7} height={7} fill="#d98a2b">
                <title>{`${history[i]!.runId}: actual ${(s.yield! * 100).toFixed(1)} % (${s.passed}/${s.evaluated})`}</title>
              </rect>
            </g>
          );
        })}
        <AxisLeft
          scale={y}
          numTicks={5}
          label="Yield (%)"
          labelOffset={28}
          tickLabelProps={{ fontSize: 10, fill: "#2c4669", textAnchor: "end", dx: -2, dy: 3 }}
          labelProps={{ fontSize: 11, fill: "#2c4669", textAnchor: "middle" }}
          stroke="#5a708f"
        />
        <AxisBottom
          top={ih}
          scale={x}
          tickValues={days.length > 8 ? undefined : days}
          numTicks={5}
          tickFormat={(v) => new Date(Number(v)).toISOString().slice(0, 10)}
          label="Run date — grey dashed: predicted; amber: actual with 95 % interval"
          labelOffset={10}
          tickLabelProps={{ fontSize: 9, fill: "#2c4669", textAnchor: "middle" }}
          labelProps={{ fontSize: 10, fill: "#2c4669", textAnchor: "middle" }}
          stroke="#5a708f"
        />
      </Group>
    </svg>
  );
}
