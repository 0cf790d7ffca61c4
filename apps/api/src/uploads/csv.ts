// CSV readers for uploads: n,k tables, layer lists, and spectrophotometer files (one lenient reader for every
// measured spectrum: the single-spectrum upload, lots and witness films).
// Rows are numbered as lines of the file (the header is row 1); every problem names its row and column.
// Lines starting with "#" are comments; blank lines are skipped; cells are trimmed.
import { CsvError, parse } from "csv-parse/sync";
import type { CsvProblem } from "@stackproof/contracts";
import { HttpError } from "../lib/errors.ts";

/** One problem of a file (contract: CsvProblemSchema, the details of a 422 invalid_csv answer). */
export type CellProblem = CsvProblem;

/** At most this many problems are reported for one file. */
const MAX_PROBLEMS = 50;
/** Data rows accepted in one file. */
export const MAX_ROWS = 20000;

export class CsvProblems extends HttpError {
  constructor(what: string, problems: CellProblem[]) {
    const first = problems[0];
    const where = first
      ? ` (row ${first.row}, column ${first.column}: ${first.message}${problems.length > 1 ? `; ${problems.length - 1} more` : ""})`
      : "";
    super(422, "invalid_csv", `The ${what} file has errors${where}.`, problems.slice(0, MAX_PROBLEMS));
  }
}

interface Row {
  line: number;
  cells: string[];
}

interface Table {
  header: string[];
  rows: Row[];
}

/** csv-parse's records with their line numbers; a syntax error becomes a 422 naming its line. */
function parseRecords(
  text: string,
  what: string,
  delimiter?: string,
): { info: { lines: number }; record: string[] }[] {
  try {
    return parse(text, {
      info: true,
      ...(delimiter ? { delimiter } : {}),
      skip_empty_lines: true,
      relax_column_count: true,
      trim: true,
      comment: "#",
      comment_no_infix: true,
    }) as unknown as { info: { lines: number }; record: string[] }[];
  } catch (err) {
    if (err instanceof CsvError) {
      const line = (err as CsvError & { lines?: number }).lines ?? 1;
      throw new CsvProblems(what, [{ row: line, column: "-", message: err.message }]);
    }
    throw err;
  }
}

function readTable(text: string, what: string): Table {
  const records = parseRecords(text, what);
  const [head, ...rest] = records;
  if (!head) throw new CsvProblems(what, [{ row: 1, column: "-", message: "the file has no header row" }]);
  if (rest.length > MAX_ROWS) {
    throw new CsvProblems(what, [
      { row: MAX_ROWS + 2, column: "-", message: `more than ${MAX_ROWS} data rows` },
    ]);
  }
  return {
    header: head.record.map((h) => h.toLowerCase()),
    rows: rest.map((r) => ({ line: r.info.lines, cells: r.record })),
  };
}

/**
 * Check the header: exactly one of each `oneOf` group, the `required` and any `optional` columns, nothing else.
 * Returns column positions by name.
 */
function columns(
  table: Table,
  what: string,
  spec: { required: string[]; oneOf?: string[][]; optional?: string[] },
): Map<string, number> {
  const problems: CellProblem[] = [];
  const allowed = new Set([...spec.required, ...(spec.oneOf ?? []).flat(), ...(spec.optional ?? [])]);
  const pos = new Map<string, number>();
  table.header.forEach((h, i) => {
    if (!allowed.has(h)) {
      problems.push({
        row: 1,
        column: h || `#${i + 1}`,
        message: `unexpected column "${h}"; expected ${describeHeader(spec)}`,
      });
    } else if (pos.has(h)) problems.push({ row: 1, column: h, message: `column "${h}" appears twice` });
    else pos.set(h, i);
  });
  for (const r of spec.required) {
    if (!pos.has(r))
      problems.push({
        row: 1,
        column: r,
        message: `missing column "${r}"; expected ${describeHeader(spec)}`,
      });
  }
  for (const group of spec.oneOf ?? []) {
    const present = group.filter((g) => pos.has(g));
    if (present.length === 0)
      problems.push({
        row: 1,
        column: group.join("|"),
        message: `missing column: one of ${group.join(", ")}`,
      });
    if (present.length > 1)
      problems.push({
        row: 1,
        column: present.join("|"),
        message: `only one of ${group.join(", ")} may be given`,
      });
  }
  if (problems.length > 0) throw new CsvProblems(what, problems);
  return pos;
}

function describeHeader(spec: { required: string[]; oneOf?: string[][]; optional?: string[] }): string {
  const parts = [
    ...(spec.oneOf ?? []).map((g) => g.join(" or ")),
    ...spec.required,
    ...(spec.optional ?? []).map((o) => `[${o}]`),
  ];
  return parts.join(", ");
}

class RowReader {
  readonly problems: CellProblem[] = [];
  constructor(private readonly pos: Map<string, number>) {}

  cell(row: Row, column: string): string | undefined {
    const i = this.pos.get(column);
    return i === undefined ? undefined : row.cells[i];
  }

  number(row: Row, column: string, check?: (v: number) => string | null): number {
    const raw = this.cell(row, column);
    if (raw === undefined || raw === "") {
      this.problems.push({ row: row.line, column, message: "missing value" });
      return Number.NaN;
    }
    const v = Number(raw);
    if (!Number.isFinite(v) || !/^[+-]?(\d+\.?\d*|\.\d+)(e[+-]?\d+)?$/i.test(raw)) {
      this.problems.push({
        row: row.line,
        column,
        message: `expected a number, got "${raw.length > 40 ? raw.slice(0, 37) + "..." : raw}"`,
      });
      return Number.NaN;
    }
    const bad = check?.(v);
    if (bad) {
      this.problems.push({ row: row.line, column, message: bad });
      return Number.NaN;
    }
    return v;
  }

  width(row: Row, expected: number) {
    if (row.cells.length !== expected) {
      this.problems.push({
        row: row.line,
        column: "-",
        message: `expected ${expected} cells, got ${row.cells.length}`,
      });
      return false;
    }
    return true;
  }
}

function requireRows(table: Table, what: string, min: number) {
  if (table.rows.length < min) {
    throw new CsvProblems(what, [
      { row: 2, column: "-", message: `expected at least ${min} data row${min === 1 ? "" : "s"}` },
    ]);
  }
}

function increasing(rows: Row[], values: number[], column: string, reader: RowReader) {
  for (let i = 1; i < values.length; i++) {
    const a = values[i - 1] as number;
    const b = values[i] as number;
    if (Number.isFinite(a) && Number.isFinite(b) && !(b > a)) {
      reader.problems.push({
        row: (rows[i] as Row).line,
        column,
        message: `wavelengths must increase from row to row (${b} after ${a})`,
      });
    }
  }
}

const positive = (v: number) => (v > 0 ? null : `expected a number > 0, got ${v}`);
const nonNegative = (v: number) => (v >= 0 ? null : `expected a number ≥ 0, got ${v}`);

/** n,k table: header `wavelength_nm` or `wavelength_um`, `n`, and optionally `k` (0 when absent). Points in nm. */
export function parseIndexTable(text: string): [number, number, number][] {
  const what = "n,k table";
  const table = readTable(text, what);
  const pos = columns(table, what, {
    required: ["n"],
    oneOf: [["wavelength_nm", "wavelength_um"]],
    optional: ["k"],
  });
  requireRows(table, what, 2);
  const reader = new RowReader(pos);
  const wlColumn = pos.has("wavelength_um") ? "wavelength_um" : "wavelength_nm";
  const scale = wlColumn === "wavelength_um" ? 1000 : 1;
  const points: [number, number, number][] = [];
  for (const row of table.rows) {
    if (!reader.width(row, table.header.length)) {
      points.push([Number.NaN, Number.NaN, Number.NaN]);
      continue;
    }
    const w = reader.number(row, wlColumn, positive);
    const n = reader.number(row, "n", positive);
    const k = pos.has("k") ? reader.number(row, "k", nonNegative) : 0;
    points.push([w * scale, n, k]);
  }
  increasing(
    table.rows,
    points.map((p) => p[0]),
    wlColumn,
    reader,
  );
  if (reader.problems.length > 0) throw new CsvProblems(what, reader.problems);
  return points;
}

export interface CsvLayer {
  material: string;
  thickness: number;
  locked?: boolean;
}

const TRUE = new Set(["true", "yes", "1", "y"]);
const FALSE = new Set(["false", "no", "0", "n", ""]);

/**
 * Layer list: header `material,thickness_nm[,locked]`, one layer per row in deposition order (the first row is
 * the layer next to the substrate). `known(id)` says whether a material id can be used.
 */
export function parseLayerCsv(text: string, known: (id: string) => boolean): CsvLayer[] {
  const what = "layer";
  const table = readTable(text, what);
  const pos = columns(table, what, { required: ["material", "thickness_nm"], optional: ["locked"] });
  requireRows(table, what, 1);
  const reader = new RowReader(pos);
  const layers: CsvLayer[] = [];
  for (const row of table.rows) {
    if (!reader.width(row, table.header.length)) continue;
    const material = reader.cell(row, "material") ?? "";
    if (material === "")
      reader.problems.push({ row: row.line, column: "material", message: "missing material id" });
    else if (!known(material))
      reader.problems.push({
        row: row.line,
        column: "material",
        message: `unknown material id "${material}"`,
      });
    const thickness = reader.number(row, "thickness_nm", nonNegative);
    const layer: CsvLayer = { material, thickness };
    if (pos.has("locked")) {
      const raw = (reader.cell(row, "locked") ?? "").toLowerCase();
      if (TRUE.has(raw)) layer.locked = true;
      else if (FALSE.has(raw)) layer.locked = false;
      else
        reader.problems.push({
          row: row.line,
          column: "locked",
          message: `expected true or false, got "${raw}"`,
        });
    }
    layers.push(layer);
  }
  if (reader.problems.length > 0) throw new CsvProblems(what, reader.problems);
  return layers;
}

// ---- Spectrophotometer exports: one wavelength column and one or more spectra columns -------------------

/** How the values of a spectra file are written: percent (0–100) or fraction (0–1). */
export type ValueScale = "percent" | "fraction";

/** A spectrophotometer file read into spectra (values always in percent). */
export interface SpectraTable {
  delimiter: "," | ";" | "\t";
  decimalComma: boolean;
  /** the scale used: the explicit choice, or the detected one */
  scale: ValueScale;
  /** what the values look like, whatever was chosen: "fraction" when every value is within −0.01..1.01 */
  detectedScale: ValueScale;
  /** the wavelengths were given in descending order and have been put in ascending order */
  reversed: boolean;
  wavelengths: number[];
  /** one per spectra column, in file order, header as written */
  columns: { name: string; values: number[] }[];
}

const WAVELENGTH_HEADER = /^(wavelength|wave length|wl|lambda|λ|nm)\s*(\[\s*nm\s*\]|\(\s*nm\s*\)|_nm|nm)?$/i;
const WAVELENGTH_UM_HEADER = /^(wavelength|wl|lambda|λ)\s*(\[\s*[uµ]m\s*\]|\(\s*[uµ]m\s*\)|_[uµ]m)$/i;

function detectDelimiter(firstLine: string): "," | ";" | "\t" {
  if (firstLine.includes("\t")) return "\t";
  if (firstLine.includes(";")) return ";";
  return ",";
}

/**
 * Read a spectrophotometer export: comma-, semicolon- or tab-separated (detected from the header line),
 * decimal point or — with semicolon or tab separators — decimal comma, lines starting with "#" ignored,
 * header row first. The wavelength column is the first column whose header reads like "wavelength",
 * "Wavelength (nm)", "λ [nm]", "nm" or "wavelength_um"/"(µm)" (converted to nm); every other column is a
 * spectrum named by its header. Values are percent or fraction: `scale` is the caller's explicit choice, or
 * "auto" to take the detected one (a caller that shows the detection should ask the user to confirm it and
 * send the choice back). Wavelengths may be ascending or descending (put in ascending order) but not mixed.
 * Refusals are 422 with every problem's row and column; nothing is kept from a refused file.
 */
export function parseSpectraTable(text: string, scale: ValueScale | "auto", what = "spectra"): SpectraTable {
  const lines = text.split(/\r\n|\n|\r/);
  const headerLine = lines.find((l) => l.trim() !== "" && !l.trimStart().startsWith("#")) ?? "";
  const delimiter = detectDelimiter(headerLine);
  const records = parseRecords(text, what, delimiter);
  const [head, ...rest] = records;
  if (!head) throw new CsvProblems(what, [{ row: 1, column: "-", message: "the file has no header row" }]);
  if (rest.length > MAX_ROWS)
    throw new CsvProblems(what, [
      { row: MAX_ROWS + 2, column: "-", message: `more than ${MAX_ROWS} data rows` },
    ]);
  const header = head.record;
  const problems: CellProblem[] = [];
  let wlCol = header.findIndex((h) => WAVELENGTH_HEADER.test(h));
  let wlScale = 1;
  if (wlCol < 0) {
    wlCol = header.findIndex((h) => WAVELENGTH_UM_HEADER.test(h));
    wlScale = 1000;
  }
  if (wlCol < 0)
    throw new CsvProblems(what, [
      {
        row: head.info.lines,
        column: header[0] || "#1",
        message: `no wavelength column: name one column "wavelength_nm", "Wavelength (nm)", "λ [nm]" or "wavelength_um" (got ${header.map((h) => `"${h}"`).join(", ")})`,
      },
    ]);
  const specCols = header.map((h, i) => ({ h, i })).filter((c) => c.i !== wlCol);
  if (specCols.length === 0)
    throw new CsvProblems(what, [
      {
        row: head.info.lines,
        column: header[wlCol]!,
        message: "no spectrum column next to the wavelength column",
      },
    ]);
  const seen = new Set<string>();
  for (const c of specCols) {
    if (c.h === "")
      problems.push({
        row: head.info.lines,
        column: `#${c.i + 1}`,
        message: "a spectrum column has no name",
      });
    else if (seen.has(c.h))
      problems.push({ row: head.info.lines, column: c.h, message: `column "${c.h}" appears twice` });
    seen.add(c.h);
  }
  if (rest.length < 2)
    problems.push({ row: head.info.lines + 1, column: "-", message: "expected at least 2 data rows" });
  if (problems.length > 0) throw new CsvProblems(what, problems);
  const decimalComma =
    delimiter !== "," && rest.some((r) => r.record.some((c) => /^[-+]?\d+,\d*([eE][-+]?\d+)?$/.test(c)));
  const num = (raw: string): number => {
    const s = decimalComma ? raw.replace(",", ".") : raw;
    return /^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/.test(s) ? Number(s) : Number.NaN;
  };
  const wavelengths: number[] = [];
  const columns = specCols.map((c) => ({ name: c.h, values: [] as number[] }));
  for (const r of rest) {
    if (r.record.length !== header.length) {
      problems.push({
        row: r.info.lines,
        column: "-",
        message: `expected ${header.length} cells, got ${r.record.length}${delimiter === "," && r.record.length > header.length ? " (a decimal comma needs ; or tab as the separator)" : ""}`,
      });
      continue;
    }
    const w = num(r.record[wlCol]!);
    if (!(w > 0))
      problems.push({
        row: r.info.lines,
        column: header[wlCol]!,
        message: `expected a positive wavelength, got "${r.record[wlCol]}"`,
      });
    wavelengths.push(w * wlScale);
    specCols.forEach((c, k) => {
      const v = num(r.record[c.i]!);
      if (!Number.isFinite(v))
        problems.push({
          row: r.info.lines,
          column: c.h,
          message: `expected a number, got "${r.record[c.i]}"${delimiter === "," && /^\d+,\d+$/.test(r.record[c.i]!) ? " (a decimal comma needs ; or tab as separator)" : ""}`,
        });
      columns[k]!.values.push(v);
    });
  }
  if (problems.length > 0) throw new CsvProblems(what, problems);
  // order
  const asc = wavelengths.every((w, i) => i === 0 || w > wavelengths[i - 1]!);
  const desc = wavelengths.every((w, i) => i === 0 || w < wavelengths[i - 1]!);
  if (!asc && !desc) {
    const i = wavelengths.findIndex(
      (w, j) => j > 1 && (w - wavelengths[j - 1]!) * (wavelengths[1]! - wavelengths[0]!) <= 0,
    );
    throw new CsvProblems(what, [
      {
        row: rest[Math.max(i, 1)]!.info.lines,
        column: header[wlCol]!,
        message: "wavelengths must be strictly ascending or strictly descending (no repeats)",
      },
    ]);
  }
  if (desc) {
    wavelengths.reverse();
    for (const c of columns) c.values.reverse();
  }
  const all = columns.flatMap((c) => c.values);
  const detectedScale: ValueScale = all.every((v) => v >= -0.01 && v <= 1.01) ? "fraction" : "percent";
  const used: ValueScale = scale === "auto" ? detectedScale : scale;
  const lo = used === "fraction" ? -0.01 : -1;
  const hi = used === "fraction" ? 1.01 : 101;
  for (const c of columns) {
    const i = c.values.findIndex((v) => v < lo || v > hi);
    if (i >= 0) {
      const row = desc ? rest[rest.length - 1 - i]! : rest[i]!;
      problems.push({
        row: row.info.lines,
        column: c.name,
        message:
          used === "fraction"
            ? `expected a fraction between 0 and 1, got ${c.values[i]} (is the file in percent?)`
            : `expected a percentage between 0 and 100, got ${c.values[i]}`,
      });
    }
  }
  if (problems.length > 0) throw new CsvProblems(what, problems);
  if (used === "fraction") for (const c of columns) c.values = c.values.map((v) => v * 100);
  return { delimiter, decimalComma, scale: used, detectedScale, reversed: desc, wavelengths, columns };
}

// ---- One measured spectrum (the single-spectrum upload) --------------------------------------------------

/** A spectrum column header that names its quantity: R, T, %R, T (%), Reflectance [%], Transmittance, … */
const R_HEADER = /^(%\s*)?(r|refl|reflectance|reflection)\s*(%|\(\s*%\s*\)|\[\s*%\s*\])?$/i;
const T_HEADER = /^(%\s*)?(t|trans|transmittance|transmission)\s*(%|\(\s*%\s*\)|\[\s*%\s*\])?$/i;

/** The quantity a spectrum column's header names, or null when it names none. */
export function quantityOfHeader(header: string): "R" | "T" | null {
  const h = header.trim();
  if (R_HEADER.test(h)) return "R";
  if (T_HEADER.test(h)) return "T";
  return null;
}

/** A single measured spectrum read by the lenient reader, values in percent. */
export interface SingleSpectrum {
  quantity: "R" | "T";
  wavelengths: number[];
  values: number[];
  table: SpectraTable;
}

/**
 * Read one measured spectrum with the spectrophotometer reader ({@link parseSpectraTable}: separators, decimal
 * comma, header spellings, µm, descending order) and exactly one spectrum column.
 * - scale: the caller's explicit choice. When omitted, percent is taken only if the data prove it (some value
 *   above 1.01, impossible for a fraction); values that all lie within 0–1 are ambiguous (a fraction, or the
 *   percent of a dark part) and are refused until the user confirms the scale.
 * - quantity: from the column header (R, T, %T, Reflectance, …) or the caller's field; both given must agree.
 * Refusals: 422 (the file, with row and column) or 400 (a field the user must give, naming it). Nothing is kept.
 */
export function parseSingleSpectrum(
  text: string,
  options: { scale?: ValueScale | undefined; quantity?: "R" | "T" | undefined },
): SingleSpectrum {
  const what = "measured spectrum";
  const table = parseSpectraTable(text, options.scale ?? "auto", what);
  if (table.columns.length !== 1) {
    throw new CsvProblems(what, [
      {
        row: 1,
        column: table.columns.map((c) => c.name).join("|"),
        message: `expected one spectrum column next to the wavelengths, got ${table.columns.length} (${table.columns.map((c) => `"${c.name}"`).join(", ")}); upload several parts as a lot`,
      },
    ]);
  }
  const column = table.columns[0]!;
  if (options.scale === undefined && table.detectedScale === "fraction") {
    throw new HttpError(
      400,
      "validation_failed",
      'body.scale: every value lies between 0 and 1, so the file may hold fractions or the percentages of a dark part; confirm with scale="fraction" or scale="percent"',
      [{ path: "scale", message: 'required for this file: "percent" or "fraction"' }],
    );
  }
  const fromHeader = quantityOfHeader(column.name);
  if (fromHeader && options.quantity && fromHeader !== options.quantity) {
    throw new CsvProblems(what, [
      {
        row: 1,
        column: column.name,
        message: `the column reads as ${fromHeader} but the upload says quantity ${options.quantity}`,
      },
    ]);
  }
  const quantity = fromHeader ?? options.quantity;
  if (!quantity) {
    throw new HttpError(
      400,
      "validation_failed",
      `body.quantity: the column "${column.name}" does not say whether it is R or T; send quantity="R" or quantity="T"`,
      [{ path: "quantity", message: 'required for this file: "R" or "T"' }],
    );
  }
  return { quantity, wavelengths: table.wavelengths, values: column.values, table };
}
