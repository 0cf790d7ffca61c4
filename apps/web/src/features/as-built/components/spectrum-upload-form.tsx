// Upload of one measured spectrum: the server reads the file first (separator, decimal comma, columns, whether
// the values look like percent or fractions) and the user confirms how to read it before anything is stored.
import { useState } from "react";
import type { FormEvent } from "react";
import { csvProblemsOf } from "../../../lib/api-errors.ts";
import { usePreviewSpectra, type SpectraPreview } from "../api/lots.ts";
import { useUploadMeasurement, type MeasuredSpectrum } from "../api/measurements.ts";

const field = "mt-0.5 w-full rounded border border-ink-300 bg-white px-2 py-1 text-sm";

/** The label the server would give: the file name without its extension. */
function defaultLabel(fileName: string): string {
  return fileName.replace(/\.[^.]+$/, "") || fileName;
}

export function SpectrumUploadForm({
  revisionId,
  onUploaded,
}: {
  revisionId: string;
  onUploaded: (m: MeasuredSpectrum) => void;
}) {
  const preview = usePreviewSpectra();
  const upload = useUploadMeasurement(revisionId);
  const [read, setRead] = useState<SpectraPreview | null>(null);
  const [form, setForm] = useState({
    label: "",
    angleDeg: "0",
    polarization: "u" as "s" | "p" | "u",
    file: null as File | null,
    scale: "" as "" | "percent" | "fraction",
    quantity: "" as "" | "R" | "T",
  });
  const [formError, setFormError] = useState<string | null>(null);
  // Bumped after an upload so the file input forgets the file it held.
  const [fileKey, setFileKey] = useState(0);

  const choose = (file: File | null) => {
    setForm((f) => ({ ...f, file, scale: "" }));
    setRead(null);
    upload.reset();
    if (file)
      preview.mutate(file, {
        onSuccess: (p) => {
          setRead(p);
          setForm((f) => ({ ...f, scale: p.detectedScale }));
        },
      });
  };

  const submit = (e: FormEvent) => {
    e.preventDefault();
    const angle = Number(form.angleDeg);
    if (!form.file) return setFormError("Choose a file: a wavelength column and one R or T column.");
    if (!read) return setFormError("Wait until the file has been read, then check how.");
    if (read.columns.length !== 1)
      return setFormError(
        `The file has ${read.columns.length} spectrum columns; upload one spectrum here, or several parts as a lot.`,
      );
    if (form.scale === "") return setFormError("Confirm whether the values are percent or fractions.");
    if (!(angle >= 0 && angle < 90)) return setFormError("The angle must be between 0 and 90°.");
    setFormError(null);
    upload.mutate(
      {
        file: form.file,
        label: form.label.trim() || defaultLabel(form.file.name),
        angleDeg: angle,
        polarization: form.polarization,
        scale: form.scale,
        ...(form.quantity ? { quantity: form.quantity } : {}),
      },
      {
        onSuccess: (created) => {
          setForm((f) => ({ ...f, label: "", file: null, scale: "" }));
          setRead(null);
          setFileKey((k) => k + 1);
          onUploaded(created);
        },
      },
    );
  };
  const problems = [...csvProblemsOf(preview.error), ...csvProblemsOf(upload.error)];
  const error = preview.error ?? upload.error;

  return (
    <form
      onSubmit={submit}
      aria-label="Upload a measured spectrum"
      className="grid grid-cols-2 gap-2 rounded-md border border-ink-100 p-3 text-xs text-ink-700 md:grid-cols-5"
    >
      <label className="md:col-span-2">
        CSV file: a wavelength column and one R or T column (, ; or tab separated)
        <input
          key={fileKey}
          type="file"
          accept=".csv,.txt,text/csv,text/plain"
          className={field}
          onChange={(e) => choose(e.target.files?.[0] ?? null)}
        />
      </label>
      <label>
        Label
        <input
          className={field}
          value={form.label}
          placeholder={form.file ? defaultLabel(form.file.name) : "the file name"}
          onChange={(e) => setForm({ ...form, label: e.target.value })}
        />
      </label>
      <label>
        Angle (°)
        <input
          className={field}
          value={form.angleDeg}
          inputMode="decimal"
          onChange={(e) => setForm({ ...form, angleDeg: e.target.value })}
        />
      </label>
      <label>
        Polarization
        <select
          className={field}
          value={form.polarization}
          onChange={(e) => setForm({ ...form, polarization: e.target.value as "s" | "p" | "u" })}
        >
          <option value="u">unpolarized</option>
          <option value="s">s</option>
          <option value="p">p</option>
        </select>
      </label>
      {read ? (
        <fieldset className="col-span-2 rounded border border-film-amber/40 p-2 md:col-span-5">
          <legend>How the file was read — confirm</legend>
          <p>
            {read.rows} rows, {read.wavelengthRange[0]}–{read.wavelengthRange[1]} nm
            {read.reversed ? " (descending, reordered)" : ""}; separator “{read.delimiter}”
            {read.decimalComma ? ", decimal comma" : ""}; column{read.columns.length === 1 ? "" : "s"}{" "}
            {read.columns.map((c) => `“${c}”`).join(", ")}
          </p>
          <p>
            Values look like{" "}
            {read.detectedScale === "fraction"
              ? "fractions (0–1) — or the percentages of a dark part"
              : "percent (0–100)"}
            . They are:{" "}
            <label className="mr-3">
              <input
                type="radio"
                name="spectrum-scale"
                checked={form.scale === "percent"}
                onChange={() => setForm({ ...form, scale: "percent" })}
              />{" "}
              percent
            </label>
            <label>
              <input
                type="radio"
                name="spectrum-scale"
                checked={form.scale === "fraction"}
                onChange={() => setForm({ ...form, scale: "fraction" })}
              />{" "}
              fractions
            </label>
          </p>
          <label className="mt-1 block">
            Quantity
            <select
              className={field}
              value={form.quantity}
              onChange={(e) => setForm({ ...form, quantity: e.target.value as "" | "R" | "T" })}
            >
              <option value="">from the column header</option>
              <option value="T">T</option>
              <option value="R">R</option>
            </select>
          </label>
        </fieldset>
      ) : null}
      <div className="col-span-2 flex items-center gap-2 md:col-span-5">
        <button
          type="submit"
          disabled={upload.isPending || preview.isPending}
          className="rounded border border-ink-300 bg-white px-3 py-1 text-sm"
        >
          {upload.isPending ? "Uploading…" : preview.isPending ? "Reading the file…" : "Upload measurement"}
        </button>
        {formError ? (
          <span role="alert" className="text-verdict-fail">
            {formError}
          </span>
        ) : null}
        {error ? (
          <span role="alert" className="text-verdict-fail">
            {error.message}
          </span>
        ) : null}
      </div>
      {problems.length > 0 ? (
        <ul
          className="col-span-2 list-disc space-y-0.5 pl-5 text-verdict-fail md:col-span-5"
          aria-label="Problems in the file"
        >
          {problems.map((d, i) => (
            <li key={i}>
              line {d.row}
              {d.column && d.column !== "-" ? `, column ${d.column}` : ""}: {d.message}
            </li>
          ))}
        </ul>
      ) : null}
      {error ? (
        <p className="col-span-2 text-ink-500 md:col-span-5">
          Nothing was stored; fix the file and upload it again.
        </p>
      ) : null}
    </form>
  );
}
