// The printable release record: one self-contained HTML page (inline CSS, no scripts, no external resources).
import type { BandOutcome } from "@stackproof/optics";
import type { ReleaseSnapshot } from "./workflow.ts";

const esc = (s: unknown): string =>
  String(s ?? "").replace(
    /[&<>"']/g,
    (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c] ?? c,
  );

const pct = (x: number, digits = 1) => `${(x * 100).toFixed(digits)} %`;
const REQUIREMENT: Record<string, string> = {
  min: "every point ≥",
  max: "every point ≤",
  avgMin: "average ≥",
  avgMax: "average ≤",
};
const ACTION: Record<string, string> = {
  submit: "Submitted for review",
  request_changes: "Changes requested",
  approve: "Approved",
  release: "Released",
  withdraw: "Withdrawn",
};

function unit(q: string) {
  return q === "OD" ? "" : " %";
}

export function releasePrintHtml(r: ReleaseSnapshot, status: string): string {
  const stack = r.revision.stack;
  const mask = r.revision.specMask;
  const bands = new Map<string, BandOutcome>((r.nominal.bands as BandOutcome[]).map((b) => [b.id, b]));
  const y = r.yieldRun;
  const failures = new Map((y?.bandFailures ?? []).map((b) => [b.id, b.count]));
  const title = `Release record — ${r.design.name} rev ${r.revision.number}`;
  const rows = (cells: string[][]) =>
    cells.map((c) => `<tr>${c.map((x) => `<td>${x}</td>`).join("")}</tr>`).join("");
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
  footer { margin-top: 8mm; color: #4a524e; font-size: 8.5pt; }
  @media print { body { padding: 0; } a { color: inherit; text-decoration: none; } }
</style></head><body>
<h1>${esc(title)}</h1>
<p class="meta">${esc(r.workspace.name)} · program ${esc(r.program.name)}${r.program.customer ? ` for ${esc(r.program.customer)}` : ""} · released ${esc(new Date(r.releasedAt).toUTCString())} by ${esc(r.releasedBy.name)} · <span class="status">${esc(status)}</span></p>
${r.caution ? `<div class="caution">Caution: ${esc(r.caution)}</div>` : ""}
${status === "withdrawn" ? `<div class="caution">This release has since been withdrawn and must not be used for production.</div>` : ""}
<h2>Identity</h2>
<dl>
<dt>Program</dt><dd>${esc(r.program.name)}${r.program.application ? ` — ${esc(r.program.application)}` : ""}</dd>
<dt>Design</dt><dd>${esc(r.design.name)}, revision ${r.revision.number}</dd>
<dt>Author</dt><dd>${esc(r.revision.author?.name)} (${esc(new Date(r.revision.createdAt).toUTCString())})</dd>
<dt>Content hash (sha-256)</dt><dd class="mono">${esc(r.revision.hash)}</dd>
<dt>Target yield</dt><dd>${pct(r.program.targetYield)}</dd>
${r.revision.note ? `<dt>Revision note</dt><dd>${esc(r.revision.note)}</dd>` : ""}
</dl>
<h2>Layer stack</h2>
<p class="meta">Incident medium ${esc(stack.incident)}; reference wavelength ${esc(stack.referenceWavelength)} nm; substrate ${esc(stack.substrate.material)}, ${esc(stack.substrate.thicknessMm)} mm${stack.substrate.backside ? ", back surface counted" : ""}; exit medium ${esc(stack.exit)}. Layer 1 is next to the substrate.</p>
<table><thead><tr><th class="num">#</th><th>Material</th><th class="num">Physical thickness (nm)</th><th>Locked</th></tr></thead><tbody>
${rows(stack.layers.map((l, i) => [String(i + 1), esc(l.material), l.thickness.toFixed(2), l.locked ? "yes" : ""]))}
</tbody></table>
<h2>Specification and nominal result</h2>
<table><thead><tr><th>Band</th><th>Range (nm)</th><th>Quantity</th><th>Requirement</th><th class="num">Nominal margin</th><th>Nominal</th><th class="num">Failures in yield run</th></tr></thead><tbody>
${rows(
  mask.bands.map((b) => {
    const o = bands.get(b.id);
    return [
      esc(b.label ? `${b.label} (${b.id})` : b.id),
      `${b.start}–${b.stop}`,
      `${esc(b.quantity)}, ${b.angleDeg}°, ${esc(b.polarization)}`,
      `${REQUIREMENT[b.requirement] ?? esc(b.requirement)} ${b.value}${unit(b.quantity)}${b.tolerance ? ` (tol. ${b.tolerance})` : ""}`,
      o ? `${o.margin.toFixed(3)}${unit(b.quantity)}` : "",
      o ? (o.pass ? `<span class="pass">pass</span>` : `<span class="fail">fail</span>`) : "",
      y ? String(failures.get(b.id) ?? 0) : "",
    ];
  }),
)}
</tbody></table>
<h2>Verified yield</h2>
${
  y
    ? `<dl>
<dt>Yield</dt><dd><strong>${pct(y.yield)}</strong> (${y.passCount} of ${y.trials} simulated builds pass every band)</dd>
<dt>95 % interval (Wilson)</dt><dd>${pct(y.interval.low)} – ${pct(y.interval.high)}</dd>
<dt>Seed</dt><dd class="mono">${esc(y.seed)}</dd>
<dt>Error model</dt><dd class="mono">${esc(JSON.stringify(y.errorModel))}</dd>
<dt>Engine version</dt><dd>${esc(y.engineVersion)}</dd>
<dt>Run</dt><dd class="mono">${esc(y.id)}${y.clientVerified ? " — browser result verified by the server's re-run" : " — computed by the server"}</dd>
</dl>`
    : "<p>No yield run is recorded.</p>"
}
<h2>Decisions</h2>
<table><thead><tr><th>When (UTC)</th><th>Decision</th><th>By</th><th>Note</th></tr></thead><tbody>
${rows(r.decisions.map((d) => [esc(new Date(d.at).toUTCString()), esc(ACTION[d.action] ?? d.action), esc(d.actor.name), esc(d.note)]))}
</tbody></table>
<h2>Review threads</h2>
<p>${r.threads.total} thread${r.threads.total === 1 ? "" : "s"}: ${r.threads.resolved} resolved, ${r.threads.open} open (none blocking at approval).</p>
<footer>Generated by Stackproof from the stored release record ${esc(r.id)}. Computed results depend on the optical constants and the error model stated above.</footer>
</body></html>`;
}
