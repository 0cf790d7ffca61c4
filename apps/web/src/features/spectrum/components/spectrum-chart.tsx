// Spectrum chart: plain, non-animated SVG built from visx primitives. Curves of R/T/A (percent) or OD against
// wavelength, forbidden regions of the spec mask, violations on the curve, envelopes, review markers, a hover
// and keyboard readout, and drag-to-select a wavelength range.
import { memo, useCallback, useId, useMemo, useRef, useState } from "react";
import type { KeyboardEvent, PointerEvent } from "react";
import { scaleLinear } from "@visx/scale";
import { Area } from "@visx/shape";
import { AxisBottom, AxisLeft } from "@visx/axis";
import { GridRows, GridColumns } from "@visx/grid";
import { Group } from "@visx/group";
import type { ChartQuantity, ForbiddenRegion } from "../lib/mask-geometry.ts";

export interface ChartCurve {
  id: string;
  label: string;
  quantity: ChartQuantity;
  wavelengths: ArrayLike<number>;
  /** percent for R/T/A, OD units for OD */
  values: ArrayLike<number>;
  color: string;
  dashed?: boolean;
  /** violations of the mask are highlighted on primary curves only */
  primary?: boolean;
}

export interface ChartEnvelope {
  id: string;
  label: string;
  quantity: ChartQuantity;
  wavelengths: readonly number[];
  lower: readonly number[];
  upper: readonly number[];
  color: string;
}

/**
 * A violation point of a band, from the spec evaluation that gives the band's verdict (optics
 * SpecEvaluator.violations): wavelength, value in band units, and the angle and polarization it occurs at.
 */
export interface ChartViolation {
  bandId: string;
  quantity: ChartQuantity;
  wavelength: number;
  value: number;
  angleDeg: number;
  polarization: "s" | "p" | "u";
}

export interface ChartMarker {
  id: string;
  label: string;
  start: number;
  stop: number;
  tone: "open" | "resolved";
}

export interface SpectrumChartProps {
  width: number;
  height: number;
  /** "percent" plots R, T, A (0–100 %); "od" plots optical density */
  scale: "percent" | "od";
  domain: { start: number; stop: number };
  curves: readonly ChartCurve[];
  regions: readonly ForbiddenRegion[];
  envelopes?: readonly ChartEnvelope[];
  markers?: readonly ChartMarker[];
  /** the verdict's violation points (drawn as marks; never recomputed from the curves on screen) */
  violations?: readonly ChartViolation[];
  title: string;
  /** x axis label, default "Wavelength (nm)" (the angle view passes "Angle of incidence (°)") */
  xLabel?: string;
  onSelectRange?: (start: number, stop: number) => void;
}

const MARGIN = { top: 14, right: 16, bottom: 42, left: 48 };

function fmt(v: number, digits = 2): string {
  return Number.isFinite(v) ? v.toFixed(digits) : "—";
}

export function SpectrumChart(props: SpectrumChartProps) {
  const { width, height, curves, regions, envelopes = [], markers = [], domain, onSelectRange } = props;
  const titleId = useId();
  const innerW = Math.max(10, width - MARGIN.left - MARGIN.right);
  const innerH = Math.max(10, height - MARGIN.top - MARGIN.bottom);
  const shown = useMemo(
    () => new Set(curves.map((c) => c.quantity).filter((q) => (props.scale === "od" ? q === "OD" : q !== "OD"))),
    [curves, props.scale],
  );
  const visibleCurves = curves.filter((c) => shown.has(c.quantity));
  const visibleRegions = regions.filter((r) => (props.scale === "od" ? r.quantity === "OD" : r.quantity !== "OD"));
  const yMax = useMemo(() => {
    if (props.scale === "percent") return 100;
    let m = 1;
    for (const r of visibleRegions) m = Math.max(m, r.limit + 1);
    for (const c of visibleCurves) for (let i = 0; i < c.values.length; i++) m = Math.max(m, Math.min(12, c.values[i] as number));
    return Math.ceil(m);
  }, [props.scale, visibleRegions, visibleCurves]);
  const x = useMemo(() => scaleLinear<number>({ domain: [domain.start, domain.stop], range: [0, innerW] }), [domain, innerW]);
  const y = useMemo(() => scaleLinear<number>({ domain: [0, yMax], range: [innerH, 0], clamp: true }), [yMax, innerH]);

  const primary = visibleCurves.find((c) => c.primary) ?? visibleCurves[0];
  const [cursor, setCursor] = useState<number | null>(null);
  const [drag, setDrag] = useState<{ from: number; to: number } | null>(null);
  const svgRef = useRef<SVGSVGElement>(null);

  const wavelengthAt = useCallback(
    (clientX: number): number => {
      const rect = svgRef.current?.getBoundingClientRect();
      const left = rect ? rect.left : 0;
      const px = Math.max(0, Math.min(innerW, clientX - left - MARGIN.left));
      return x.invert(px);
    },
    [innerW, x],
  );
  const nearestIndex = useCallback(
    (w: number): number => {
      const wl = primary?.wavelengths;
      if (!wl || wl.length === 0) return -1;
      const first = wl[0] as number;
      const last = wl[wl.length - 1] as number;
      const i = Math.round(((w - first) / (last - first || 1)) * (wl.length - 1));
      return Math.max(0, Math.min(wl.length - 1, i));
    },
    [primary],
  );

  const onPointerMove = (e: PointerEvent<SVGSVGElement>) => {
    const w = wavelengthAt(e.clientX);
    setCursor(nearestIndex(w));
    if (drag) setDrag({ from: drag.from, to: w });
  };
  const onPointerDown = (e: PointerEvent<SVGSVGElement>) => {
    if (!onSelectRange || e.button !== 0) return;
    const w = wavelengthAt(e.clientX);
    setDrag({ from: w, to: w });
  };
  const onPointerUp = () => {
    if (drag && onSelectRange) {
      const a = Math.min(drag.from, drag.to);
      const b = Math.max(drag.from, drag.to);
      if (x(b) - x(a) > 4) onSelectRange(Math.round(a * 10) / 10, Math.round(b * 10) / 10);
    }
    setDrag(null);
  };
  const onKeyDown = (e: KeyboardEvent<SVGSVGElement>) => {
    const len = primary?.wavelengths.length ?? 0;
    if (len === 0) return;
    const step = e.shiftKey ? Math.max(1, Math.round(len / 20)) : 1;
    if (e.key === "ArrowRight" || e.key === "ArrowLeft") {
      e.preventDefault();
      const from = cursor ?? Math.floor(len / 2);
      setCursor(Math.max(0, Math.min(len - 1, from + (e.key === "ArrowRight" ? step : -step))));
    } else if (e.key === "Escape") {
      setCursor(null);
    }
  };

  const cursorW = cursor !== null && primary ? (primary.wavelengths[cursor] as number) : null;
  const readout =
    cursorW === null
      ? null
      : {
          wavelength: cursorW,
          values: visibleCurves.map((c) => ({ c, v: c.values[nearestIndexFor(c, cursorW)] as number })),
          bands: visibleRegions.filter((r) => cursorW >= r.start && cursorW <= r.stop),
        };

  const yLabel = props.scale === "od" ? "Optical density" : "Percent";
  return (
    <figure className="relative m-0" aria-labelledby={titleId}>
      <figcaption id={titleId} className="sr-only">
        {props.title}
      </figcaption>
      <svg
        ref={svgRef}
        width={width}
        height={height}
        role="img"
        aria-label={`${props.title}. Use the left and right arrow keys to read values.`}
        tabIndex={0}
        className="select-none rounded-md bg-white focus-visible:outline-2"
        onPointerMove={onPointerMove}
        onPointerLeave={() => {
          setCursor(null);
          setDrag(null);
        }}
        onPointerDown={onPointerDown}
        onPointerUp={onPointerUp}
        onKeyDown={onKeyDown}
        data-testid="spectrum-chart"
      >
        <Group left={MARGIN.left} top={MARGIN.top}>
          <ChartGrid x={x} y={y} innerW={innerW} innerH={innerH} />
          {visibleRegions.map((r) => {
            const x0 = x(Math.max(domain.start, r.start));
            const x1 = x(Math.min(domain.stop, r.stop));
            if (x1 <= x0 && r.start !== r.stop) return null;
            const yl = y(r.limit);
            const top = r.side === "above" ? 0 : yl;
            const h = r.side === "above" ? yl : innerH - yl;
            return (
              <g key={r.bandId} data-region={r.bandId} data-side={r.side} data-pass={String(r.pass)}>
                <rect
                  x={x0}
                  y={top}
                  width={Math.max(1, x1 - x0)}
                  height={Math.max(0, h)}
                  fill={r.pass === false ? "#b3362d" : "#5a708f"}
                  fillOpacity={r.average ? 0.08 : 0.16}
                  stroke="none"
                >
                  <title>{`${r.label} (${r.conditions}) — ${r.pass === null ? "not evaluated" : r.pass ? "passes" : "fails"}`}</title>
                </rect>
                <line
                  x1={x0}
                  x2={x0 + Math.max(1, x1 - x0)}
                  y1={yl}
                  y2={yl}
                  stroke={r.pass === false ? "#b3362d" : "#2c4669"}
                  strokeWidth={1.5}
                  strokeDasharray={r.average ? "5 3" : undefined}
                />
              </g>
            );
          })}
          {markers.map((m) => {
            const x0 = x(Math.max(domain.start, m.start));
            const x1 = x(Math.min(domain.stop, m.stop));
            return (
              <g key={m.id} data-marker={m.id}>
                <rect x={x0} y={0} width={Math.max(2, x1 - x0)} height={innerH} fill={m.tone === "open" ? "#6a4fa3" : "#a9b6c8"} fillOpacity={0.1} />
                <rect x={x0} y={-10} width={Math.max(2, x1 - x0)} height={5} fill={m.tone === "open" ? "#6a4fa3" : "#a9b6c8"}>
                  <title>{m.label}</title>
                </rect>
              </g>
            );
          })}
          {envelopes
            .filter((e) => shown.has(e.quantity))
            .flatMap((e) =>
              segments(e.wavelengths).filter(([a, b]) => b > a).map(([a, b], k) => (
                <Area<number>
                  key={`${e.id}-${k}`}
                  data={range(a, b)}
                  x={(i) => x(e.wavelengths[i] as number)}
                  y0={(i) => y(e.lower[i] as number)}
                  y1={(i) => y(e.upper[i] as number)}
                  fill={e.color}
                  fillOpacity={0.35}
                  stroke="none"
                  data-envelope={e.id}
                />
              )),
            )}
          {visibleCurves.map((c) => (
            <CurvePath key={c.id} curve={c} x={x} y={y} />
          ))}
          {(props.violations ?? [])
            .filter((v) => shown.has(v.quantity) && Number.isFinite(v.value))
            .map((v, k) => (
              <circle
                key={`${v.bandId}-${k}`}
                cx={x(v.wavelength)}
                cy={y(v.value)}
                r={2.6}
                fill="#b3362d"
                data-violation={v.bandId}
              >
                <title>{`${v.bandId}: ${v.value.toFixed(3)} at ${v.wavelength} nm, ${v.angleDeg.toFixed(2)}°, ${v.polarization === "u" ? "unpolarized" : v.polarization}`}</title>
              </circle>
            ))}
          {drag ? (
            <rect
              x={x(Math.min(drag.from, drag.to))}
              y={0}
              width={Math.abs(x(drag.to) - x(drag.from))}
              height={innerH}
              fill="#6a4fa3"
              fillOpacity={0.18}
            />
          ) : null}
          {cursorW !== null ? <line x1={x(cursorW)} x2={x(cursorW)} y1={0} y2={innerH} stroke="#13233a" strokeDasharray="2 2" /> : null}
          <ChartAxes x={x} y={y} innerW={innerW} innerH={innerH} yLabel={yLabel} xLabel={props.xLabel ?? "Wavelength (nm)"} />
        </Group>
      </svg>
      {readout ? (
        <div
          role="status"
          aria-live="polite"
          className="pointer-events-none absolute top-2 rounded-md border border-ink-300 bg-paper/95 px-2.5 py-1.5 text-xs shadow-sm tabular"
          style={{ left: Math.min(width - 190, Math.max(MARGIN.left, x(readout.wavelength) + MARGIN.left + 10)) }}
          data-testid="chart-readout"
        >
          <div className="font-semibold">{fmt(readout.wavelength, 1)} nm</div>
          {readout.values.map(({ c, v }) => (
            <div key={c.id} className="flex items-center gap-1.5">
              <span className="inline-block h-0.5 w-3" style={{ background: c.color }} aria-hidden />
              {c.label}: {fmt(v)}
              {c.quantity === "OD" ? "" : " %"}
            </div>
          ))}
          {readout.bands.map((r) => (
            <div key={r.bandId} className={r.pass === false ? "text-verdict-fail" : "text-verdict-pass"}>
              {r.label}: {r.pass === null ? "not evaluated" : r.pass ? "band passes" : "band fails"}
            </div>
          ))}
        </div>
      ) : null}
    </figure>
  );
}

type LinearScale = ReturnType<typeof scaleLinear<number>>;

// Axes and grid depend only on the scales: memoised, with constant label props, so that an edit of the curve does
// not re-measure tick labels (visx Text measures them with the DOM, which forces a layout).
const TICK_LEFT = { fontSize: 10, fill: "#2c4669", textAnchor: "end", dx: -2, dy: 3 } as const;
const TICK_BOTTOM = { fontSize: 10, fill: "#2c4669", textAnchor: "middle" } as const;
const AXIS_LABEL = { fontSize: 11, fill: "#2c4669", textAnchor: "middle" } as const;

const ChartGrid = memo(function ChartGrid({ x, y, innerW, innerH }: { x: LinearScale; y: LinearScale; innerW: number; innerH: number }) {
  return (
    <>
      <GridRows scale={y} width={innerW} stroke="#e3e8ef" numTicks={5} />
      <GridColumns scale={x} height={innerH} stroke="#eef1f5" numTicks={8} />
    </>
  );
});

const ChartAxes = memo(function ChartAxes({ x, y, innerW, innerH, yLabel, xLabel }: { x: LinearScale; y: LinearScale; innerW: number; innerH: number; yLabel: string; xLabel: string }) {
  return (
    <>
      <AxisLeft scale={y} numTicks={5} label={yLabel} labelOffset={30} tickLabelProps={TICK_LEFT} stroke="#5a708f" tickStroke="#5a708f" labelProps={AXIS_LABEL} />
      <AxisBottom top={innerH} scale={x} numTicks={Math.max(3, Math.floor(innerW / 90))} label={xLabel} labelOffset={10} tickLabelProps={TICK_BOTTOM} stroke="#5a708f" tickStroke="#5a708f" labelProps={AXIS_LABEL} />
    </>
  );
});

function nearestIndexFor(c: ChartCurve, w: number): number {
  const wl = c.wavelengths;
  let lo = 0;
  let hi = wl.length - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if ((wl[mid] as number) <= w) lo = mid;
    else hi = mid;
  }
  return Math.abs((wl[hi] as number) - w) < Math.abs((wl[lo] as number) - w) ? hi : lo;
}

/** Index runs of a sampled wavelength list, split where the spacing jumps (envelopes cover only the bands). */
export function segments(wl: readonly number[]): [number, number][] {
  if (wl.length === 0) return [];
  let step = Infinity;
  for (let i = 1; i < wl.length; i++) {
    const d = (wl[i] as number) - (wl[i - 1] as number);
    if (d > 0 && d < step) step = d;
  }
  const out: [number, number][] = [];
  let start = 0;
  for (let i = 1; i < wl.length; i++) {
    if ((wl[i] as number) - (wl[i - 1] as number) > 2.5 * step) {
      out.push([start, i - 1]);
      start = i;
    }
  }
  out.push([start, wl.length - 1]);
  return out;
}

function range(a: number, b: number): number[] {
  const out: number[] = [];
  for (let i = a; i <= b; i++) out.push(i);
  return out;
}

function CurvePath({ curve, x, y }: { curve: ChartCurve; x: (v: number) => number; y: (v: number) => number }) {
  const d = useMemo(() => {
    // Built by hand: 1000-point paths on every keystroke, without a d3 generator call per point.
    const wl = curve.wavelengths;
    const v = curve.values;
    let s = "";
    for (let i = 0; i < wl.length; i++) {
      const yy = y(v[i] as number);
      s += `${i === 0 ? "M" : "L"}${x(wl[i] as number).toFixed(1)},${(Number.isFinite(yy) ? yy : 0).toFixed(1)}`;
    }
    return s;
  }, [curve, x, y]);
  return (
    <path
      d={d}
      fill="none"
      stroke={curve.color}
      strokeWidth={curve.primary ? 1.8 : 1.4}
      strokeDasharray={curve.dashed ? "6 4" : undefined}
      data-curve={curve.id}
    >
      <title>{curve.label}</title>
    </path>
  );
}
