// What an as-built fit can tell: the nested models with their information criteria, the chosen one and why,
// and each layer's error with ±2 standard-error bars, or "cannot be determined".
import { scaleBand, scaleLinear } from "@visx/scale";
import { Bar, Line } from "@visx/shape";
import { AxisBottom, AxisLeft } from "@visx/axis";
import { Group } from "@visx/group";
import type { BuiltFitResult, FittedLayer } from "@stackproof/optics";

type Fit = Omit<BuiltFitResult, "design">;

const MODEL_NAMES: Record<string, string> = {
  tooling: "Tooling (thickness scale per material)",
  "tooling+index": "Tooling + index scale per material",
  layers: "Per-layer errors, process model as prior",
};

export function FitReport({ fit, width }: { fit: Fit; width: number }) {
  const chosen = fit.models[fit.chosen];
  return (
    <div className="space-y-2 text-xs text-ink-700" data-testid="asbuilt-fit-report">
      <table className="w-full border-collapse text-left">
        <caption className="sr-only">Fitted models</caption>
        <thead>
          <tr className="border-b border-ink-100 text-ink-500">
            <th className="py-1 pr-2 font-medium">Model</th>
            <th className="py-1 pr-2 font-medium">χ²/dof</th>
            <th className="py-1 pr-2 font-medium">RMS (pp)</th>
            <th className="py-1 pr-2 font-medium">eff. parameters</th>
            <th className="py-1 pr-2 font-medium">BIC</th>
          </tr>
        </thead>
        <tbody>
          {fit.models.map((m, i) => (
            <tr key={m.kind} className={i === fit.chosen ? "bg-film-teal/10 font-semibold" : ""} aria-current={i === fit.chosen ? "true" : undefined}>
              <td className="py-1 pr-2">{MODEL_NAMES[m.kind] ?? m.kind}{i === fit.chosen ? " — chosen" : ""}</td>
              <td className="py-1 pr-2 font-mono">{m.residualVariance.toFixed(2)}</td>
              <td className="py-1 pr-2 font-mono">{m.residualRmsPct.toFixed(3)}</td>
              <td className="py-1 pr-2 font-mono">{m.effectiveParameters.toFixed(1)}</td>
              <td className="py-1 pr-2 font-mono">{m.bic.toFixed(1)}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <p>{fit.reason}</p>
      {chosen ? (
        <ul className="flex flex-wrap gap-x-4">
          {chosen.parameters
            .filter((p) => p.kind !== "layer")
            .map((p) => (
              <li key={p.name}>
                {p.name}:{" "}
                {p.determinable ? (
                  <span className="font-mono">
                    {fmtParam(p.kind, p.value)} ± {fmtParam(p.kind, p.se, false)}
                  </span>
                ) : (
                  <span className="text-verdict-fail" title={p.reason}>cannot be determined</span>
                )}
              </li>
            ))}
        </ul>
      ) : null}
      {fit.warnings.map((w) => (
        <p key={w} role="note" className="text-verdict-fail">{w}</p>
      ))}
      <LayerErrorChart layers={fit.layers} width={width} />
      <p className="text-ink-500">
        Bars: fitted thickness error of each layer with ±2 standard errors. Grey “n.d.”: the measurements cannot
        determine that layer (its estimate stays at the process model’s prior); hover a bar for the reason.
      </p>
    </div>
  );
}

function fmtParam(kind: string, v: number, signed = true): string {
  if (kind === "offset") return `${signed && v >= 0 ? "+" : ""}${v.toFixed(3)} pp`;
  if (kind === "shift") return `${signed && v >= 0 ? "+" : ""}${v.toFixed(2)} nm`;
  const pct = v * 100;
  return `${signed && pct >= 0 ? "+" : ""}${pct.toFixed(2)} %`;
}

export function LayerErrorChart({ layers, width }: { layers: FittedLayer[]; width: number }) {
  const mg = { top: 8, right: 10, bottom: 30, left: 44 };
  const height = 180;
  const iw = Math.max(10, width - mg.left - mg.right);
  const ih = height - mg.top - mg.bottom;
  const lim = Math.max(0.5, ...layers.map((l) => (l.errorPct === null ? 0 : Math.abs(l.errorPct) + 2 * (l.sePct ?? 0))));
  const x = scaleBand<number>({ domain: layers.map((l) => l.index), range: [0, iw], padding: 0.25 });
  const y = scaleLinear<number>({ domain: [-lim, lim], range: [ih, 0] });
  return (
    <svg width={width} height={height} role="img" aria-label="Fitted thickness error of each layer with ±2 standard errors" data-testid="asbuilt-layer-errors">
      <Group left={mg.left} top={mg.top}>
        <Line from={{ x: 0, y: y(0) }} to={{ x: iw, y: y(0) }} stroke="#5a708f" />
        {layers.map((l) => {
          const bx = x(l.index) ?? 0;
          const bw = x.bandwidth();
          if (l.errorPct === null || l.sePct === null)
            return (
              <g key={l.index} data-determinable="false">
                <rect x={bx} y={y(lim * 0.15)} width={bw} height={y(-lim * 0.15) - y(lim * 0.15)} fill="#d5dbe4" />
                <text x={bx + bw / 2} y={y(0) + 3} fontSize={8} textAnchor="middle" fill="#5a708f">n.d.</text>
                <title>{`Layer ${l.index + 1} (${l.material}): cannot be determined — ${l.reason ?? ""}`}</title>
              </g>
            );
          const e = l.errorPct;
          const lo = y(e - 2 * l.sePct);
          const hi = y(e + 2 * l.sePct);
          return (
            <g key={l.index} data-determinable="true">
              <Bar x={bx} width={bw} y={Math.min(y(0), y(e))} height={Math.abs(y(e) - y(0))} fill="#1f7f7a" />
              <Line from={{ x: bx + bw / 2, y: lo }} to={{ x: bx + bw / 2, y: hi }} stroke="#14233a" strokeWidth={1.2} />
              <Line from={{ x: bx + bw * 0.25, y: lo }} to={{ x: bx + bw * 0.75, y: lo }} stroke="#14233a" />
              <Line from={{ x: bx + bw * 0.25, y: hi }} to={{ x: bx + bw * 0.75, y: hi }} stroke="#14233a" />
              <title>{`Layer ${l.index + 1} (${l.material}): ${e >= 0 ? "+" : ""}${e.toFixed(2)} % ± ${l.sePct.toFixed(2)} % (1 SE)`}</title>
            </g>
          );
        })}
        <AxisLeft scale={y} numTicks={4} label="Thickness error (%)" labelOffset={26} tickLabelProps={{ fontSize: 10, fill: "#2c4669", textAnchor: "end", dx: -2, dy: 3 }} labelProps={{ fontSize: 11, fill: "#2c4669", textAnchor: "middle" }} stroke="#5a708f" />
        <AxisBottom top={ih} scale={x} tickFormat={(i) => String(Number(i) + 1)} numTicks={Math.min(layers.length, 25)} tickLabelProps={{ fontSize: 9, fill: "#2c4669", textAnchor: "middle" }} stroke="#5a708f" />
      </Group>
    </svg>
  );
}
