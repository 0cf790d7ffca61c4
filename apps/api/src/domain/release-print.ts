// The printable release record: one self-contained HTML page (inline CSS and SVG, no scripts, no external resources).
import {
  ACTION_LABEL,
  REQUIREMENT_LABEL,
  plotCaption,
  plotRange,
  plotSegments,
  readReleaseRecord,
  unitOf,
  type RecordPlot,
  type ReleaseRecord,
} from "./release-record.ts";
import type { ReleaseSnapshot } from "./workflow.ts";

const esc = (s: unknown): string =>
  String(s ?? "").replace(
    /[&<>"']/g,
    (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c] ?? c,
  );

const pct = (x: number | null, digits = 1) => (x === null ? "—" : `${(x * 100).toFixed(digits)} %`);
const when = (iso: string) => {
  const d = new Date(iso);
  return Number.isNaN(d.getTime()) ? "—" : d.toUTCString();
};

/** One spectrum panel: band limits (thick), 5–95 % envelope (shaded) and the nominal curve, in SVG user units. */
function plotSvg(p: RecordPlot): string {
  const W = 640;
  const H = 240;
  const m = { l: 48, r: 10, t: 10, b: 34 };
  const { x0, x1, y0, y1 } = plotRange(p);
  const X = (x: number) => m.l + ((x - x0) / (x1 - x0)) * (W - m.l - m.r);
  const Y = (y: number) => H - m.b - ((y - y0) / (y1 - y0)) * (H - m.t - m.b);
  const segments = plotSegments(p.wavelengths);
  const path = (ys: (number | null)[]) => {
    let d = "";
    for (const run of segments) {
      let pen = false;
      for (const i of run) {
        const x = p.wavelengths[i] as number;
        const y = ys[i];
        if (y === null || y === undefined || !Number.isFinite(x)) {
          pen = false;
          continue;
        }
        d += `${pen ? "L" : "M"}${X(x).toFixed(1)},${Y(y).toFixed(1)}`;
        pen = true;
      }
    }
    return d;
  };
  let band = "";
  if (p.low && p.high) {
    const lo = p.low;
    const hi = p.high;
    for (const run of segments) {
      const idx = run.filter((i) => lo[i] !== null && hi[i] !== null);
      if (idx.length < 2) continue;
      const top = idx.map(
        (i) => `${X(p.wavelengths[i] as number).toFixed(1)},${Y(hi[i] as number).toFixed(1)}`,
      );
      const bottom = idx
        .slice()
        .reverse()
        .map((i) => `${X(p.wavelengths[i] as number).toFixed(1)},${Y(lo[i] as number).toFixed(1)}`);
      band += `<polygon points="${[...top, ...bottom].join(" ")}" fill="#9fb7c9" fill-opacity="0.55" stroke="none"/>`;
    }
  }
  const limits = p.bands
    .filter((b) => b.value !== null)
    .map(
      (b) =>
        `<line x1="${X(b.start).toFixed(1)}" x2="${X(b.stop).toFixed(1)}" y1="${Y(b.value as number).toFixed(1)}" y2="${Y(b.value as number).toFixed(1)}" stroke="#b3261e" stroke-width="2.5"/><text x="${X(b.start).toFixed(1)}" y="${(Y(b.value as number) - 4).toFixed(1)}" font-size="9" fill="#b3261e">${esc(b.id)}</text>`,
    )
    .join("");
  const ticks = (a: number, b: number) => Array.from({ length: 5 }, (_, i) => a + ((b - a) * i) / 4);
  const axes = [
    `<line x1="${m.l}" x2="${W - m.r}" y1="${H - m.b}" y2="${H - m.b}" stroke="#1b1f1d"/>`,
    `<line x1="${m.l}" x2="${m.l}" y1="${m.t}" y2="${H - m.b}" stroke="#1b1f1d"/>`,
    ...ticks(x0, x1).map(
      (x) =>
        `<text x="${X(x).toFixed(1)}" y="${H - m.b + 12}" font-size="9" text-anchor="middle">${x.toFixed(0)}</text>`,
    ),
    ...ticks(y0, y1).map(
      (y) =>
        `<text x="${m.l - 4}" y="${(Y(y) + 3).toFixed(1)}" font-size="9" text-anchor="end">${y.toFixed(p.quantity === "OD" || y1 - y0 < 5 ? 1 : 0)}</text>`,
    ),
    `<text x="${(m.l + W - m.r) / 2}" y="${H - 4}" font-size="10" text-anchor="middle">Wavelength (nm)</text>`,
    `<text x="12" y="${(m.t + H - m.b) / 2}" font-size="10" text-anchor="middle" transform="rotate(-90 12 ${(m.t + H - m.b) / 2})">${esc(p.quantity)}${p.quantity === "OD" ? "" : " (%)"}</text>`,
  ].join("");
  return `<figure class="plot"><svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${W} ${H}" width="100%" role="img" aria-label="${esc(plotCaption(p))}">${band}${limits}<path d="${path(p.nominal)}" fill="none" stroke="#1b1f1d" stroke-width="1.4"/>${axes}</svg>
<figcaption>${esc(plotCaption(p))}: nominal (black line), ${p.lowP ?? 5}–${p.highP ?? 95} % envelope of the evidence run (shaded), band limits (red).</figcaption></figure>`;
}

function body(r: ReleaseRecord): string {
  const title = `Release record — ${r.design} rev ${r.revision.number ?? "?"}`;
  const rows = (cells: string[][]) =>
    cells.map((c) => `<tr>${c.map((x) => `<td>${x}</td>`).join("")}</tr>`).join("");
  const y = r.run;
  const e = r.evidence;
  const d = r.deviation;
  return `<h1>${esc(title)}</h1>
<p class="meta">${esc(r.workspace)} · program ${esc(r.program.name)}${r.program.customer ? ` for ${esc(r.program.customer)}` : ""} · released ${esc(when(r.releasedAt))} by ${esc(r.releasedBy)} · <span class="status">${esc(r.status)}</span></p>
${r.caution ? `<div class="caution">Caution: ${esc(r.caution)}</div>` : ""}
${r.status === "withdrawn" ? `<div class="caution">This release has since been withdrawn and must not be used for production.</div>` : ""}
<h2>Identity</h2>
<dl>
<dt>Program</dt><dd>${esc(r.program.name)}${r.program.application ? ` — ${esc(r.program.application)}` : ""}${r.program.version !== null ? `, version ${r.program.version}` : ""}</dd>
<dt>Design</dt><dd>${esc(r.design)}, revision ${esc(r.revision.number ?? "?")}</dd>
<dt>Author</dt><dd>${esc(r.revision.author)} (${esc(when(r.revision.createdAt))})</dd>
<dt>Content hash (sha-256)</dt><dd class="mono">${esc(r.revision.hash)}</dd>
<dt>Target yield</dt><dd>${pct(r.program.targetYield)}</dd>
${r.revision.note ? `<dt>Revision note</dt><dd>${esc(r.revision.note)}</dd>` : ""}
</dl>
<h2>Evidence</h2>
${
  y
    ? `<dl>
<dt>Point yield</dt><dd><strong>${pct(y.yield)}</strong> (${esc(y.passCount ?? "—")} of ${esc(y.trials ?? "—")} simulated builds pass every band)</dd>
${
  e
    ? `<dt>Lower bound</dt><dd><strong>${pct(e.lowerBound, 2)}</strong> (two-sided Wilson interval at ${pct(e.confidence)} confidence) against the target ${pct(e.targetYield)}: <strong>${e.pass === true ? "meets the target" : e.pass === false ? "below the target" : "—"}</strong></dd>
<dt>Evidence rules</dt><dd>at least ${esc(e.minTrials ?? "—")} trials; bound at ${pct(e.confidence)} ≥ target; program version ${esc(e.programVersion ?? "—")}</dd>
<dt>Seed rule</dt><dd>${esc(e.seedRule)}</dd>`
    : `<dt>Evidence rules</dt><dd>Released before evidence rules were recorded: no lower bound is stored with this release.</dd>`
}
<dt>95 % interval (Wilson)</dt><dd>${pct(y.low95)} – ${pct(y.high95)}</dd>
<dt>Trials</dt><dd>${esc(y.trials ?? "—")}</dd>
<dt>Seed</dt><dd class="mono">${esc(y.seed)}</dd>
<dt>Error model</dt><dd>${esc(y.errorModelText)}</dd>
<dt>Error model (as stored)</dt><dd class="mono">${esc(y.errorModel)}</dd>
<dt>Engine version</dt><dd>${esc(y.engineVersion)}</dd>
<dt>Run</dt><dd class="mono">${esc(y.id)}${y.clientVerified ? " — browser result verified by the server's re-run" : " — computed by the server"}</dd>
</dl>`
    : "<p>No yield run is recorded.</p>"
}
<h2>Spectrum against the mask</h2>
${r.plots.length > 0 ? r.plots.map(plotSvg).join("\n") : "<p>No spectrum is stored with this release (released before plots were recorded).</p>"}
<h2>Specification, margins and nominal result</h2>
<table><thead><tr><th>Band</th><th>Range (nm)</th><th>Quantity</th><th>Requirement</th><th class="num">Nominal margin</th><th>Nominal</th><th class="num">Failures in evidence run</th></tr></thead><tbody>
${rows(
  r.bands
    .map((b) => [
      esc(b.label ? `${b.label} (${b.id})` : b.id),
      `${b.start}–${b.stop}`,
      `${esc(b.quantity)}, ${b.angleDeg}°, ${esc(b.polarization)}`,
      `${esc(REQUIREMENT_LABEL[b.requirement] ?? b.requirement)} ${esc(b.value ?? "—")}${unitOf(b.quantity)}${b.tolerance ? ` (tol. ${b.tolerance})` : ""}`,
      b.nominalMargin !== null ? `${b.nominalMargin.toFixed(3)}${unitOf(b.quantity)}` : "—",
      b.nominalPass === null
        ? "—"
        : b.nominalPass
          ? `<span class="pass">pass</span>`
          : `<span class="fail">fail</span>`,
      b.failures === null ? "" : String(b.failures),
    ])
    .concat(
      r.colour.map((c) => [
        esc(c.label ? `${c.label} (${c.id})` : c.id),
        "380–780",
        `colour${c.found ? `: ${esc(c.found)}` : ""}`,
        esc(c.wording),
        c.nominalMargin !== null ? c.nominalMargin.toFixed(4) : "—",
        c.nominalPass === null
          ? "—"
          : c.nominalPass
            ? `<span class="pass">pass</span>`
            : `<span class="fail">fail</span>`,
        c.failures === null ? "" : String(c.failures),
      ]),
    ),
)}
</tbody></table>
<h2>Spec deviations</h2>
${
  !d.required
    ? "<p>None: the revision carries the program's mask.</p>"
    : `<p>The revision's mask differs from the program's: ${esc(d.bands.map((b) => `${b.id} ${b.change}`).join(", "))}.</p>
<dl><dt>Status</dt><dd>${esc(d.status ?? "none asked for")}</dd>
<dt>Reason</dt><dd>${esc(d.reason)}</dd>
<dt>Asked for by</dt><dd>${esc(d.requestedBy)} (${esc(when(d.requestedAt))})</dd>
<dt>Decided by</dt><dd>${esc(d.decidedBy || "—")}${d.decidedAt ? ` (${esc(when(d.decidedAt))})` : ""}${d.decisionNote ? `: ${esc(d.decisionNote)}` : ""}</dd></dl>`
}
<h2>Layer stack</h2>
<p class="meta">${esc(r.revision.stackLine)}</p>
<table><thead><tr><th class="num">#</th><th>Material</th><th class="num">Physical thickness (nm)</th><th>Locked</th></tr></thead><tbody>
${rows(r.revision.layers.map((l, i) => [String(i + 1), esc(l.material), l.thickness === null ? "—" : l.thickness.toFixed(2), l.locked ? "yes" : ""]))}
</tbody></table>
<h2>Decisions</h2>
<table><thead><tr><th>When (UTC)</th><th>Decision</th><th>By</th><th class="num">Program version</th><th>Note</th></tr></thead><tbody>
${rows(r.decisions.map((x) => [esc(when(x.at)), esc(ACTION_LABEL[x.action] ?? x.action), esc(x.actor), esc(x.programVersion ?? "—"), esc(x.note)]))}
</tbody></table>
<h2>Review threads</h2>
<p>${r.threads.total} thread${r.threads.total === 1 ? "" : "s"}: ${r.threads.resolved} resolved, ${r.threads.open} open (none blocking at approval).</p>
<footer>Generated by Stackproof from the stored release record ${esc(r.id)}. Computed results depend on the optical constants and the error model stated above.</footer>`;
}

export function releasePrintHtml(snapshot: ReleaseSnapshot | unknown, status: string): string {
  const r = readReleaseRecord(snapshot, status);
  let content: string;
  try {
    content = body(r);
  } catch {
    // A record the renderer cannot lay out still shows what identifies it.
    content = `<h1>Release record ${esc(r.id)}</h1><p>This record could not be laid out in full. Design ${esc(r.design)}, revision ${esc(r.revision.number ?? "?")}, content hash <span class="mono">${esc(r.revision.hash)}</span>, status ${esc(status)}.</p>`;
  }
  const title = `Release record — ${r.design} rev ${r.revision.number ?? "?"}`;
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>${esc(title)}</title>
<meta name="viewport" content="width=device-width, initial-scale=1">
<style>
  @page { size: A4; margin: 16mm 14mm; }
  * { box-sizing: border-box; }
  body { font-family: "Helvetica Neue", Arial, sans-serif; color: #1b1f1d; font-size: 10.5pt; line-height: 1.4; margin: 0 auto; max-width: 190mm; padding: 12mm 0; }
  h1 { font-size: 17pt; margin: 0 0 2mm; }
  h2 { font-size: 12pt; margin: 7mm 0 2mm; border-bottom: 0.4mm solid #1b1f1d; padding-bottom: 1mm; break-after: avoid; }
  .meta { color: #4a524e; margin: 0 0 4mm; }
  table { width: 100%; border-collapse: collapse; margin: 1mm 0 2mm; break-inside: auto; }
  th, td { text-align: left; padding: 1.2mm 2mm; border-bottom: 0.2mm solid #c9cfcb; vertical-align: top; }
  th { background: #eef1ef; font-weight: 600; }
  tr { break-inside: avoid; }
  td.num, th.num { text-align: right; font-variant-numeric: tabular-nums; }
  .mono { font-family: "Courier New", monospace; font-size: 9pt; word-break: break-all; }
  .pass { font-weight: 600; }
  .fail { font-weight: 600; text-decoration: underline; }
  .caution { border: 0.6mm solid #1b1f1d; padding: 3mm 4mm; margin: 4mm 0; font-weight: 600; }
  .status { display: inline-block; border: 0.3mm solid #1b1f1d; padding: 0.5mm 2mm; font-size: 9pt; text-transform: uppercase; letter-spacing: .05em; }
  dl { display: grid; grid-template-columns: 42mm 1fr; gap: 1mm 4mm; margin: 0; }
  dt { color: #4a524e; } dd { margin: 0; }
  figure.plot { margin: 2mm 0 4mm; break-inside: avoid; }
  figure.plot figcaption { font-size: 8.5pt; color: #4a524e; }
  footer { margin-top: 8mm; color: #4a524e; font-size: 8.5pt; }
  @media print { body { padding: 0; } a { color: inherit; text-decoration: none; } }
</style></head><body>
${content}
</body></html>`;
}
