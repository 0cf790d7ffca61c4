// Export of the design being edited: the optics JSON design format, or CSV one layer per row
// (material,thickness_nm,locked — the same columns POST /imports/design reads).
import type { Design } from "@stackproof/optics";

export function designToJson(design: Design): string {
  return JSON.stringify(design, null, 2) + "\n";
}

/** A cell that would start a formula in a spreadsheet (OWASP "CSV Injection": =, +, -, @, tab, carriage return). */
const FORMULA_START = /^[=+\-@\t\r]/;
/** A plain decimal number such as -1.5 or 2e-3: spreadsheets read it as a number, never as a formula. */
const PLAIN_NUMBER = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;

/**
 * One CSV cell, safe to open in a spreadsheet: numbers stay numeric (a negative number is a number, not a formula);
 * any other text that starts like a formula gets a leading single quote (OWASP CSV Injection guidance), and text with
 * a comma, quote or line break is quoted with inner quotes doubled (RFC 4180).
 */
export function csvCell(value: string | number | boolean): string {
  if (typeof value === "number") return Number.isFinite(value) ? String(value) : "";
  let text = String(value);
  if (!PLAIN_NUMBER.test(text) && FORMULA_START.test(text)) text = `'${text}`;
  return /[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

export function designToCsv(design: Design): string {
  const rows = design.layers.map((l) =>
    [csvCell(l.material), csvCell(Number(l.thickness.toFixed(4))), csvCell(l.locked ? "true" : "false")].join(","),
  );
  return ["material,thickness_nm,locked", ...rows].join("\n") + "\n";
}

export function fileBaseName(design: Design, revisionNumber?: number): string {
  const base = design.name.trim().replace(/[^A-Za-z0-9._-]+/g, "-").replace(/^-+|-+$/g, "") || "design";
  return revisionNumber ? `${base}-r${revisionNumber}` : base;
}

export function downloadText(filename: string, text: string, type: string): void {
  const blob = new Blob([text], { type });
  const url = URL.createObjectURL(blob);
  const a = document.createElement("a");
  a.href = url;
  a.download = filename;
  document.body.appendChild(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 1000);
}
