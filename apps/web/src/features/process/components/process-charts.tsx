// Result views of the process comparison: yield per process with its Wilson interval and the target,
// per-layer realised error statistics, and the monitoring traces of one sample build. Plain SVG from
// visx primitives; the numbers all come from the optics package.
import { scaleBand, scaleLinear } from "@visx/scale";
import { Bar, Line, LinePath } from "@visx/shape";
import { AxisBottom, AxisLeft } from "@visx/axis";
import { Group } from "@visx/group";
import type { MonitoringTrace, ProcessComparisonEntry } from "@stackproof/optics";

const tick = { fontSize: 10, fill: "#2c4669" } as const;
const PALETTE = ["#5a708f", "#d98a2b", "#1f7f7a", "#8a4fb3", "#b3362d", "#2c4669"];

export function processColor(i: number): string {
  return PALETTE[i % PALETTE.length] as string;
}

export function YieldComparisonChart({ entries, target, width }: { entries: readonly ProcessComparisonEntry[]; target: number; width: number }) {
  const m = { top: 8, right: 56, bottom: 24, left: 210 };
  const rowH = 26;
  const height = m.top + m.bottom + entries.length * rowH;
  const iw = Math.max(40, width - m.left - m.right);
  const x = scaleLinear<number>({ domain: [0, 100], range: [0, iw] });
  const y = scaleBand<number>({ domain: entries.map((_, i) => i), range: [0, entries.length * rowH], padding: 0.3 });
  return (
    <svg width={width} height={height} role="img" aria-label="Yield of the design under each process, with 95 % Wilson intervals and the target yield" data-testid="process-yield-chart">
      <Group left={m.left} top={m.top}>
        {entries.map((e, i) => {
          const yy = y(i) ?? 0;
          const h = y.bandwidth();
          return (
            <g key={i} data-testid="process-yield-row" data-pass-count={e.result.passCount} data-trials={e.result.trials}>
              <text x={-8} y={yy + h / 2 + 3} textAnchor="end" fontSize={11} fill="#13233a">
                {e.label.length > 34 ? `${e.label.slice(0, 33)}…` : e.label}
              </text>
              <Bar x={0} y={yy} width={x(e.result.yield * 100)} height={h} fill={processColor(i)} fillOpacity={0.85} />
              <Line from={{ x: x(e.result.interval.low * 100), y: yy + h / 2 }} to={{ x: x(e.result.interval.high * 100), y: yy + h / 2 }} stroke="#13233a" strokeWidth={1.5} />
              <text x={iw + 4} y={yy + h / 2 + 3} fontSize={11} fill="#13233a">
                {(e.result.yield * 100).toFixed(1)} %
              </text>
            </g>
          );
        })}
        <Line from={{ x: x(target * 100), y: -4 }} to={{ x: x(target * 100), y: entries.length * rowH }} stroke="#b3362d" strokeDasharray="4 3" />
        <AxisBottom top={entries.length * rowH} scale={x} numTicks={5} tickFormat={(v) => `${String(v)} %`} tickLabelProps={{ ...tick, textAnchor: "middle" }} stroke="#5a708f" />
      </Group>
    </svg>
  );
}

/** Per layer and process: σ of the realised thickness error (%) and its correlation with the previous layer. */
export function LayerErrorTable({ entries }: { entries: readonly ProcessComparisonEntry[] }) {
  const layers = entries[0]?.layers ?? [];
  return (
    <div className="max-h-80 overflow-auto rounded-md border border-ink-100">
      <table className="w-full text-right font-mono text-xs" data-testid="process-layer-table">
        <caption className="sr-only">Realised thickness error per layer under each process: mean and σ in percent, correlation r with the previous layer</caption>
        <thead className="sticky top-0 bg-paper text-ink-700">
          <tr>
            <th scope="col" className="px-2 py-1 text-left font-sans">Layer</th>
            {entries.map((e, i) => (
              <th key={i} scope="col" colSpan={3} className="border-l border-ink-100 px-2 py-1 text-center font-sans" style={{ color: processColor(i) }}>
                {e.label}
              </th>
            ))}
          </tr>
          <tr>
            <th />
            {entries.map((_, i) => [
              <th key={`m${i}`} scope="col" className="border-l border-ink-100 px-2 font-sans font-normal">mean %</th>,
              <th key={`s${i}`} scope="col" className="px-2 font-sans font-normal">σ %</th>,
              <th key={`r${i}`} scope="col" className="px-2 font-sans font-normal">r prev.</th>,
            ])}
          </tr>
        </thead>
        <tbody>
          {layers.map((l) => (
            <tr key={l.layer} className="odd:bg-white even:bg-paper/60">
              <th scope="row" className="px-2 py-0.5 text-left font-sans font-normal">
                {`L${l.layer + 1} ${l.material}`}
              </th>
              {entries.map((e, i) => {
                const s = e.layers[l.layer];
                return [
                  <td key={`m${i}`} className="border-l border-ink-100 px-2">{s ? s.meanPct.toFixed(2) : "–"}</td>,
                  <td key={`s${i}`} className="px-2">{s ? s.sigmaPct.toFixed(2) : "–"}</td>,
                  <td key={`r${i}`} className="px-2">{s && l.layer > 0 ? s.correlationWithPrevious.toFixed(2) : "–"}</td>,
                ];
              })}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

/** One small chart per monitored layer: signal against deposited thickness, nominal dashed, the cut marked. */
export function MonitoringTraceGrid({ traces, width }: { traces: readonly MonitoringTrace[]; width: number }) {
  const cellW = 170;
  const cols = Math.max(1, Math.floor(width / cellW));
  return (
    <div className="grid gap-1" style={{ gridTemplateColumns: `repeat(${cols}, minmax(0, 1fr))` }} data-testid="monitoring-traces">
      {traces.map((t) => (
        <TraceCell key={t.layer} trace={t} width={Math.floor(width / cols) - 4} />
      ))}
    </div>
  );
}

function TraceCell({ trace, width }: { trace: MonitoringTrace; width: number }) {
  const height = 118;
  const m = { top: 16, right: 6, bottom: 20, left: 30 };
  const iw = Math.max(10, width - m.left - m.right);
  const ih = height - m.top - m.bottom;
  const xs = trace.thickness;
  const all = [...trace.values, ...trace.nominalValues];
  const lo = Math.min(...all);
  const hi = Math.max(...all);
  const pad = Math.max(0.002, (hi - lo) * 0.08);
  const x = scaleLinear<number>({ domain: [0, xs[xs.length - 1] ?? 1], range: [0, iw] });
  const y = scaleLinear<number>({ domain: [(lo - pad) * 100, (hi + pad) * 100], range: [ih, 0] });
  const pts = xs.map((d, i) => [d, (trace.values[i] ?? 0) * 100] as const);
  const nom = xs.map((d, i) => [d, (trace.nominalValues[i] ?? 0) * 100] as const);
  const err = trace.finalThickness - trace.nominalThickness;
  return (
    <svg
      width={width}
      height={height}
      role="img"
      aria-label={`Layer ${trace.layer + 1} ${trace.material}: ${trace.signal} at ${trace.wavelength} nm on the ${trace.on}, ${trace.criterion === "turning" ? "turning point" : "level"} cut at ${trace.cut.thickness.toFixed(1)} nm, final ${trace.finalThickness.toFixed(1)} nm against ${trace.nominalThickness.toFixed(1)} nm nominal`}
    >
      <text x={4} y={11} fontSize={10} fill="#13233a">
        {`L${trace.layer + 1} ${trace.material} · ${trace.criterion === "turning" ? "TP" : "level"} ${trace.wavelength} nm · ${err >= 0 ? "+" : ""}${err.toFixed(2)} nm`}
      </text>
      <Group left={m.left} top={m.top}>
        <LinePath data={nom} x={(p) => x(p[0])} y={(p) => y(p[1])} stroke="#9fb0c6" strokeDasharray="3 2" strokeWidth={1} />
        <LinePath data={pts} x={(p) => x(p[0])} y={(p) => y(p[1])} stroke="#1f7f7a" strokeWidth={1.5} />
        {trace.trigger !== null ? <Line from={{ x: 0, y: y(trace.trigger * 100) }} to={{ x: iw, y: y(trace.trigger * 100) }} stroke="#d98a2b" strokeDasharray="2 2" /> : null}
        <Line from={{ x: x(trace.nominalThickness), y: 0 }} to={{ x: x(trace.nominalThickness), y: ih }} stroke="#9fb0c6" />
        <circle cx={x(trace.cut.thickness)} cy={y(trace.cut.value * 100)} r={3} fill="#b3362d" />
        <Line from={{ x: x(trace.finalThickness), y: 0 }} to={{ x: x(trace.finalThickness), y: ih }} stroke="#b3362d" strokeDasharray="2 2" />
        <AxisLeft scale={y} numTicks={3} tickLabelProps={{ ...tick, fontSize: 8, textAnchor: "end", dx: -2, dy: 3 }} stroke="#5a708f" />
        <AxisBottom top={ih} scale={x} numTicks={3} tickLabelProps={{ ...tick, fontSize: 8, textAnchor: "middle" }} stroke="#5a708f" />
      </Group>
    </svg>
  );
}
