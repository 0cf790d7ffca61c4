// Small result charts of a tolerance study: margin histogram, layer criticality, yield-vs-process sweep,
// and the sensitivity heatmap (layer × wavelength). Plain SVG from visx primitives, no animation.
import { useMemo } from "react";
import { scaleBand, scaleLinear } from "@visx/scale";
import { Bar, LinePath, Line } from "@visx/shape";
import { AxisBottom, AxisLeft } from "@visx/axis";
import { Group } from "@visx/group";
import { HeatmapRect } from "@visx/heatmap";
import type { SensitivityMap, SweepPoint, YieldResult } from "@stackproof/optics";

const tick = { fontSize: 10, fill: "#2c4669" } as const;
const label = { fontSize: 11, fill: "#2c4669", textAnchor: "middle" } as const;

export function MarginHistogram({ histogram, width, height = 190, unit }: { histogram: YieldResult["marginHistogram"]; width: number; height?: number; unit: string }) {
  const m = { top: 8, right: 10, bottom: 44, left: 40 };
  const iw = Math.max(10, width - m.left - m.right);
  const ih = height - m.top - m.bottom;
  const lo = histogram.edges[0] ?? 0;
  const hi = histogram.edges[histogram.edges.length - 1] ?? 1;
  const x = scaleLinear<number>({ domain: [lo, hi], range: [0, iw] });
  const maxC = Math.max(1, ...histogram.counts);
  const y = scaleLinear<number>({ domain: [0, maxC], range: [ih, 0] });
  return (
    <svg width={width} height={height} role="img" aria-label="Histogram of each simulated build's worst band margin; builds left of zero fail" data-testid="margin-histogram">
      <Group left={m.left} top={m.top}>
        {histogram.counts.map((c, i) => {
          const a = histogram.edges[i] ?? 0;
          const b = histogram.edges[i + 1] ?? a;
          const fail = b <= 0;
          return <Bar key={i} x={x(a) + 0.5} width={Math.max(1, x(b) - x(a) - 1)} y={y(c)} height={ih - y(c)} fill={fail ? "#b3362d" : "#1f7f7a"} fillOpacity={0.8} />;
        })}
        {lo < 0 && hi > 0 ? <Line from={{ x: x(0), y: 0 }} to={{ x: x(0), y: ih }} stroke="#13233a" strokeDasharray="3 2" /> : null}
        <AxisLeft scale={y} numTicks={4} tickLabelProps={{ ...tick, textAnchor: "end", dx: -2, dy: 3 }} stroke="#5a708f" />
        <AxisBottom top={ih} scale={x} numTicks={6} label={`Worst band margin (${unit})`} labelOffset={8} tickLabelProps={{ ...tick, textAnchor: "middle" }} labelProps={label} stroke="#5a708f" />
      </Group>
    </svg>
  );
}

export function CriticalLayers({ layers, width, materials, top = 10 }: { layers: YieldResult["criticalLayers"]; width: number; materials: readonly string[]; top?: number }) {
  const rows = layers.slice(0, top);
  const m = { top: 6, right: 40, bottom: 26, left: 76 };
  const height = m.top + m.bottom + rows.length * 18;
  const iw = Math.max(10, width - m.left - m.right);
  const score = (l: (typeof rows)[number]) => Math.max(Math.abs(l.correlation), Math.abs(l.absErrorCorrelation));
  const x = scaleLinear<number>({ domain: [0, Math.max(0.05, ...rows.map(score))], range: [0, iw] });
  const y = scaleBand<string>({ domain: rows.map((l) => String(l.layer)), range: [0, rows.length * 18], padding: 0.25 });
  if (rows.length === 0) return <p className="text-xs text-ink-500">No failures, so no layer stands out.</p>;
  return (
    <svg width={width} height={height} role="img" aria-label="Layers whose thickness error goes most with failure" data-testid="critical-layers">
      <Group left={m.left} top={m.top}>
        {rows.map((l) => (
          <g key={l.layer}>
            <text x={-6} y={(y(String(l.layer)) ?? 0) + y.bandwidth() / 2 + 3} textAnchor="end" fontSize={10} fill="#2c4669">
              {`L${l.layer + 1} ${materials[l.layer] ?? ""}`}
            </text>
            <Bar x={0} y={y(String(l.layer)) ?? 0} width={x(score(l))} height={y.bandwidth()} fill="#d98a2b" />
            <text x={x(score(l)) + 4} y={(y(String(l.layer)) ?? 0) + y.bandwidth() / 2 + 3} fontSize={10} fill="#2c4669">
              {score(l).toFixed(2)}
            </text>
          </g>
        ))}
        <AxisBottom top={rows.length * 18} scale={x} numTicks={4} tickLabelProps={{ ...tick, textAnchor: "middle" }} stroke="#5a708f" />
      </Group>
    </svg>
  );
}

export function SweepChart({ points, target, width, height = 200 }: { points: readonly SweepPoint[]; target: number; width: number; height?: number }) {
  const m = { top: 10, right: 12, bottom: 44, left: 44 };
  const iw = Math.max(10, width - m.left - m.right);
  const ih = height - m.top - m.bottom;
  const xs = points.map((p) => p.scale);
  const x = scaleLinear<number>({ domain: [Math.min(...xs, 0), Math.max(...xs, 1)], range: [0, iw] });
  const y = scaleLinear<number>({ domain: [0, 100], range: [ih, 0] });
  return (
    <svg width={width} height={height} role="img" aria-label="Yield against a scale factor on every process error, with the target yield" data-testid="sweep-chart">
      <Group left={m.left} top={m.top}>
        {points.map((p) => (
          <Line key={`ci-${p.scale}`} from={{ x: x(p.scale), y: y(p.interval.low * 100) }} to={{ x: x(p.scale), y: y(p.interval.high * 100) }} stroke="#7cc6c0" strokeWidth={3} />
        ))}
        <LinePath<SweepPoint> data={[...points]} x={(p) => x(p.scale)} y={(p) => y(p.yield * 100)} stroke="#1f7f7a" strokeWidth={2} fill="none" />
        {points.map((p) => (
          <circle key={p.scale} cx={x(p.scale)} cy={y(p.yield * 100)} r={3} fill="#1f7f7a">
            <title>{`×${p.scale}: ${(p.yield * 100).toFixed(1)} % (${(p.interval.low * 100).toFixed(1)}–${(p.interval.high * 100).toFixed(1)} %)`}</title>
          </circle>
        ))}
        <Line from={{ x: 0, y: y(target * 100) }} to={{ x: iw, y: y(target * 100) }} stroke="#d98a2b" strokeDasharray="5 3" />
        <text x={iw - 4} y={y(target * 100) - 4} textAnchor="end" fontSize={10} fill="#a66a00">
          target {(target * 100).toFixed(0)} %
        </text>
        <AxisLeft scale={y} numTicks={5} label="Yield (%)" labelOffset={26} tickLabelProps={{ ...tick, textAnchor: "end", dx: -2, dy: 3 }} labelProps={label} stroke="#5a708f" />
        <AxisBottom top={ih} scale={x} numTicks={6} label="Scale factor on the error model" labelOffset={10} tickLabelProps={{ ...tick, textAnchor: "middle" }} labelProps={label} stroke="#5a708f" />
      </Group>
    </svg>
  );
}

interface HeatColumn {
  wavelength: number;
  bins: { layer: number; value: number }[];
}

export function SensitivityHeatmap({ map, width, materials }: { map: SensitivityMap; width: number; materials: readonly string[] }) {
  const layers = map.matrix.length;
  const cols = map.wavelengths.length;
  const m = { top: 8, right: 12, bottom: 44, left: 52 };
  const iw = Math.max(10, width - m.left - m.right);
  const rowH = Math.max(4, Math.min(14, Math.floor(300 / Math.max(1, layers))));
  const ih = rowH * layers;
  const data = useMemo<HeatColumn[]>(
    () => map.wavelengths.map((w, c) => ({ wavelength: w, bins: map.matrix.map((row, j) => ({ layer: j, value: row[c] ?? 0 })) })),
    [map],
  );
  const maxAbs = useMemo(() => Math.max(1e-9, ...map.matrix.flat().map(Math.abs)), [map]);
  const binW = iw / Math.max(1, cols);
  const color = (v: number): string => {
    // Diverging: amber for a rise of the quantity with thickness, teal for a fall; white at zero.
    const t = Math.max(-1, Math.min(1, v / maxAbs));
    const [r, g, b] = t >= 0 ? [217, 138, 43] : [31, 127, 122];
    const a = Math.abs(t);
    return `rgb(${Math.round(255 + (r - 255) * a)},${Math.round(255 + (g - 255) * a)},${Math.round(255 + (b - 255) * a)})`;
  };
  const x = scaleLinear<number>({ domain: [map.wavelengths[0] ?? 0, map.wavelengths[cols - 1] ?? 1], range: [0, iw] });
  // layer L (1-based) sits at the centre of row L − 1
  const yLayer = scaleLinear<number>({ domain: [0.5, layers + 0.5], range: [ih, 0] });
  return (
    <div>
      <svg width={width} height={ih + m.top + m.bottom} role="img" aria-label={`Sensitivity of ${map.quantity} to each layer's thickness across wavelength`} data-testid="sensitivity-heatmap">
        <Group left={m.left} top={m.top}>
          <HeatmapRect<HeatColumn, { layer: number; value: number }>
            data={data}
            xScale={(c) => c * binW}
            yScale={(r) => ih - (r + 1) * rowH}
            binWidth={binW}
            binHeight={rowH}
            bins={(col) => col.bins}
            count={(bin) => bin.value}
            gap={0}
          >
            {(heatmap) =>
              heatmap.map((columns) =>
                columns.map((cell) => (
                  <rect key={`${cell.row}-${cell.column}`} x={cell.x} y={cell.y} width={cell.width + 0.5} height={cell.height} fill={color(cell.bin.value)}>
                    {cell.column % 4 === 0 ? <title>{`L${cell.row + 1} ${materials[cell.row] ?? ""} at ${cell.datum.wavelength.toFixed(0)} nm: ${cell.bin.value.toFixed(3)} %/nm`}</title> : null}
                  </rect>
                )),
              )
            }
          </HeatmapRect>
          <AxisLeft scale={yLayer} numTicks={Math.min(8, layers)} label="Layer" labelOffset={28} tickValues={layerTicks(layers)} tickFormat={(v) => String(v)} tickLabelProps={{ ...tick, textAnchor: "end", dx: -2, dy: 3 }} labelProps={label} stroke="#5a708f" />
          <AxisBottom top={ih} scale={x} numTicks={6} label="Wavelength (nm)" labelOffset={10} tickLabelProps={{ ...tick, textAnchor: "middle" }} labelProps={label} stroke="#5a708f" />
        </Group>
      </svg>
      <p className="text-xs text-ink-500">
        ∂{map.quantity}/∂d in percentage points per nm; amber: {map.quantity} rises as the layer thickens, teal: it falls. Scale ±{maxAbs.toFixed(2)} %/nm.
      </p>
    </div>
  );
}

/** Whole layer numbers for the heatmap axis, at most about eight of them. */
function layerTicks(layers: number): number[] {
  const step = Math.max(1, Math.ceil(layers / 8));
  const out: number[] = [];
  for (let l = 1; l <= layers; l += step) out.push(l);
  return out;
}
