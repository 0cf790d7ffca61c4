// Lots of measured parts of this revision: upload (with the file's reading shown for the user to confirm),
// the lot table with per-part, per-band verdicts, actual yield next to predicted, and server fits of parts.
import { useState } from "react";
import type { FormEvent } from "react";
import type { Design, MeasuredSpectrum } from "@stackproof/optics";
import { scaleLinear } from "@visx/scale";
import { LinePath, Line } from "@visx/shape";
import { AxisBottom, AxisLeft } from "@visx/axis";
import { Group } from "@visx/group";
import { ApiError } from "../../../lib/api-client.ts";
import { useFitPart, useLot, usePreviewSpectra, useProgramLots, useUploadLot, type Lot, type SpectraPreview } from "../api/lots.ts";
import { FitReport } from "./fit-report.tsx";

const field = "mt-0.5 w-full rounded border border-ink-300 bg-white px-2 py-1 text-sm";
const pct = (v: number | null | undefined) => (v === null || v === undefined ? "—" : `${(v * 100).toFixed(1)} %`);

export function LotPanel(props: { revisionId: string; programId: string; design: Design; canUpload: boolean; width: number }) {
  const lots = useProgramLots(props.programId);
  const mine = (lots.data ?? []).filter((l) => l.revisionId === props.revisionId);
  const [open, setOpen] = useState<string | null>(null);
  return (
    <section aria-labelledby="lots-h" className="space-y-3 border-t border-ink-100 pt-3">
      <h3 id="lots-h" className="text-sm font-semibold">Measured lots</h3>
      {lots.error ? <p role="alert" className="text-xs text-verdict-fail">Could not load lots: {lots.error.message}</p> : null}
      {lots.data && mine.length === 0 ? <p className="text-xs text-ink-500">No lots measured against this revision yet.</p> : null}
      {mine.length > 0 ? (
        <table className="w-full border-collapse text-left text-xs" aria-label="Lots">
          <thead>
            <tr className="border-b border-ink-100 text-ink-500">
              <th className="py-1 pr-2 font-medium">Run</th>
              <th className="py-1 pr-2 font-medium">Date</th>
              <th className="py-1 pr-2 font-medium">Chamber</th>
              <th className="py-1 pr-2 font-medium">Passed</th>
              <th className="py-1 pr-2 font-medium">Actual yield (95 %)</th>
              <th className="py-1 pr-2 font-medium">Predicted</th>
            </tr>
          </thead>
          <tbody>
            {mine.map((l) => (
              <tr key={l.id} className="border-b border-ink-50">
                <td className="py-1 pr-2">
                  <button type="button" className="underline" aria-expanded={open === l.id} onClick={() => setOpen(open === l.id ? null : l.id)}>
                    {l.runId}
                  </button>
                </td>
                <td className="py-1 pr-2">{l.runDate}</td>
                <td className="py-1 pr-2">{l.chamber}</td>
                <td className="py-1 pr-2 font-mono">
                  {l.summary.passed}/{l.summary.evaluated}
                  {l.summary.parts > l.summary.evaluated ? ` (${l.summary.parts - l.summary.evaluated} incomplete)` : ""}
                </td>
                <td className="py-1 pr-2 font-mono">
                  {pct(l.summary.yield)} {l.summary.interval ? `(${pct(l.summary.interval.low)}–${pct(l.summary.interval.high)})` : ""}
                </td>
                <td className={`py-1 pr-2 font-mono ${l.summary.predicted && !l.summary.predicted.overlaps ? "text-verdict-fail" : ""}`}>
                  {l.summary.predicted ? pct(l.summary.predicted.yield) : "no run"}
                  {l.summary.predicted && !l.summary.predicted.overlaps ? " — differs" : ""}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      ) : null}
      {open ? <LotDetail lotId={open} programId={props.programId} canFit={props.canUpload} width={props.width} /> : null}
      {props.canUpload ? <LotUploadForm revisionId={props.revisionId} programId={props.programId} /> : null}
    </section>
  );
}

function LotDetail({ lotId, programId, canFit, width }: { lotId: string; programId: string; canFit: boolean; width: number }) {
  const lot = useLot(lotId);
  const fit = useFitPart(lotId, programId);
  const [shown, setShown] = useState<string | null>(null);
  if (lot.isPending) return <p className="text-xs text-ink-500">Loading the lot…</p>;
  if (lot.error) return <p role="alert" className="text-xs text-verdict-fail">{lot.error.message}</p>;
  const l: Lot = lot.data;
  const bands = l.parts?.[0]?.verdict.bands.map((b) => b.bandId) ?? [];
  const part = l.parts?.find((p) => p.id === shown);
  return (
    <div className="space-y-2">
      {l.summary.cautions.map((c) => (
        <p key={c} role="note" className="text-xs text-verdict-fail">{c}</p>
      ))}
      <table className="w-full border-collapse text-left text-xs" aria-label={`Parts of run ${l.runId}`} data-testid="lot-parts">
        <thead>
          <tr className="border-b border-ink-100 text-ink-500">
            <th className="py-1 pr-2 font-medium">Part</th>
            <th className="py-1 pr-2 font-medium">Verdict</th>
            {bands.map((b) => (
              <th key={b} className="py-1 pr-2 font-medium">{b} margin (guarded)</th>
            ))}
            <th className="py-1 pr-2 font-medium">Fit</th>
          </tr>
        </thead>
        <tbody>
          {(l.parts ?? []).map((p) => (
            <tr key={p.id} className="border-b border-ink-50">
              <td className="py-1 pr-2">{p.label}</td>
              <td className={`py-1 pr-2 font-semibold ${p.status === "pass" ? "text-verdict-pass" : p.status === "fail" ? "text-verdict-fail" : "text-ink-500"}`}>{p.status}</td>
              {p.verdict.bands.map((b) => (
                <td key={b.bandId} className={`py-1 pr-2 font-mono ${b.status === "fail" ? "text-verdict-fail" : ""}`}>
                  {b.margin === null ? "not measured" : `${b.margin.toFixed(2)} (${b.guardedMargin!.toFixed(2)})`}
                </td>
              ))}
              <td className="py-1 pr-2">
                {p.fit ? (
                  <button type="button" className="underline" onClick={() => setShown(shown === p.id ? null : p.id)}>
                    {shown === p.id ? "hide" : "show"}
                  </button>
                ) : canFit ? (
                  <button type="button" className="underline disabled:opacity-40" disabled={fit.isPending} onClick={() => fit.mutate(p.id, { onSuccess: () => setShown(p.id) })}>
                    {fit.isPending && fit.variables === p.id ? "fitting…" : "fit"}
                  </button>
                ) : (
                  "—"
                )}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      <p className="text-xs text-ink-500">
        A band passes only when its margin exceeds {l.guardK} × the measurement uncertainty (guard band): a part exactly at a limit fails.
      </p>
      {fit.error ? <p role="alert" className="text-xs text-verdict-fail">{fit.error.message}</p> : null}
      {part?.fit ? (
        <div className="space-y-2">
          {part.measurements.map((m, k) => (
            <PartSpectrumChart key={k} m={m} fitted={part.fit!.models[part.fit!.chosen]?.fitted[k] ?? null} width={Math.min(width, 620)} />
          ))}
          <FitReport fit={part.fit} width={Math.min(width, 620)} />
        </div>
      ) : null}
    </div>
  );
}

function LotUploadForm({ revisionId, programId }: { revisionId: string; programId: string }) {
  const preview = usePreviewSpectra();
  const upload = useUploadLot(revisionId, programId);
  const [file, setFile] = useState<File | null>(null);
  const [read, setRead] = useState<SpectraPreview | null>(null);
  const [form, setForm] = useState({ scale: "" as "" | "percent" | "fraction", quantity: "T" as "R" | "T", angleDeg: "0", polarization: "u" as "s" | "p" | "u", uncertaintyPct: "0.2", runId: "", runDate: new Date().toISOString().slice(0, 10), chamber: "" });
  const [error, setError] = useState<string | null>(null);
  const choose = (f: File | null) => {
    setFile(f);
    setRead(null);
    setForm((x) => ({ ...x, scale: "" }));
    if (f)
      preview.mutate(f, {
        onSuccess: (p) => {
          setRead(p);
          setForm((x) => ({ ...x, scale: p.detectedScale }));
        },
      });
  };
  const submit = (e: FormEvent) => {
    e.preventDefault();
    if (!file || !read) return setError("Choose a file and check how it was read.");
    if (form.scale === "") return setError("Confirm whether the values are percent or fractions.");
    if (!form.runId.trim()) return setError("Enter the run id.");
    setError(null);
    upload.mutate({ file, scale: form.scale, quantity: form.quantity, angleDeg: Number(form.angleDeg), polarization: form.polarization, uncertaintyPct: Number(form.uncertaintyPct), runId: form.runId.trim(), runDate: form.runDate, chamber: form.chamber.trim() });
  };
  const problems = [preview.error, upload.error].flatMap((er) => (er instanceof ApiError && Array.isArray(er.details) ? (er.details as { row?: number; column?: string; message?: string }[]) : []));
  return (
    <form onSubmit={submit} aria-label="Upload a lot" className="grid grid-cols-2 gap-2 rounded-md border border-ink-100 p-3 text-xs text-ink-700 md:grid-cols-4">
      <label className="col-span-2">
        Lot file (wavelength column + one column per part; , ; or tab separated)
        <input type="file" accept=".csv,.txt,text/csv,text/plain" className={field} onChange={(e) => choose(e.target.files?.[0] ?? null)} />
      </label>
      {read ? (
        <fieldset className="col-span-2 rounded border border-film-amber/40 p-2">
          <legend>How the file was read — confirm</legend>
          <p>
            {read.rows} rows, {read.wavelengthRange[0]}–{read.wavelengthRange[1]} nm{read.reversed ? " (descending, reordered)" : ""}; separator “{read.delimiter}”{read.decimalComma ? ", decimal comma" : ""}; {read.columns.length} parts: {read.columns.slice(0, 6).join(", ")}
            {read.columns.length > 6 ? "…" : ""}
          </p>
          <p>Values look like {read.detectedScale === "fraction" ? "fractions (0–1)" : "percent (0–100)"}. They are:</p>
          <label className="mr-3"><input type="radio" name="scale" checked={form.scale === "percent"} onChange={() => setForm({ ...form, scale: "percent" })} /> percent</label>
          <label><input type="radio" name="scale" checked={form.scale === "fraction"} onChange={() => setForm({ ...form, scale: "fraction" })} /> fractions</label>
        </fieldset>
      ) : null}
      <label>Quantity<select className={field} value={form.quantity} onChange={(e) => setForm({ ...form, quantity: e.target.value as "R" | "T" })}><option value="T">T</option><option value="R">R</option></select></label>
      <label>Angle (°)<input className={field} value={form.angleDeg} inputMode="decimal" onChange={(e) => setForm({ ...form, angleDeg: e.target.value })} /></label>
      <label>Polarization<select className={field} value={form.polarization} onChange={(e) => setForm({ ...form, polarization: e.target.value as "s" | "p" | "u" })}><option value="u">unpolarized</option><option value="s">s</option><option value="p">p</option></select></label>
      <label>Uncertainty, 1σ (pp)<input className={field} value={form.uncertaintyPct} inputMode="decimal" onChange={(e) => setForm({ ...form, uncertaintyPct: e.target.value })} /></label>
      <label>Run id<input className={field} value={form.runId} onChange={(e) => setForm({ ...form, runId: e.target.value })} /></label>
      <label>Run date<input type="date" className={field} value={form.runDate} onChange={(e) => setForm({ ...form, runDate: e.target.value })} /></label>
      <label>Chamber<input className={field} value={form.chamber} onChange={(e) => setForm({ ...form, chamber: e.target.value })} /></label>
      <div className="col-span-2 flex items-center gap-2 md:col-span-4">
        <button type="submit" disabled={upload.isPending || preview.isPending} className="rounded border border-ink-300 bg-white px-3 py-1 text-sm">
          {upload.isPending ? "Uploading…" : "Upload lot"}
        </button>
        {error ? <span role="alert" className="text-verdict-fail">{error}</span> : null}
        {preview.error ? <span role="alert" className="text-verdict-fail">{preview.error.message}</span> : null}
        {upload.error ? <span role="alert" className="text-verdict-fail">{upload.error.message}</span> : null}
        {upload.isSuccess ? <span>Lot stored.</span> : null}
      </div>
      {problems.length > 0 ? (
        <ul className="col-span-2 list-disc pl-5 text-verdict-fail md:col-span-4" aria-label="Problems in the file">
          {problems.map((d, i) => (
            <li key={i}>line {d.row}{d.column && d.column !== "-" ? `, column ${d.column}` : ""}: {d.message}</li>
          ))}
        </ul>
      ) : null}
      {preview.error || upload.error ? <p className="col-span-2 text-ink-500 md:col-span-4">Nothing was stored; fix the file and try again.</p> : null}
    </form>
  );
}

/** Measured and fitted spectrum of one measurement of a part, and their residual (measured − fit) below. */
function PartSpectrumChart({ m, fitted, width }: { m: MeasuredSpectrum; fitted: number[] | null; width: number }) {
  const mg = { top: 8, right: 16, bottom: 40, left: 44 };
  const h1 = 150;
  const h2 = 60;
  const height = mg.top + h1 + 12 + h2 + mg.bottom;
  const iw = Math.max(10, width - mg.left - mg.right);
  const wl = Array.from(m.wavelengths);
  const v = Array.from(m.values);
  const idx = wl.map((_, i) => i);
  const x = scaleLinear<number>({ domain: [wl[0] ?? 0, wl[wl.length - 1] ?? 1], range: [0, iw] });
  const y = scaleLinear<number>({ domain: [0, Math.max(100, ...v)], range: [h1, 0] });
  const res = fitted ? v.map((val, i) => val - (fitted[i] ?? 0)) : [];
  const lim = Math.max(0.2, ...res.map(Math.abs));
  const yr = scaleLinear<number>({ domain: [-lim, lim], range: [h2, 0] });
  const tick = { fontSize: 9, fill: "#2c4669", textAnchor: "end" as const, dx: -2, dy: 3 };
  return (
    <svg width={width} height={height} role="img" aria-label={`Measured and fitted ${m.quantity} at ${m.angleDeg}° with the residual`} data-testid="part-spectrum">
      <Group left={mg.left} top={mg.top}>
        <LinePath<number> data={idx} x={(i) => x(wl[i] ?? 0)} y={(i) => y(v[i] ?? 0)} stroke="#d98a2b" strokeWidth={1.5} fill="none" />
        {fitted ? <LinePath<number> data={idx} x={(i) => x(wl[i] ?? 0)} y={(i) => y(fitted[i] ?? 0)} stroke="#1f7f7a" strokeWidth={1.2} strokeDasharray="4 3" fill="none" /> : null}
        <AxisLeft scale={y} numTicks={4} label={`${m.quantity} (%)`} labelOffset={26} tickLabelProps={tick} labelProps={{ fontSize: 10, fill: "#2c4669", textAnchor: "middle" }} stroke="#5a708f" />
        <Group top={h1 + 12}>
          <Line from={{ x: 0, y: yr(0) }} to={{ x: iw, y: yr(0) }} stroke="#a9b6c8" />
          {fitted ? <LinePath<number> data={idx} x={(i) => x(wl[i] ?? 0)} y={(i) => yr(res[i] ?? 0)} stroke="#14233a" strokeWidth={1} fill="none" /> : null}
          <AxisLeft scale={yr} numTicks={2} label="resid." labelOffset={26} tickLabelProps={tick} labelProps={{ fontSize: 10, fill: "#2c4669", textAnchor: "middle" }} stroke="#5a708f" />
          <AxisBottom top={h2} scale={x} numTicks={6} label={`Wavelength (nm) — amber: measured, teal dashed: fit; below: measured − fit (pp), ${m.polarization === "u" ? "unpolarized" : m.polarization}`} labelOffset={8} tickLabelProps={{ fontSize: 9, fill: "#2c4669", textAnchor: "middle" }} labelProps={{ fontSize: 10, fill: "#2c4669", textAnchor: "middle" }} stroke="#5a708f" />
        </Group>
      </Group>
    </svg>
  );
}
