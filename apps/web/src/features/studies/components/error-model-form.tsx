// Error-model form (react-hook-form + zod, validated with the optics ErrorModelSchema), trials and seed.
import { useForm } from "react-hook-form";
import { zodResolver } from "@hookform/resolvers/zod";
import type { FieldError } from "react-hook-form";
import { StudyFormSchema } from "../lib/study-form.ts";
import type { StudyFormInput, StudyFormValues } from "../lib/study-form.ts";

const field = "mt-0.5 w-full rounded border border-ink-300 bg-white px-2 py-1 text-sm tabular aria-[invalid=true]:border-verdict-fail";

const optionalNumber = (v: unknown) => (v === "" || v === null || v === undefined ? undefined : Number(v));
const requiredNumber = (v: unknown) => (v === "" || v === null || v === undefined ? Number.NaN : Number(v));

export interface ErrorModelFormProps {
  defaultValues: StudyFormInput;
  onRun: (values: StudyFormValues) => void;
  running: boolean;
  /** material ids of the design (per-material spreads are shown for these when the model names materials) */
  materials: readonly string[];
  submitLabel?: string;
}

function Err({ error, id }: { error: FieldError | undefined; id: string }) {
  if (!error?.message) return null;
  return (
    <span id={id} role="alert" className="mt-0.5 block text-xs text-verdict-fail">
      {error.message}
    </span>
  );
}

function humanMessage(e: FieldError | undefined): FieldError | undefined {
  if (!e?.message) return e;
  // zod's own wording for NaN ("expected number, received NaN") is replaced by something a person can act on.
  if (/NaN|expected number/i.test(e.message)) return { ...e, message: "Enter a number" };
  return { ...e, message: e.message.replace(/^Too (small|big): expected number to be /, "Must be ") };
}

export function ErrorModelForm({ defaultValues, onRun, running, materials, submitLabel }: ErrorModelFormProps) {
  const {
    register,
    handleSubmit,
    formState: { errors },
    reset,
  } = useForm<StudyFormInput, unknown, StudyFormValues>({ resolver: zodResolver(StudyFormSchema), defaultValues, mode: "onBlur" });
  const em = errors.errorModel;
  const sysIsRecord = typeof defaultValues.errorModel.systematicPct === "object";
  const driftIsRecord = typeof defaultValues.errorModel.indexDriftPct === "object";
  const recordErr = (e: unknown, m: string): FieldError | undefined =>
    e && typeof e === "object" ? humanMessage((e as Record<string, FieldError | undefined>)[m]) : undefined;

  return (
    <form onSubmit={handleSubmit(onRun)} noValidate aria-label="Tolerance study settings" className="space-y-3">
      <fieldset className="grid grid-cols-2 gap-x-3 gap-y-2 text-xs text-ink-700 md:grid-cols-4">
        <legend className="mb-1 text-xs font-semibold text-ink-800">Thickness errors (1σ, per layer)</legend>
        <label>
          Relative (%)
          <input className={field} type="number" step="any" aria-invalid={Boolean(em?.thickness?.relativePct)} aria-describedby="err-rel" {...register("errorModel.thickness.relativePct", { setValueAs: requiredNumber })} />
          <Err id="err-rel" error={humanMessage(em?.thickness?.relativePct)} />
        </label>
        <label>
          Absolute (nm)
          <input className={field} type="number" step="any" aria-invalid={Boolean(em?.thickness?.absoluteNm)} aria-describedby="err-abs" {...register("errorModel.thickness.absoluteNm", { setValueAs: requiredNumber })} />
          <Err id="err-abs" error={humanMessage(em?.thickness?.absoluteNm)} />
        </label>
        <label>
          Distribution
          <select className={field} {...register("errorModel.thickness.distribution")}>
            <option value="normal">normal</option>
            <option value="uniform">uniform</option>
          </select>
        </label>
        <label>
          Truncate at (σ, optional)
          <input className={field} type="number" step="any" aria-invalid={Boolean(em?.thickness?.truncateSigma)} aria-describedby="err-trunc" {...register("errorModel.thickness.truncateSigma", { setValueAs: optionalNumber })} />
          <Err id="err-trunc" error={humanMessage(em?.thickness?.truncateSigma)} />
        </label>
      </fieldset>
      <fieldset className="grid grid-cols-2 gap-x-3 gap-y-2 text-xs text-ink-700 md:grid-cols-4">
        <legend className="mb-1 text-xs font-semibold text-ink-800">Per-run errors (1σ)</legend>
        {sysIsRecord ? (
          materials.map((m) => (
            <label key={`sys-${m}`}>
              Systematic {m} (%)
              <input className={field} type="number" step="any" {...register(`errorModel.systematicPct.${m}` as "errorModel.systematicPct", { setValueAs: (v: unknown) => optionalNumber(v) ?? 0 })} />
              <Err id={`err-sys-${m}`} error={recordErr(em?.systematicPct, m)} />
            </label>
          ))
        ) : (
          <label>
            Systematic thickness scale (%)
            <input className={field} type="number" step="any" placeholder="none" aria-invalid={Boolean(em?.systematicPct)} {...register("errorModel.systematicPct", { setValueAs: optionalNumber })} />
            <Err id="err-sys" error={humanMessage(em?.systematicPct as FieldError | undefined)} />
          </label>
        )}
        {driftIsRecord ? (
          materials.map((m) => (
            <label key={`drift-${m}`}>
              Index drift {m} (%)
              <input className={field} type="number" step="any" {...register(`errorModel.indexDriftPct.${m}` as "errorModel.indexDriftPct", { setValueAs: (v: unknown) => optionalNumber(v) ?? 0 })} />
              <Err id={`err-drift-${m}`} error={recordErr(em?.indexDriftPct, m)} />
            </label>
          ))
        ) : (
          <label>
            Index drift (%)
            <input className={field} type="number" step="any" placeholder="none" aria-invalid={Boolean(em?.indexDriftPct)} {...register("errorModel.indexDriftPct", { setValueAs: optionalNumber })} />
            <Err id="err-drift" error={humanMessage(em?.indexDriftPct as FieldError | undefined)} />
          </label>
        )}
        <label>
          Index noise per layer (%)
          <input className={field} type="number" step="any" placeholder="none" aria-invalid={Boolean(em?.indexNoisePct)} {...register("errorModel.indexNoisePct", { setValueAs: optionalNumber })} />
          <Err id="err-noise" error={humanMessage(em?.indexNoisePct)} />
        </label>
      </fieldset>
      <div className="flex flex-wrap items-end gap-3 text-xs text-ink-700">
        <label className="w-32">
          Trials
          <input className={field} type="number" step={1} aria-invalid={Boolean(errors.trials)} aria-describedby="err-trials" {...register("trials", { setValueAs: requiredNumber })} />
          <Err id="err-trials" error={humanMessage(errors.trials)} />
        </label>
        <label className="w-44">
          Seed
          <input className={field} aria-invalid={Boolean(errors.seed)} aria-describedby="err-seed" {...register("seed")} />
          <Err id="err-seed" error={errors.seed} />
        </label>
        <button type="submit" disabled={running} className="rounded bg-ink-900 px-3 py-1.5 text-sm font-semibold text-paper hover:bg-ink-800 disabled:opacity-40">
          {submitLabel ?? "Run study in the browser"}
        </button>
        <button type="button" className="px-2 py-1.5 text-xs text-ink-700 underline" onClick={() => reset(defaultValues)}>
          Program defaults
        </button>
      </div>
    </form>
  );
}
