import {
  useFieldArray,
  useWatch,
  type Control,
  type FieldErrors,
  type UseFormRegister,
} from "react-hook-form";
import { Button, Checkbox, SelectField, TextField } from "../../../components/ui/index.ts";
import { emptyBand, type BandValues, type ProgramFormValues } from "./program-form-model.ts";

const quantityOptions = [
  { value: "R", label: "R (%)" },
  { value: "T", label: "T (%)" },
  { value: "A", label: "A (%)" },
  { value: "OD", label: "OD" },
];
const polarizationOptions = [
  { value: "u", label: "unpolarized" },
  { value: "s", label: "s" },
  { value: "p", label: "p" },
  { value: "sp", label: "s and p each" },
];
const requirementOptions = [
  { value: "min", label: "every point ≥" },
  { value: "max", label: "every point ≤" },
  { value: "avgMin", label: "band average ≥" },
  { value: "avgMax", label: "band average ≤" },
];

const incidenceOptions = [
  { value: "single", label: "one angle" },
  { value: "range", label: "angle range" },
  { value: "cone", label: "cone of light" },
];
const coneOptions = [
  { value: "fNumber", label: "f-number" },
  { value: "halfAngle", label: "half-angle (°)" },
];

export interface SpecBandTableProps {
  control: Control<ProgramFormValues>;
  register: UseFormRegister<ProgramFormValues>;
  errors: FieldErrors<ProgramFormValues>;
}

function BandUnit({ control, index }: { control: Control<ProgramFormValues>; index: number }) {
  const q = useWatch({ control, name: `bands.${index}.quantity` });
  return <>{q === "OD" ? "OD" : "%"}</>;
}

/** The angle conditions of one band: one angle, an angle range (every angle, or its average), or a cone. */
function BandConditions({
  control,
  register,
  errors,
  index,
  defaults,
}: SpecBandTableProps & { index: number; defaults: Pick<BandValues, "incidence" | "coneBy"> }) {
  const n = index + 1;
  const e = errors.bands?.[index];
  const incidence = useWatch({ control, name: `bands.${index}.incidence` });
  const coneBy = useWatch({ control, name: `bands.${index}.coneBy` });
  return (
    <div
      className="col-span-full grid grid-cols-2 gap-3 sm:grid-cols-3 lg:grid-cols-6"
      data-testid={`band-${n}-conditions`}
    >
      <SelectField
        label="Incidence"
        aria-label={`Band ${n} incidence`}
        options={incidenceOptions}
        defaultValue={defaults.incidence}
        error={e?.incidence?.message}
        {...register(`bands.${index}.incidence`)}
      />
      {incidence === "range" ? (
        <>
          <TextField
            label="From (°)"
            aria-label={`Band ${n} angles from (°)`}
            inputMode="decimal"
            error={e?.rangeFrom?.message}
            {...register(`bands.${index}.rangeFrom`)}
          />
          <TextField
            label="To (°)"
            aria-label={`Band ${n} angles to (°)`}
            inputMode="decimal"
            error={e?.rangeTo?.message}
            {...register(`bands.${index}.rangeTo`)}
          />
          <TextField
            label="Angle step (°)"
            aria-label={`Band ${n} angle step (°)`}
            inputMode="decimal"
            placeholder="1"
            error={e?.rangeStep?.message}
            {...register(`bands.${index}.rangeStep`)}
          />
          <div className="flex items-end pb-2 lg:col-span-2">
            <Checkbox
              label="Average over the range (instead of every angle)"
              aria-label={`Band ${n} average over the angle range`}
              {...register(`bands.${index}.angleAverage`)}
            />
          </div>
        </>
      ) : (
        <TextField
          label={incidence === "cone" ? "Chief ray (°)" : "Angle (°)"}
          aria-label={incidence === "cone" ? `Band ${n} chief ray (°)` : `Band ${n} angle (°)`}
          inputMode="decimal"
          error={e?.angleDeg?.message}
          {...register(`bands.${index}.angleDeg`)}
        />
      )}
      {incidence === "cone" ? (
        <>
          <SelectField
            label="Cone given by"
            aria-label={`Band ${n} cone given by`}
            options={coneOptions}
            defaultValue={defaults.coneBy}
            {...register(`bands.${index}.coneBy`)}
          />
          <TextField
            label={coneBy === "fNumber" ? "f-number" : "Half-angle (°)"}
            aria-label={`Band ${n} cone ${coneBy === "fNumber" ? "f-number" : "half-angle (°)"}`}
            inputMode="decimal"
            hint={coneBy === "fNumber" ? "half-angle = arcsin(1/(2N))" : undefined}
            error={e?.cone?.message}
            {...register(`bands.${index}.cone`)}
          />
        </>
      ) : null}
    </div>
  );
}

/**
 * The spec mask's bands, one editable row each with its wavelength range, quantity, polarization, angle
 * conditions and requirement; rows can be added and removed (the mask keeps at least one entry).
 */
export function SpecBandTable({
  control,
  register,
  errors,
  colourCount = 0,
}: SpecBandTableProps & { colourCount?: number }) {
  const { fields, append, remove } = useFieldArray({ control, name: "bands" });
  const bandErrors = errors.bands;
  const listError = bandErrors?.message ?? bandErrors?.root?.message;
  return (
    <div className="flex flex-col gap-3">
      <ol className="flex flex-col gap-3" aria-label="Spec bands">
        {fields.map((f, i) => {
          const e = bandErrors?.[i];
          const n = i + 1;
          return (
            <li
              key={f.id}
              aria-label={`Band ${n}`}
              className="grid grid-cols-2 gap-3 rounded-lg border border-ink-100 bg-paper/40 p-3 sm:grid-cols-3 lg:grid-cols-6 2xl:grid-cols-[8rem_minmax(8rem,1fr)_6rem_6rem_5rem_7rem_8rem_10rem_6rem_6rem_auto]"
            >
              <TextField
                label="Id"
                aria-label={`Band ${n} id`}
                error={e?.id?.message}
                className="font-mono"
                {...register(`bands.${i}.id`)}
              />
              <TextField
                label="Label"
                aria-label={`Band ${n} label`}
                placeholder="optional"
                error={e?.label?.message}
                {...register(`bands.${i}.label`)}
              />
              <TextField
                label="Start (nm)"
                aria-label={`Band ${n} start (nm)`}
                inputMode="decimal"
                error={e?.start?.message}
                {...register(`bands.${i}.start`)}
              />
              <TextField
                label="Stop (nm)"
                aria-label={`Band ${n} stop (nm)`}
                inputMode="decimal"
                error={e?.stop?.message}
                {...register(`bands.${i}.stop`)}
              />
              <TextField
                label="Step (nm)"
                aria-label={`Band ${n} step (nm)`}
                inputMode="decimal"
                placeholder="1"
                error={e?.step?.message}
                {...register(`bands.${i}.step`)}
              />
              <SelectField
                label="Quantity"
                aria-label={`Band ${n} quantity`}
                options={quantityOptions}
                defaultValue={f.quantity}
                error={e?.quantity?.message}
                {...register(`bands.${i}.quantity`)}
              />
              <SelectField
                label="Polarization"
                aria-label={`Band ${n} polarization`}
                options={polarizationOptions}
                defaultValue={f.polarization}
                error={e?.polarization?.message}
                {...register(`bands.${i}.polarization`)}
              />
              <SelectField
                label="Requirement"
                aria-label={`Band ${n} requirement`}
                options={requirementOptions}
                defaultValue={f.requirement}
                error={e?.requirement?.message}
                {...register(`bands.${i}.requirement`)}
              />
              <TextField
                label={
                  <>
                    Value (<BandUnit control={control} index={i} />)
                  </>
                }
                aria-label={`Band ${n} value`}
                inputMode="decimal"
                error={e?.value?.message}
                {...register(`bands.${i}.value`)}
              />
              <TextField
                label="Tolerance"
                aria-label={`Band ${n} tolerance`}
                inputMode="decimal"
                placeholder="none"
                error={e?.tolerance?.message}
                {...register(`bands.${i}.tolerance`)}
              />
              <div className="flex items-start pt-6 lg:col-span-2 2xl:col-span-1">
                <Button
                  variant="ghost"
                  size="sm"
                  aria-label={`Remove band ${n}`}
                  disabled={fields.length + colourCount <= 1}
                  onClick={() => remove(i)}
                >
                  Remove
                </Button>
              </div>
              <BandConditions control={control} register={register} errors={errors} index={i} defaults={f} />
            </li>
          );
        })}
      </ol>
      {listError && <p className="text-xs font-medium text-verdict-fail">{listError}</p>}
      <div className="flex flex-wrap items-center gap-3">
        <Button variant="secondary" size="sm" onClick={() => append(emptyBand(fields.length))}>
          Add band
        </Button>
        <p className="text-xs text-ink-500">
          R, T and A limits in percent, OD = −log₁₀ T. The tolerance relaxes the limit (a ≥ limit becomes
          value − tolerance, a ≤ limit value + tolerance). An angle range must pass at every angle (or on
          average); a cone is averaged over the light it holds; “s and p each” must pass for both.
        </p>
      </div>
    </div>
  );
}
