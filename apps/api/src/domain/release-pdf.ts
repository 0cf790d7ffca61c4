// The release record as a PDF (pdfkit): the same sections as the printable page, with the spectrum drawn as vector
// lines from the stored numbers. Standard PDF fonts only (no font files to ship), so text is mapped to WinAnsi.
import PDFDocument from "pdfkit";
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

/** Characters the standard fonts lack, spelled out; anything else outside Latin-1 becomes "?". */
const SPELL: Record<string, string> = {
  "≥": ">=",
  "≤": "<=",
  Δ: "Delta ",
  "→": "->",
  "−": "-",
  "—": "-",
  "–": "-",
  σ: "sigma",
  λ: "lambda",
  "…": "...",
  "‘": "'",
  "’": "'",
  "“": '"',
  "”": '"',
};
export function pdfText(s: unknown): string {
  return String(s ?? "")
    .split("")
    .map((c) => SPELL[c] ?? (c.charCodeAt(0) > 0xff ? "?" : c))
    .join("");
}

const pct = (x: number | null, digits = 1) => (x === null ? "-" : `${(x * 100).toFixed(digits)} %`);
const when = (iso: string) => {
  const d = new Date(iso);
  return Number.isNaN(d.getTime()) ? "-" : d.toUTCString();
};

type Doc = InstanceType<typeof PDFDocument>;

const LEFT = 50;
const WIDTH = 495; // A4 width 595 pt minus margins

function heading(doc: Doc, text: string) {
  if (doc.y > 740) doc.addPage();
  doc.moveDown(0.6);
  doc.font("Helvetica-Bold").fontSize(12).fillColor("#1b1f1d").text(pdfText(text), LEFT);
  const y = doc.y + 1;
  doc
    .moveTo(LEFT, y)
    .lineTo(LEFT + WIDTH, y)
    .lineWidth(0.8)
    .strokeColor("#1b1f1d")
    .stroke();
  doc.moveDown(0.4);
  doc.font("Helvetica").fontSize(9.5);
}

function field(doc: Doc, label: string, value: string) {
  if (doc.y > 770) doc.addPage();
  const y = doc.y;
  doc.font("Helvetica").fontSize(9).fillColor("#4a524e").text(pdfText(label), LEFT, y, { width: 130 });
  const afterLabel = doc.y;
  doc.fillColor("#1b1f1d").text(pdfText(value), LEFT + 140, y, { width: WIDTH - 140 });
  doc.y = Math.max(doc.y, afterLabel) + 2;
  doc.x = LEFT;
}

function table(doc: Doc, widths: number[], header: string[], rows: string[][]) {
  const draw = (cells: string[], bold: boolean) => {
    if (doc.y > 760) doc.addPage();
    const y = doc.y;
    let x = LEFT;
    let bottom = y;
    doc
      .font(bold ? "Helvetica-Bold" : "Helvetica")
      .fontSize(8.5)
      .fillColor("#1b1f1d");
    cells.forEach((c, i) => {
      const w = widths[i] ?? 60;
      doc.text(pdfText(c), x + 2, y, { width: w - 4 });
      bottom = Math.max(bottom, doc.y);
      x += w;
    });
    doc
      .moveTo(LEFT, bottom + 2)
      .lineTo(LEFT + WIDTH, bottom + 2)
      .lineWidth(0.3)
      .strokeColor("#c9cfcb")
      .stroke();
    doc.y = bottom + 4;
    doc.x = LEFT;
  };
  draw(header, true);
  for (const r of rows) draw(r, false);
}

/** One spectrum panel as vector graphics: envelope (filled), band limits (red), nominal (black), axes with ticks. */
function plot(doc: Doc, p: RecordPlot) {
  const H = 190;
  if (doc.y + H + 30 > 800) doc.addPage();
  const top = doc.y;
  const m = { l: 44, r: 8, t: 6, b: 26 };
  const { x0, x1, y0, y1 } = plotRange(p);
  const X = (x: number) => LEFT + m.l + ((x - x0) / (x1 - x0)) * (WIDTH - m.l - m.r);
  const Y = (y: number) => top + H - m.b - ((y - y0) / (y1 - y0)) * (H - m.t - m.b);
  const segments = plotSegments(p.wavelengths);
  if (p.low && p.high) {
    const lo = p.low;
    const hi = p.high;
    for (const run of segments) {
      const idx = run.filter((i) => lo[i] !== null && hi[i] !== null);
      if (idx.length < 2) continue;
      const pts: [number, number][] = [
        ...idx.map((i): [number, number] => [X(p.wavelengths[i] as number), Y(hi[i] as number)]),
        ...idx
          .slice()
          .reverse()
          .map((i): [number, number] => [X(p.wavelengths[i] as number), Y(lo[i] as number)]),
      ];
      doc
        .polygon(...pts)
        .fillOpacity(0.55)
        .fill("#9fb7c9")
        .fillOpacity(1);
    }
  }
  for (const b of p.bands) {
    if (b.value === null) continue;
    doc
      .moveTo(X(b.start), Y(b.value))
      .lineTo(X(b.stop), Y(b.value))
      .lineWidth(2)
      .strokeColor("#b3261e")
      .stroke();
    doc
      .font("Helvetica")
      .fontSize(7)
      .fillColor("#b3261e")
      .text(pdfText(b.id), X(b.start), Y(b.value) - 9, {
        lineBreak: false,
      });
  }
  for (const run of segments) {
    let pen = false;
    for (const i of run) {
      const x = p.wavelengths[i] as number;
      const y = p.nominal[i];
      if (y === null || y === undefined || !Number.isFinite(x)) {
        pen = false;
        continue;
      }
      if (pen) doc.lineTo(X(x), Y(y));
      else doc.moveTo(X(x), Y(y));
      pen = true;
    }
  }
  doc.lineWidth(1.1).strokeColor("#1b1f1d").stroke();
  // axes
  const ax0 = LEFT + m.l;
  const ay0 = top + H - m.b;
  doc
    .moveTo(ax0, top + m.t)
    .lineTo(ax0, ay0)
    .lineTo(LEFT + WIDTH - m.r, ay0)
    .lineWidth(0.6)
    .strokeColor("#1b1f1d")
    .stroke();
  doc.font("Helvetica").fontSize(7).fillColor("#1b1f1d");
  for (let k = 0; k <= 4; k++) {
    const xv = x0 + ((x1 - x0) * k) / 4;
    doc.text(xv.toFixed(0), X(xv) - 15, ay0 + 3, { width: 30, align: "center", lineBreak: false });
    const yv = y0 + ((y1 - y0) * k) / 4;
    doc.text(yv.toFixed(p.quantity === "OD" || y1 - y0 < 5 ? 1 : 0), LEFT, Y(yv) - 3, {
      width: m.l - 4,
      align: "right",
      lineBreak: false,
    });
  }
  doc
    .fontSize(8)
    .text("Wavelength (nm)", LEFT + m.l, ay0 + 13, { width: WIDTH - m.l, align: "center", lineBreak: false });
  doc.y = top + H;
  doc.x = LEFT;
  doc
    .font("Helvetica")
    .fontSize(8)
    .fillColor("#4a524e")
    .text(
      pdfText(
        `${plotCaption(p)}: nominal (black line), ${p.lowP ?? 5}-${p.highP ?? 95} % envelope of the evidence run (shaded), band limits (red).`,
      ),
      LEFT,
      doc.y,
      { width: WIDTH },
    );
  doc.moveDown(0.6);
}

function write(doc: Doc, r: ReleaseRecord) {
  doc
    .font("Helvetica-Bold")
    .fontSize(16)
    .fillColor("#1b1f1d")
    .text(pdfText(`Release record - ${r.design} rev ${r.revision.number ?? "?"}`), LEFT);
  doc
    .font("Helvetica")
    .fontSize(9)
    .fillColor("#4a524e")
    .text(
      pdfText(
        `${r.workspace} · program ${r.program.name}${r.program.customer ? ` for ${r.program.customer}` : ""} · released ${when(r.releasedAt)} by ${r.releasedBy} · status ${r.status.toUpperCase()}`,
      ),
    );
  if (r.caution || r.status === "withdrawn") {
    doc.moveDown(0.5);
    const msgs = [
      r.caution ? `Caution: ${r.caution}` : "",
      r.status === "withdrawn"
        ? "This release has since been withdrawn and must not be used for production."
        : "",
    ].filter(Boolean);
    const y = doc.y;
    doc
      .font("Helvetica-Bold")
      .fontSize(9.5)
      .fillColor("#1b1f1d")
      .text(pdfText(msgs.join(" ")), LEFT + 8, y + 6, { width: WIDTH - 16 });
    doc
      .rect(LEFT, y, WIDTH, doc.y - y + 6)
      .lineWidth(1.2)
      .strokeColor("#1b1f1d")
      .stroke();
    doc.y += 8;
    doc.x = LEFT;
  }

  heading(doc, "Identity");
  field(
    doc,
    "Program",
    `${r.program.name}${r.program.application ? ` - ${r.program.application}` : ""}${r.program.version !== null ? `, version ${r.program.version}` : ""}`,
  );
  field(doc, "Design", `${r.design}, revision ${r.revision.number ?? "?"}`);
  field(doc, "Author", `${r.revision.author} (${when(r.revision.createdAt)})`);
  field(doc, "Content hash (sha-256)", r.revision.hash);
  field(doc, "Target yield", pct(r.program.targetYield));
  if (r.revision.note) field(doc, "Revision note", r.revision.note);

  heading(doc, "Evidence");
  const y = r.run;
  const e = r.evidence;
  if (!y) doc.text("No yield run is recorded.");
  else {
    field(
      doc,
      "Point yield",
      `${pct(y.yield)} (${y.passCount ?? "-"} of ${y.trials ?? "-"} simulated builds pass every band)`,
    );
    if (e) {
      field(
        doc,
        "Lower bound",
        `${pct(e.lowerBound, 2)} (two-sided Wilson interval at ${pct(e.confidence)} confidence) against the target ${pct(e.targetYield)}: ${e.pass === true ? "meets the target" : e.pass === false ? "below the target" : "-"}`,
      );
      field(
        doc,
        "Evidence rules",
        `at least ${e.minTrials ?? "-"} trials; bound at ${pct(e.confidence)} >= target; program version ${e.programVersion ?? "-"}`,
      );
      field(doc, "Seed rule", e.seedRule);
    } else {
      field(
        doc,
        "Evidence rules",
        "Released before evidence rules were recorded: no lower bound is stored with this release.",
      );
    }
    field(doc, "95 % interval (Wilson)", `${pct(y.low95)} - ${pct(y.high95)}`);
    field(doc, "Trials", String(y.trials ?? "-"));
    field(doc, "Seed", y.seed);
    field(doc, "Error model", y.errorModelText);
    field(doc, "Error model (as stored)", y.errorModel);
    field(doc, "Engine version", y.engineVersion);
    field(
      doc,
      "Run",
      `${y.id}${y.clientVerified ? " - browser result verified by the server's re-run" : " - computed by the server"}`,
    );
  }

  heading(doc, "Spectrum against the mask");
  if (r.plots.length === 0)
    doc.text("No spectrum is stored with this release (released before plots were recorded).");
  for (const p of r.plots) plot(doc, p);

  heading(doc, "Specification, margins and nominal result");
  table(
    doc,
    [70, 60, 70, 110, 70, 45, 70],
    [
      "Band",
      "Range (nm)",
      "Quantity",
      "Requirement",
      "Nominal margin",
      "Nominal",
      "Failures in evidence run",
    ],
    r.bands
      .map((b) => [
        b.label ? `${b.label} (${b.id})` : b.id,
        `${b.start}-${b.stop}`,
        `${b.quantity}, ${b.angleDeg} deg, ${b.polarization}`,
        `${REQUIREMENT_LABEL[b.requirement] ?? b.requirement} ${b.value ?? "-"}${unitOf(b.quantity)}${b.tolerance ? ` (tol. ${b.tolerance})` : ""}`,
        b.nominalMargin !== null ? `${b.nominalMargin.toFixed(3)}${unitOf(b.quantity)}` : "-",
        b.nominalPass === null ? "-" : b.nominalPass ? "pass" : "FAIL",
        b.failures === null ? "" : String(b.failures),
      ])
      .concat(
        r.colour.map((c) => [
          c.label ? `${c.label} (${c.id})` : c.id,
          "380-780",
          `colour${c.found ? `: ${c.found}` : ""}`,
          c.wording,
          c.nominalMargin !== null ? c.nominalMargin.toFixed(4) : "-",
          c.nominalPass === null ? "-" : c.nominalPass ? "pass" : "FAIL",
          c.failures === null ? "" : String(c.failures),
        ]),
      ),
  );

  heading(doc, "Spec deviations");
  const d = r.deviation;
  if (!d.required) doc.text("None: the revision carries the program's mask.", LEFT);
  else {
    field(doc, "Bands", d.bands.map((b) => `${b.id} ${b.change}`).join(", "));
    field(doc, "Status", d.status ?? "none asked for");
    field(doc, "Reason", d.reason);
    field(doc, "Asked for by", `${d.requestedBy} (${when(d.requestedAt)})`);
    field(
      doc,
      "Decided by",
      `${d.decidedBy || "-"}${d.decidedAt ? ` (${when(d.decidedAt)})` : ""}${d.decisionNote ? `: ${d.decisionNote}` : ""}`,
    );
  }

  heading(doc, "Layer stack");
  doc.fontSize(8.5).fillColor("#4a524e").text(pdfText(r.revision.stackLine), LEFT);
  doc.moveDown(0.3);
  table(
    doc,
    [40, 200, 160, 95],
    ["#", "Material", "Physical thickness (nm)", "Locked"],
    r.revision.layers.map((l, i) => [
      String(i + 1),
      l.material,
      l.thickness === null ? "-" : l.thickness.toFixed(2),
      l.locked ? "yes" : "",
    ]),
  );

  heading(doc, "Decisions");
  table(
    doc,
    [130, 110, 90, 45, 120],
    ["When (UTC)", "Decision", "By", "Program version", "Note"],
    r.decisions.map((x) => [
      when(x.at),
      ACTION_LABEL[x.action] ?? x.action,
      x.actor,
      String(x.programVersion ?? "-"),
      x.note,
    ]),
  );

  heading(doc, "Review threads");
  doc.text(
    `${r.threads.total} thread${r.threads.total === 1 ? "" : "s"}: ${r.threads.resolved} resolved, ${r.threads.open} open (none blocking at approval).`,
    LEFT,
  );
  doc.moveDown(1);
  doc
    .fontSize(8)
    .fillColor("#4a524e")
    .text(
      pdfText(
        `Generated by Stackproof from the stored release record ${r.id}. Computed results depend on the optical constants and the error model stated above.`,
      ),
      LEFT,
    );
}

/** The release record as PDF bytes. A record that cannot be laid out in full still gives a PDF naming it. */
export function releasePdf(snapshot: unknown, status: string): Promise<Buffer> {
  const r = readReleaseRecord(snapshot, status);
  const make = (full: boolean) =>
    new Promise<Buffer>((resolve, reject) => {
      const doc = new PDFDocument({
        size: "A4",
        margin: 50,
        info: {
          Title: pdfText(`Release record - ${r.design} rev ${r.revision.number ?? "?"}`),
          Author: "Stackproof",
          Subject: pdfText(`Release ${r.id}`),
        },
      });
      const parts: Buffer[] = [];
      doc.on("data", (b: Buffer) => parts.push(b));
      doc.on("end", () => resolve(Buffer.concat(parts)));
      doc.on("error", reject);
      try {
        if (full) write(doc, r);
        else
          doc
            .font("Helvetica")
            .fontSize(11)
            .text(
              pdfText(
                `Release record ${r.id}: design ${r.design}, revision ${r.revision.number ?? "?"}, content hash ${r.revision.hash}, status ${status}. This record could not be laid out in full; see the printable page.`,
              ),
            );
        doc.end();
      } catch (err) {
        reject(err);
      }
    });
  return make(true).catch(() => make(false));
}
