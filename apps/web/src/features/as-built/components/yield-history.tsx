// Program page: predicted against actual yield of every measured lot over time, and the error model calibrated
// from the fitted parts, offered as a new error model for an approver to adopt.
import { scaleLinear } from "@visx/scale";
import { Line, LinePath } from "@visx/shape";
import { AxisBottom, AxisLeft } from "@visx/axis";
import { Group } from "@visx/group";
import { useAdoptErrorModel, useCalibration, type CalibrationView } from "../api/lots.ts";

const pct = (v: number) => `${v.toFixed(2)} %`;

export function YieldHistory({ programId, canAdopt, width = 640 }: { programId: string; canAdopt: boolean; width?: number }) {
  const cal = useCalibration(programId);
  const adopt = useAdoptErrorModel(programId);
  if (cal.isPending) return <p className="text-sm text-ink-500">Loading measured lots…</p>;
  if (cal.error) return <p role="alert" className="text-sm text-verdict-fail">{cal.error.message}</p>;
  const c = cal.data;
  return (
    <section aria-labelledby="yield-history-h" className="space-y-3">
      <h2 id="yield-history-h" className="text-base font-semibold">As built: predicted and actual yield</h2>
      {c.history.length === 0 ? <p className="text-sm text-ink-500">No measured lots yet.</p> : <HistoryChart history={c.history} width={width} />}
      {c.calibration ? (
        <div className="space-y-1 text-xs text-ink-700" data-testid="calibration">
          <p>
            Calibrated from {c.calibration.parts} fitted parts of {c.calibration.runs} runs (95 % intervals):
          </p>
          <ul className="list-disc pl-5">
            {c.calibration.random ? (
              <li>random per layer: {pct(c.calibration.random.sigmaPct)} ({pct(c.calibration.random.lowPct)}–{pct(c.calibration.random.highPct)}); model now {pct(c.current.thickness.relativePct)}</li>
            ) : null}
            {Object.entries(c.calibration.systematic).map(([m, s]) => (
              <li key={m}>tooling σ {m}: {pct(s.sigmaPct)} ({pct(s.lowPct)}–{pct(s.highPct)}), mean {s.meanPct >= 0 ? "+" : ""}{s.meanPct.toFixed(2)} %</li>
            ))}
            {Object.entries(c.calibration.indexDrift).map(([m, s]) => (
              <li key={m}>index drift σ {m}: {pct(s.sigmaPct)} ({pct(s.lowPct)}–{pct(s.highPct)})</li>
            ))}
          </ul>
          {c.calibration.notes.map((n) => (
            <p key={n} role="note">{n}</p>
          ))}
          {canAdopt ? (
            <button type="button" disabled={adopt.isPending} onClick={() => adopt.mutate(c.calibration!.proposed)} className="rounded border border-ink-300 bg-white px-3 py-1 text-sm">
              {adopt.isPending ? "Adopting…" : "Adopt as the program's error model"}
            </button>
          ) : (
            <p className="text-ink-500">An approver can adopt this as the program’s error model.</p>
          )}
          {adopt.isSuccess ? <p role="status">Adopted. Yield evidence must be re-run under the new error model.</p> : null}
          {adopt.error ? <p role="alert" className="text-verdict-fail">{adopt.error.message}</p> : null}
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
    <svg width={width} height={height} role="img" aria-label="Predicted and actual yield of each measured lot over time" data-testid="yield-history">
      <Group left={mg.left} top={mg.top}>
        <LinePath<number> data={pred} x={(i) => x(t[i]!)} y={(i) => y(history[i]!.summary.predicted!.yield * 100)} stroke="#5a708f" strokeDasharray="4 3" fill="none" />
        {pred.map((i) => (
          <circle key={`p${i}`} cx={x(t[i]!)} cy={y(history[i]!.summary.predicted!.yield * 100)} r={3} fill="#5a708f">
            <title>{`${history[i]!.runId}: predicted ${(history[i]!.summary.predicted!.yield * 100).toFixed(1)} %`}</title>
          </circle>
        ))}
        {act.map((i) => {
          const s = history[i]!.summary;
          return (
            <g key={`a${i}`}>
              {s.interval ? <Line from={{ x: x(t[i]!), y: y(s.interval.low * 100) }} to={{ x: x(t[i]!), y: y(s.interval.high * 100) }} stroke="#d98a2b" strokeWidth={1.5} /> : null}
              <rect x={x(t[i]!) - 3.5} y={y(s.yield! * 100) - 3.5} width={7} height={7} fill="#d98a2b">
                <title>{`${history[i]!.runId}: actual ${(s.yield! * 100).toFixed(1)} % (${s.passed}/${s.evaluated})`}</title>
              </rect>
            </g>
          );
        })}
        <AxisLeft scale={y} numTicks={5} label="Yield (%)" labelOffset={28} tickLabelProps={{ fontSize: 10, fill: "#2c4669", textAnchor: "end", dx: -2, dy: 3 }} labelProps={{ fontSize: 11, fill: "#2c4669", textAnchor: "middle" }} stroke="#5a708f" />
        <AxisBottom top={ih} scale={x} tickValues={days.length > 8 ? undefined : days} numTicks={5} tickFormat={(v) => new Date(Number(v)).toISOString().slice(0, 10)} label="Run date — grey dashed: predicted; amber: actual with 95 % interval" labelOffset={10} tickLabelProps={{ fontSize: 9, fill: "#2c4669", textAnchor: "middle" }} labelProps={{ fontSize: 10, fill: "#2c4669", textAnchor: "middle" }} stroke="#5a708f" />
      </Group>
    </svg>
  );
}
