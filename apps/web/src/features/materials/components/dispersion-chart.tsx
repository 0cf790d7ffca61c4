import { useMemo } from "react";
import { ParentSize } from "@visx/responsive";
import { scaleLinear } from "@visx/scale";
import { LinePath } from "@visx/shape";
import { AxisBottom, AxisLeft, AxisRight } from "@visx/axis";
import { GridRows } from "@visx/grid";
import { Group } from "@visx/group";
import type { DispersionPoint } from "../lib/dispersion.ts";

const N_COLOUR = "#1f7f7a"; // film-teal
const K_COLOUR = "#d98a2b"; // film-amber
const AXIS = "#5a708f"; // ink-500

export interface DispersionChartProps {
  points: DispersionPoint[];
  /** Accessible description of what is plotted. */
  title: string;
  height?: number;
}

function padded(lo: number, hi: number, pad = 0.08): [number, number] {
  if (!Number.isFinite(lo) || !Number.isFinite(hi)) return [0, 1];
  if (hi - lo < 1e-9)
    return [lo - Math.max(0.01, Math.abs(lo) * 0.02), hi + Math.max(0.01, Math.abs(hi) * 0.02)];
  const d = (hi - lo) * pad;
  return [lo - d, hi + d];
}

function Plot({ points, width, height, title }: DispersionChartProps & { width: number; height: number }) {
  const margin = { top: 12, right: 70, bottom: 48, left: 58 };
  const w = Math.max(0, width - margin.left - margin.right);
  const h = Math.max(0, height - margin.top - margin.bottom);

  const scales = useMemo(() => {
    const xs = points.map((p) => p.wavelength);
    const ns = points.map((p) => p.n);
    const ks = points.map((p) => p.k);
    const kMax = Math.max(...ks, 0);
    return {
      x: scaleLinear({ domain: [Math.min(...xs), Math.max(...xs)], range: [0, w] }),
      n: scaleLinear({ domain: padded(Math.min(...ns), Math.max(...ns)), range: [h, 0], nice: true }),
      k: scaleLinear({ domain: [0, kMax > 0 ? kMax * 1.1 : 1], range: [h, 0], nice: true }),
      hasK: kMax > 0,
    };
  }, [points, w, h]);

  if (w <= 0 || h <= 0) return null;
  return (
    <svg width={width} height={height} role="img" aria-label={title}>
      <Group left={margin.left} top={margin.top}>
        <GridRows scale={scales.n} width={w} stroke="#e3e8ef" numTicks={5} />
        <LinePath
          data={points}
          x={(p) => scales.x(p.wavelength)}
          y={(p) => scales.n(p.n)}
          stroke={N_COLOUR}
          strokeWidth={2}
        />
        {scales.hasK && (
          <LinePath
            data={points}
            x={(p) => scales.x(p.wavelength)}
            y={(p) => scales.k(p.k)}
            stroke={K_COLOUR}
            strokeWidth={2}
            strokeDasharray="6 4"
          />
        )}
        <AxisBottom
          top={h}
          scale={scales.x}
          numTicks={Math.max(2, Math.floor(w / 80))}
          stroke={AXIS}
          tickStroke={AXIS}
          tickLabelProps={{
            fill: AXIS,
            fontSize: 11,
            fontFamily: "JetBrains Mono Variable, monospace",
            textAnchor: "middle",
          }}
          label="wavelength (nm)"
          labelOffset={14}
          labelProps={{ fill: AXIS, fontSize: 12, textAnchor: "middle" }}
        />
        <AxisLeft
          scale={scales.n}
          numTicks={5}
          stroke={N_COLOUR}
          tickStroke={N_COLOUR}
          tickLabelProps={{
            fill: N_COLOUR,
            fontSize: 11,
            fontFamily: "JetBrains Mono Variable, monospace",
            textAnchor: "end",
            dx: -4,
            dy: 3,
          }}
          label="n"
          labelProps={{ fill: N_COLOUR, fontSize: 13, fontWeight: 600, textAnchor: "middle" }}
        />
        {scales.hasK && (
          <AxisRight
            left={w}
            scale={scales.k}
            numTicks={5}
            stroke={K_COLOUR}
            tickStroke={K_COLOUR}
            tickFormat={(v) => Number(v).toPrecision(2)}
            tickLabelProps={{
              fill: K_COLOUR,
              fontSize: 11,
              fontFamily: "JetBrains Mono Variable, monospace",
              textAnchor: "start",
              dx: 4,
              dy: 3,
            }}
            label="k"
            labelOffset={44}
            labelProps={{ fill: K_COLOUR, fontSize: 13, fontWeight: 600, textAnchor: "middle" }}
          />
        )}
      </Group>
    </svg>
  );
}

/** n (solid, left axis) and k (dashed, right axis) against wavelength. */
export function DispersionChart({ points, title, height = 300 }: DispersionChartProps) {
  if (points.length < 2) return <p className="text-sm text-ink-500">Not enough points to plot.</p>;
  const absorbing = points.some((p) => p.k > 0);
  return (
    <figure>
      <div style={{ height }} className="w-full">
        <ParentSize debounceTime={50}>
          {({ width }) => <Plot points={points} width={width} height={height} title={title} />}
        </ParentSize>
      </div>
      <figcaption className="mt-1 flex flex-wrap gap-4 text-xs text-ink-700">
        <span className="inline-flex items-center gap-1.5">
          <span aria-hidden className="inline-block h-0.5 w-5" style={{ background: N_COLOUR }} /> refractive
          index n
        </span>
        {absorbing ? (
          <span className="inline-flex items-center gap-1.5">
            <span
              aria-hidden
              className="inline-block h-0 w-5 border-t-2 border-dashed"
              style={{ borderColor: K_COLOUR }}
            />{" "}
            extinction coefficient k, right axis (N = n − ik)
          </span>
        ) : (
          <span>k = 0 over this range (no absorption in the model)</span>
        )}
      </figcaption>
    </figure>
  );
}
