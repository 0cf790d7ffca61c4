// The spec mask's colour requirements: the colour of reflected or transmitted light under an illuminant and
// observer, at one angle and polarization, in an x/y box, an a*/b* box (optionally with L*), or within a ΔE of a
// target. What the numbers mean is the optics package's (CIE 015); this only edits them.
import {
  useFieldArray,
  useWatch,
  type Control,
  type FieldErrors,
  type UseFormRegister,
} from "react-hook-form";
import { Button, SelectField, TextField } from "../../../components/ui/index.ts";
import { emptyColour, type ColourValues, type ProgramFormValues } from "./program-form-model.ts";

const quantityOptions = [
  { value: "R", label: "reflected" },
  { value: "T", label: "transmitted" },
];
const illuminantOptions = [
  { value: "D65", label: "D65 (daylight)" },
  { value: "A", label: "A (incandescent)" },
];
const observerOptions = [
  { value: "2", label: "CIE 1931 2°" },
  { value: "10", label: "CIE 1964 10°" },
];
const polarizationOptions = [
  { value: "u", label: "unpolarized" },
  { value: "s", label: "s" },
  { value: "p", label: "p" },
];
const limitOptions = [
  { value: "box-ab", label: "a*, b* box (L* optional)" },
  { value: "box-xy", label: "x, y box" },
  { value: "delta-e", label: "ΔE*ab from a target" },
];
const formulaOptions = [
  { value: "CIEDE2000", label: "CIEDE2000" },
  { value: "CIE76", label: "CIE76" },
];

interface Props {
  control: Control<ProgramFormValues>;
  register: UseFormRegister<ProgramFormValues>;
  errors: FieldErrors<ProgramFormValues>;
  /** bands in the mask: the last entry of a mask cannot be removed */
  bandCount: number;
}

type NumberField = Exclude<
  keyof ColourValues,
  "id" | "label" | "quantity" | "illuminant" | "observer" | "polarization" | "limit" | "formula"
>;

function LimitFields({
  control,
  register,
  errors,
  index,
  defaults,
}: Omit<Props, "bandCount"> & { index: number; defaults: ColourValues }) {
  const n = index + 1;
  const e = errors.colour?.[index];
  const limit = useWatch({ control, name: `colour.${index}.limit` });
  const num = (field: NumberField, label: string, placeholder?: string) => (
    <TextField
      key={field}
      label={label}
      aria-label={`Colour ${n} ${label}`}
      inputMode="decimal"
      placeholder={placeholder}
      error={e?.[field]?.message}
      {...register(`colour.${index}.${field}`)}
    />
  );
  if (limit === "box-xy")
    return (
      <>
        {num("xMin", "x from")}
        {num("xMax", "x to")}
        {num("yMin", "y from")}
        {num("yMax", "y to")}
      </>
    );
  if (limit === "delta-e")
    return (
      <>
        <SelectField
          label="Formula"
          aria-label={`Colour ${n} ΔE formula`}
          options={formulaOptions}
          defaultValue={defaults.formula}
          {...register(`colour.${index}.formula`)}
        />
        {num("targetL", "target L*")}
        {num("targetA", "target a*")}
        {num("targetB", "target b*")}
        {num("deltaE", "ΔE at most")}
      </>
    );
  return (
    <>
      {num("aMin", "a* from")}
      {num("aMax", "a* to")}
      {num("bMin", "b* from")}
      {num("bMax", "b* to")}
      {num("LMin", "L* from", "any")}
      {num("LMax", "L* to", "any")}
    </>
  );
}

/** Colour requirements of the mask, one editable card each; none by default. */
export function ColourRequirementTable({ control, register, errors, bandCount }: Props) {
  const { fields, append, remove } = useFieldArray({ control, name: "colour" });
  return (
    <div className="flex flex-col gap-3">
      {fields.length > 0 ? (
        <ol className="flex flex-col gap-3" aria-label="Colour requirements">
          {fields.map((f, i) => {
            const e = errors.colour?.[i];
            const n = i + 1;
            return (
              <li
                key={f.id}
                aria-label={`Colour ${n}`}
                className="grid grid-cols-2 gap-3 rounded-lg border border-ink-100 bg-paper/40 p-3 sm:grid-cols-3 lg:grid-cols-6"
              >
                <TextField
                  label="Id"
                  aria-label={`Colour ${n} id`}
                  className="font-mono"
                  error={e?.id?.message}
                  {...register(`colour.${i}.id`)}
                />
                <TextField
                  label="Label"
                  aria-label={`Colour ${n} label`}
                  placeholder="optional"
                  error={e?.label?.message}
                  {...register(`colour.${i}.label`)}
                />
                <SelectField
                  label="Light"
                  aria-label={`Colour ${n} light`}
                  options={quantityOptions}
                  defaultValue={f.quantity}
                  {...register(`colour.${i}.quantity`)}
                />
                <SelectField
                  label="Illuminant"
                  aria-label={`Colour ${n} illuminant`}
                  options={illuminantOptions}
                  defaultValue={f.illuminant}
                  {...register(`colour.${i}.illuminant`)}
                />
                <SelectField
                  label="Observer"
                  aria-label={`Colour ${n} observer`}
                  options={observerOptions}
                  defaultValue={f.observer}
                  {...register(`colour.${i}.observer`)}
                />
                <TextField
                  label="Angle (°)"
                  aria-label={`Colour ${n} angle (°)`}
                  inputMode="decimal"
                  error={e?.angleDeg?.message}
                  {...register(`colour.${i}.angleDeg`)}
                />
                <SelectField
                  label="Polarization"
                  aria-label={`Colour ${n} polarization`}
                  options={polarizationOptions}
                  defaultValue={f.polarization}
                  {...register(`colour.${i}.polarization`)}
                />
                <SelectField
                  label="Requirement"
                  aria-label={`Colour ${n} requirement`}
                  options={limitOptions}
                  defaultValue={f.limit}
                  {...register(`colour.${i}.limit`)}
                />
                <LimitFields control={control} register={register} errors={errors} index={i} defaults={f} />
                <div className="flex items-start pt-6">
                  <Button
                    variant="ghost"
                    size="sm"
                    aria-label={`Remove colour ${n}`}
                    disabled={fields.length + bandCount <= 1}
                    onClick={() => remove(i)}
                  >
                    Remove
                  </Button>
                </div>
              </li>
            );
          })}
        </ol>
      ) : null}
      <div className="flex flex-wrap items-center gap-3">
        <Button variant="secondary" size="sm" onClick={() => append(emptyColour(fields.length))}>
          Add colour requirement
        </Button>
        <p className="text-xs text-ink-500">
          Colour of the reflected or transmitted light, summed over 380–780 nm (CIE 015). x, y are
          chromaticity coordinates; L*, a*, b* are CIELAB relative to the illuminant’s white. A box must
          contain the colour; a ΔE limit bounds its distance from the target.
        </p>
      </div>
    </div>
  );
}
