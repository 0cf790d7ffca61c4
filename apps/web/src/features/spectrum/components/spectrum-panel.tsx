import { useDeferredValue, useEffect, useId, useMemo, useState } from "react";
import { angleScan, bandConditionsText, bandView, spectrumToCsv } from "@stackproof/optics";
import type { BandView, Design, SpecMask } from "@stackproof/optics";
import { SpectrumChart } from "./spectrum-chart.tsx";
import type { ChartCurve, ChartEnvelope, ChartMarker, ChartViolation } from "./spectrum-chart.tsx";
import { useElementWidth } from "./use-element-width.ts";
import { useLiveSpectrum, useVerdicts } from "../lib/use-live-spectrum.ts";
import { forbiddenRegions } from "../lib/mask-geometry.ts";
import type { ChartQuantity } from "../lib/mask-geometry.ts";
import { QUANTITY_COLORS, QUANTITY_NAMES, spectrumCurves } from "../lib/curves.ts";
import type { SpectrumSettings } from "../lib/spectrum-engine.ts";
import { ColourReadout } from "./colour-readout.tsx";
import { ColourVerdict } from "./colour-verdict.tsx";

export interface ChartView {
  settings: SpectrumSettings;
  quantities: ChartQuantity[];
  scale: "percent" | "od";
}

export interface SpectrumPanelProps {
  design: Design;
  mask: SpecMask | null;
  view: ChartView;
  onViewChange: (view: ChartView) => void;
  overlays?: readonly ChartCurve[];
  envelopes?: readonly ChartEnvelope[];
  markers?: readonly ChartMarker[];
  onSelectRange?: (start: number, stop: number) => void;
  height?: number;
  title?: string;
  /** legend text for the solid curves (e.g. the revision they belong to) */
  primaryLabel?: string;
  /** offered beside each band (e.g. "start a review thread on this band") */
  bandAction?: { label: string; onPick: (bandId: string) => void };
}

const inputCls =
  "w-full rounded border border-ink-300 bg-white px-2 py-1 text-sm tabular focus-visible:outline-2 focus-visible:outline-film-teal";

export function SpectrumPanel(props: SpectrumPanelProps) {
  const { design, mask, view, onViewChange } = props;
  const [ref, width] = useElementWidth<HTMLDivElement>();
  const live = useLiveSpectrum(design, view.settings);
  // Band verdicts (each band at its own angle and polarization) may trail the curve by a render.
  const verdicts = useVerdicts(useDeferredValue(design), mask);
  const verdictMap = new Map<string, boolean>(verdicts?.ok ? verdicts.bands.map((b) => [b.id, b.pass]) : []);
  const regions = forbiddenRegions(mask?.bands ?? [], verdictMap);
  // A selected band is drawn at its own conditions (envelope over its angle range, cone average, s and p each),
  // computed by the optics package's bandView; its marks are the verdict's own violation points.
  const [selected, setSelected] = useState<string | null>(null);
  const [angleView, setAngleView] = useState<{ wavelength: number } | null>(null);
  const deferredDesign = useDeferredValue(design);
  const selectedBand = mask?.bands.find((b) => b.id === selected) ?? null;
  const bandState = useMemo((): { ok: true; view: BandView } | { ok: false; error: string } | null => {
    if (!mask || !selectedBand) return null;
    try {
      // The band's curve is drawn over the band and a quarter of its width on each side, at the chart's density:
      // a cone or an angle range costs many evaluations per wavelength (a ~100-layer bandpass in an f/2 cone takes
      // about 20 ms a wavelength here, so the whole chart's 801 points would hold the page for seconds).
      const [start, stop, points] = [view.settings.start, view.settings.stop, view.settings.points];
      const margin = (selectedBand.stop - selectedBand.start) / 4;
      const a = Math.max(start, selectedBand.start - margin);
      const b = Math.min(stop, selectedBand.stop + margin);
      const n = b > a && stop > start ? Math.round((points * (b - a)) / (stop - start)) : 2;
      return {
        ok: true,
        view: bandView(
          deferredDesign,
          mask,
          selectedBand.id,
          b > a
            ? { start: a, stop: b, points: Math.min(801, Math.max(2, n)) }
            : { start, stop, points: Math.min(801, Math.max(2, points)) },
        ),
      };
    } catch (e) {
      return { ok: false, error: e instanceof Error ? e.message : String(e) };
    }
  }, [deferredDesign, mask, selectedBand, view.settings.start, view.settings.stop, view.settings.points]);
  const bandCurves: ChartCurve[] =
    bandState?.ok === true
      ? bandState.view.curves.map((c, k) => ({
          id: `band-${k}`,
          label: c.label,
          quantity: bandState.view.quantity,
          wavelengths: bandState.view.wavelengths,
          values: c.values,
          color: c.polarization === "p" ? "#6a4fa3" : QUANTITY_COLORS[bandState.view.quantity],
          dashed: c.side === "highest",
          primary: true,
        }))
      : [];
  const violations: ChartViolation[] = [];
  if (verdicts?.ok && mask) {
    for (const band of mask.bands) {
      if (selected && band.id !== selected) continue;
      for (const v of verdicts.violations.get(band.id) ?? [])
        violations.push({ bandId: band.id, quantity: band.quantity, ...v });
    }
  }
  const scan = useMemo(() => {
    if (!angleView) return null;
    try {
      return { ok: true as const, scan: angleScan(deferredDesign, angleView.wavelength, 0, 80, 161) };
    } catch (e) {
      return { ok: false as const, error: e instanceof Error ? e.message : String(e) };
    }
  }, [deferredDesign, angleView]);
  const exportCsv = () => {
    if (!live.ok) return;
    const sp = live.spectrum;
    const cols: Record<string, ArrayLike<number>> = {
      [`R_pct_${view.settings.angleDeg}deg_${view.settings.polarization}`]: Array.from(sp.R, (v) => v * 100),
      [`T_pct_${view.settings.angleDeg}deg_${view.settings.polarization}`]: Array.from(sp.T, (v) => v * 100),
      [`A_pct_${view.settings.angleDeg}deg_${view.settings.polarization}`]: Array.from(sp.A, (v) => v * 100),
    };
    let text = spectrumToCsv(sp.wavelengths, cols);
    if (bandState?.ok) {
      const bv = bandState.view;
      text +=
        "\n" +
        spectrumToCsv(
          bv.wavelengths,
          Object.fromEntries(bv.curves.map((c) => [`${bv.id} ${bv.quantity} ${c.label}`, c.values])),
        );
    }
    const url = URL.createObjectURL(new Blob([text], { type: "text/csv" }));
    const a = document.createElement("a");
    a.href = url;
    a.download = `${design.name.replace(/[^\w.-]+/g, "_")}-spectrum.csv`;
    a.click();
    URL.revokeObjectURL(url);
  };
  const hasOD = (mask?.bands ?? []).some((b) => b.quantity === "OD");
  const curves = live.ok
    ? spectrumCurves(live.spectrum, view.scale === "od" ? ["OD"] : view.quantities, {
        idPrefix: "nominal-",
        primary: true,
      })
    : [];
  const set = (patch: Partial<SpectrumSettings>) =>
    onViewChange({ ...view, settings: { ...view.settings, ...patch } });
  const idp = useId();
  const toggleQuantity = (q: ChartQuantity) => {
    const has = view.quantities.includes(q);
    const next = has ? view.quantities.filter((x) => x !== q) : [...view.quantities, q];
    if (next.length > 0) onViewChange({ ...view, quantities: next });
  };

  return (
    <section aria-label="Spectrum" className="rounded-lg border border-ink-100 bg-white p-3">
      <div className="mb-2 flex flex-wrap items-end gap-x-4 gap-y-2 text-sm">
        <fieldset className="flex items-center gap-1">
          <legend className="sr-only">Quantities</legend>
          {view.scale === "percent"
            ? (["R", "T", "A"] as const).map((q) => (
                <button
                  key={q}
                  type="button"
                  aria-pressed={view.quantities.includes(q)}
                  onClick={() => toggleQuantity(q)}
                  title={QUANTITY_NAMES[q]}
                  className={`rounded px-2 py-0.5 font-mono text-xs ${view.quantities.includes(q) ? "bg-ink-900 text-paper" : "bg-ink-100 text-ink-700"}`}
                >
                  <span
                    className="mr-1 inline-block h-2 w-2 rounded-full"
                    style={{ background: QUANTITY_COLORS[q] }}
                    aria-hidden
                  />
                  {q}
                </button>
              ))
            : null}
          {hasOD ? (
            <button
              type="button"
              aria-pressed={view.scale === "od"}
              onClick={() => onViewChange({ ...view, scale: view.scale === "od" ? "percent" : "od" })}
              title="Optical density, −log₁₀ T: the scale of the mask's OD bands"
              className={`ml-1 rounded px-2 py-0.5 font-mono text-xs ${view.scale === "od" ? "bg-ink-900 text-paper" : "bg-ink-100 text-ink-700"}`}
            >
              OD
            </button>
          ) : null}
        </fieldset>
        <label className="flex flex-col text-xs text-ink-700">
          Polarization
          <select
            className={inputCls}
            value={view.settings.polarization}
            onChange={(e) => set({ polarization: e.target.value as SpectrumSettings["polarization"] })}
          >
            <option value="u">unpolarized</option>
            <option value="s">s</option>
            <option value="p">p</option>
          </select>
        </label>
        <NumberField
          label="Angle (°)"
          className="w-20"
          value={view.settings.angleDeg}
          min={0}
          max={89}
          step={1}
          live
          problem={(v) => (v >= 0 && v <= 89 ? null : "0 to 89°")}
          onCommit={(v) => set({ angleDeg: v })}
        />
        <NumberField
          label="Cone half-angle (°)"
          className="w-24"
          value={view.settings.coneHalfAngleDeg}
          min={0}
          max={30}
          step={0.5}
          live
          problem={(v) => (v >= 0 && v <= 30 ? null : "0 to 30°")}
          onCommit={(v) => set({ coneHalfAngleDeg: v })}
        />
        <NumberField
          id={`${idp}-from`}
          label="From (nm)"
          className="w-24"
          value={view.settings.start}
          min={1}
          problem={(v) => (v > 0 && v < view.settings.stop ? null : `below ${view.settings.stop} nm`)}
          onCommit={(v) => set({ start: v })}
        />
        <NumberField
          label="To (nm)"
          className="w-24"
          value={view.settings.stop}
          min={2}
          problem={(v) => (v > view.settings.start ? null : `above ${view.settings.start} nm`)}
          onCommit={(v) => set({ stop: v })}
        />
        {verdicts ? (
          <p className="ml-auto text-sm" data-testid="nominal-verdict">
            {verdicts.ok ? (
              <span
                className={
                  verdicts.pass ? "font-semibold text-verdict-pass" : "font-semibold text-verdict-fail"
                }
              >
                {verdicts.pass
                  ? "Nominal design meets the mask"
                  : `Nominal design misses ${verdicts.bands.filter((b) => !b.pass).length} ${mask?.colour?.length ? "requirement(s)" : "band(s)"}`}
              </span>
            ) : (
              <span className="text-verdict-fail">{verdicts.error}</span>
            )}
          </p>
        ) : null}
      </div>
      <div className="mb-1 flex flex-wrap items-center gap-2 text-xs">
        <p className="font-semibold text-ink-900" data-testid="chart-title">
          {angleView
            ? `R and T against angle at ${angleView.wavelength} nm`
            : bandState?.ok
              ? bandState.view.title
              : `Chart conditions: ${view.settings.angleDeg}°${view.settings.coneHalfAngleDeg > 0 ? `, cone ${view.settings.coneHalfAngleDeg}° half-angle` : ""}, ${view.settings.polarization === "u" ? "unpolarized" : `${view.settings.polarization}-polarized`}`}
        </p>
        {bandState && !bandState.ok ? <span className="text-verdict-fail">{bandState.error}</span> : null}
        {selected ? (
          <button type="button" className="rounded bg-ink-100 px-2 py-0.5" onClick={() => setSelected(null)}>
            Show chart conditions
          </button>
        ) : null}
        <button
          type="button"
          aria-pressed={angleView !== null}
          className={`ml-auto rounded px-2 py-0.5 ${angleView ? "bg-ink-900 text-paper" : "bg-ink-100 text-ink-700"}`}
          onClick={() =>
            setAngleView(
              angleView
                ? null
                : {
                    wavelength: Math.round(
                      selectedBand
                        ? (selectedBand.start + selectedBand.stop) / 2
                        : (view.settings.start + view.settings.stop) / 2,
                    ),
                  },
            )
          }
        >
          R/T vs angle
        </button>
        {angleView ? (
          <NumberField
            label="at (nm)"
            className="w-24"
            value={angleView.wavelength}
            min={1}
            problem={(v) => (v > 0 ? null : "a wavelength > 0 nm")}
            onCommit={(v) => setAngleView({ wavelength: v })}
          />
        ) : null}
        <button
          type="button"
          className="rounded bg-ink-100 px-2 py-0.5 text-ink-700"
          onClick={exportCsv}
          disabled={!live.ok}
        >
          Export CSV
        </button>
      </div>
      <div ref={ref} className="w-full" style={{ contain: "layout paint" }}>
        {angleView && scan ? (
          scan.ok ? (
            <SpectrumChart
              width={width}
              height={props.height ?? 340}
              scale="percent"
              domain={{ start: 0, stop: 80 }}
              xLabel="Angle of incidence (°)"
              curves={(["R", "T"] as const).flatMap((q) =>
                (["s", "p", "u"] as const).map((pol) => ({
                  id: `angle-${q}-${pol}`,
                  label: `${q} ${pol === "u" ? "unpolarized" : pol}`,
                  quantity: q,
                  wavelengths: scan.scan.anglesDeg,
                  values: scan.scan[pol][q].map((v) => v * 100),
                  color: QUANTITY_COLORS[q],
                  dashed: pol !== "u",
                  primary: pol === "u",
                })),
              )}
              regions={[]}
              title={`${design.name}: R and T against angle of incidence at ${angleView.wavelength} nm (s, p dashed; unpolarized solid)`}
            />
          ) : (
            <div
              role="alert"
              className="rounded border border-verdict-fail/40 bg-verdict-fail/5 p-4 text-sm text-verdict-fail"
            >
              R/T against angle cannot be computed: {scan.error}
            </div>
          )
        ) : live.ok ? (
          <SpectrumChart
            width={width}
            height={props.height ?? 340}
            scale={view.scale}
            domain={{ start: view.settings.start, stop: view.settings.stop }}
            curves={[
              ...(bandCurves.length > 0
                ? curves.map((c) => ({ ...c, primary: false, dashed: true }))
                : curves),
              ...bandCurves,
              ...(props.overlays ?? []),
            ]}
            regions={selectedBand ? regions.filter((r) => r.bandId === selectedBand.id) : regions}
            envelopes={props.envelopes}
            markers={props.markers}
            violations={violations}
            title={
              bandState?.ok
                ? bandState.view.title
                : (props.title ??
                  `Spectrum of ${design.name} at ${view.settings.angleDeg}°${view.settings.coneHalfAngleDeg > 0 ? ` (cone of half-angle ${view.settings.coneHalfAngleDeg}°)` : ""}, ${view.settings.polarization === "u" ? "unpolarized" : `${view.settings.polarization}-polarized`}`)
            }
            onSelectRange={props.onSelectRange}
          />
        ) : (
          <div
            role="alert"
            className="rounded border border-verdict-fail/40 bg-verdict-fail/5 p-4 text-sm text-verdict-fail"
          >
            The spectrum cannot be computed: {live.error}
          </div>
        )}
      </div>
      {hasOD && view.scale === "percent" ? (
        <p className="mt-1 text-xs text-ink-700" data-testid="od-hint">
          The mask’s optical-density bands are drawn on the OD scale:{" "}
          <button type="button" className="underline" onClick={() => onViewChange({ ...view, scale: "od" })}>
            show OD
          </button>
          .
        </p>
      ) : null}
      <Legend
        overlays={props.overlays ?? []}
        hasEnvelope={(props.envelopes ?? []).length > 0}
        primaryLabel={props.primaryLabel}
      />
      {view.settings.start <= 700 && view.settings.stop >= 430 ? (
        <ColourReadout
          design={design}
          angleDeg={view.settings.angleDeg}
          polarization={view.settings.polarization}
        />
      ) : null}
      {verdicts?.ok && mask ? (
        <ul
          className="mt-2 grid max-h-24 gap-1 overflow-y-auto text-xs sm:grid-cols-2"
          aria-label="Spec bands"
        >
          {verdicts.bands.map((b) => {
            if (b.colour) {
              const requirement = mask.colour?.find((x) => x.id === b.id);
              return (
                <li
                  key={b.id}
                  className="flex items-center gap-2 sm:col-span-2"
                  data-colour-requirement={b.id}
                >
                  <ColourVerdict outcome={b} requirement={requirement} />
                  {props.bandAction ? (
                    <button
                      type="button"
                      className="rounded border border-film-violet/40 px-1.5 text-film-violet hover:bg-film-violet/10"
                      aria-label={`${props.bandAction.label}: ${requirement?.label ?? b.id}`}
                      onClick={() => props.bandAction?.onPick(b.id)}
                    >
                      {props.bandAction.label}
                    </button>
                  ) : null}
                </li>
              );
            }
            const band = mask.bands.find((x) => x.id === b.id);
            return (
              <li
                key={b.id}
                className={`flex items-center gap-2 ${selected === b.id ? "rounded bg-ink-100" : ""}`}
                data-band={b.id}
              >
                <span
                  className={`rounded px-1.5 py-0.5 font-semibold ${b.pass ? "bg-verdict-pass/10 text-verdict-pass" : "bg-verdict-fail/10 text-verdict-fail"}`}
                >
                  {b.pass ? "pass" : "fail"}
                </span>
                <button
                  type="button"
                  className="truncate text-left underline decoration-dotted"
                  aria-pressed={selected === b.id}
                  title={
                    band
                      ? `Show ${band.label ?? band.id} at its own conditions (${bandConditionsText(band)})`
                      : undefined
                  }
                  onClick={() => {
                    setAngleView(null);
                    setSelected(selected === b.id ? null : b.id);
                  }}
                >
                  {band?.label ?? b.id}
                </button>
                <span
                  className="ml-auto tabular text-ink-500"
                  title="Margin: distance inside the band's limit (negative = outside), in the band's own unit"
                >
                  {b.reason ? (
                    b.reason
                  ) : (
                    <>
                      margin {b.margin >= 0 ? "+" : ""}
                      {b.margin.toFixed(2)}
                      {band?.quantity === "OD" ? " OD" : " % pts"}
                    </>
                  )}{" "}
                  · {band ? bandConditionsText(band) : ""} · worst {b.worst.wavelength} nm,{" "}
                  {b.worst.angleDeg.toFixed(1)}° {b.worst.polarization}
                </span>
                {props.bandAction ? (
                  <button
                    type="button"
                    className="rounded border border-film-violet/40 px-1.5 text-film-violet hover:bg-film-violet/10"
                    aria-label={`${props.bandAction.label}: ${band?.label ?? b.id}`}
                    onClick={() => props.bandAction?.onPick(b.id)}
                  >
                    {props.bandAction.label}
                  </button>
                ) : null}
              </li>
            );
          })}
        </ul>
      ) : null}
    </section>
  );
}

/**
 * A number box that keeps what is typed while it is being typed: `live` fields take every valid value at once
 * (angles), the others on Enter or when focus leaves (a range edge, so "380" does not pass through 3 and 38 nm).
 * An unusable value stays visible, marked, with the allowed range; leaving the field puts the last good value back.
 */
function NumberField(props: {
  label: string;
  value: number;
  onCommit: (v: number) => void;
  problem: (v: number) => string | null;
  className: string;
  min?: number;
  max?: number;
  step?: number;
  live?: boolean;
  id?: string;
}) {
  const [draft, setDraft] = useState<string | null>(null);
  const autoId = useId();
  const id = props.id ?? autoId;
  useEffect(() => setDraft(null), [props.value]);
  const text = draft ?? String(props.value);
  const n = Number(text.trim().replace(",", "."));
  const problem = text.trim() === "" || !Number.isFinite(n) ? "a number" : props.problem(n);
  const take = () => {
    if (draft === null) return;
    if (!problem && n !== props.value) props.onCommit(n);
    setDraft(null);
  };
  return (
    <label className={`flex flex-col text-xs text-ink-700 ${props.className}`} htmlFor={id}>
      {props.label}
      <input
        id={id}
        className={`${inputCls} ${problem && draft !== null ? "border-verdict-fail" : ""}`}
        type="number"
        min={props.min}
        max={props.max}
        step={props.step ?? "any"}
        value={text}
        aria-invalid={problem && draft !== null ? true : undefined}
        title={
          problem && draft !== null ? `Use ${problem}; leaving the field keeps ${props.value}` : undefined
        }
        onChange={(e) => {
          setDraft(e.target.value);
          const v = Number(e.target.value);
          if (props.live && e.target.value.trim() !== "" && Number.isFinite(v) && !props.problem(v))
            props.onCommit(v);
        }}
        onKeyDown={(e) => {
          if (e.key === "Enter") take();
          else if (e.key === "Escape") setDraft(null);
        }}
        onBlur={take}
      />
    </label>
  );
}

function Legend({
  overlays,
  hasEnvelope,
  primaryLabel,
}: {
  overlays: readonly ChartCurve[];
  hasEnvelope: boolean;
  primaryLabel?: string;
}) {
  return (
    <div className="mt-1 flex flex-wrap gap-x-4 gap-y-1 text-xs text-ink-700" aria-label="Legend">
      {primaryLabel ? (
        <span className="flex items-center gap-1.5">
          <span className="inline-block h-0.5 w-4 bg-film-teal" aria-hidden /> {primaryLabel}
        </span>
      ) : null}
      <span className="flex items-center gap-1.5">
        <span className="inline-block h-3 w-4 bg-ink-500/20" aria-hidden /> forbidden by the mask
      </span>
      <span className="flex items-center gap-1.5">
        <span className="inline-block w-4 border-t-2 border-dashed border-ink-700" aria-hidden /> limit on a
        band average
      </span>
      <span className="flex items-center gap-1.5">
        <span className="inline-block h-2 w-2 rounded-full bg-verdict-fail" aria-hidden /> violation (at the
        band’s own conditions)
      </span>
      {hasEnvelope ? (
        <span className="flex items-center gap-1.5">
          <span className="inline-block h-3 w-4 bg-film-teal-soft/60" aria-hidden /> 5–95 % of simulated
          builds
        </span>
      ) : null}
      {overlays.map((c) => (
        <span key={c.id} className="flex items-center gap-1.5">
          <span
            className="inline-block h-0.5 w-4"
            style={{ background: c.color, borderTop: c.dashed ? `2px dashed ${c.color}` : undefined }}
            aria-hidden
          />{" "}
          {c.label}
        </span>
      ))}
    </div>
  );
}
