import { useState } from "react";
import { useForm, useWatch, type FieldPath } from "react-hook-form";
import { zodResolver } from "@hookform/resolvers/zod";
import {
  Button,
  Card,
  Checkbox,
  Notice,
  SelectField,
  TextArea,
  TextField,
  errorMessage,
} from "../../../components/ui/index.ts";
import { ProtectiveCaution } from "../../../components/protective-caution.tsx";
import { ApiError } from "../../../lib/api-client.ts";
import type { Program } from "../api/get-program.ts";
import { useCreateProgram, useUpdateProgram } from "../api/save-program.ts";
import {
  defaultFormValues,
  fieldForPath,
  formValuesFromProgram,
  programFormSchema,
  toProgramBody,
  type ProgramFormValues,
} from "./program-form-model.ts";
import { SpecBandTable } from "./spec-band-table.tsx";
import { ColourRequirementTable } from "./colour-requirement-table.tsx";

export interface ProgramFormProps {
  /** The program to edit; without it the form creates a new one. */
  program?: Program;
  /** Called with the saved program (created or updated). */
  onSaved: (program: Program) => void;
  onCancel?: () => void;
}

function serverIssues(error: unknown): Array<{ path: string; message: string }> {
  if (!(error instanceof ApiError) || !Array.isArray(error.details)) return [];
  return error.details.flatMap((d: unknown) =>
    typeof d === "object" && d !== null && "message" in d && typeof d.message === "string"
      ? [{ path: "path" in d && typeof d.path === "string" ? d.path : "", message: d.message }]
      : [],
  );
}

/** The server's answer in words a person can act on. */
function refusalText(error: unknown, editing: boolean): string {
  if (error instanceof ApiError && error.status === 403 && error.code !== "bad_origin")
    return `Only program managers and administrators can ${editing ? "edit" : "create"} programs. The server refused: ${error.message}`;
  return errorMessage(error);
}

/** Create or edit a program: texts, protective flag, target yield, study defaults, error model and spec mask. */
export function ProgramForm({ program, onSaved, onCancel }: ProgramFormProps) {
  const editing = program !== undefined;
  const create = useCreateProgram();
  const update = useUpdateProgram(program?.id ?? "");
  const mutation = editing ? update : create;
  const [unplaced, setUnplaced] = useState<string[]>([]);
  const [initial] = useState(() => (program ? formValuesFromProgram(program) : defaultFormValues()));
  const {
    register,
    control,
    handleSubmit,
    setError,
    formState: { errors },
  } = useForm<ProgramFormValues>({
    resolver: zodResolver(programFormSchema),
    defaultValues: initial,
  });
  const protective = useWatch({ control, name: "protective" });
  const application = useWatch({ control, name: "application" });
  const bandCount = useWatch({ control, name: "bands" }).length;
  const colourCount = useWatch({ control, name: "colour" }).length;

  const onSubmit = handleSubmit((values) => {
    setUnplaced([]);
    const body = toProgramBody(values);
    mutation.mutate(body, {
      onSuccess: onSaved,
      onError: (error) => {
        const left: string[] = [];
        // The server names the field in the message too (e.g. "body.specMask.bands.0.stop: …").
        for (const issue of serverIssues(error)) {
          const field = fieldForPath(issue.path);
          if (field)
            setError(field as FieldPath<ProgramFormValues>, { type: "server", message: issue.message });
          else left.push(issue.path ? `${issue.path}: ${issue.message}` : issue.message);
        }
        setUnplaced(left);
      },
    });
  });

  return (
    <form
      noValidate
      aria-label={editing ? `Edit program ${program.name}` : "New program"}
      className="flex flex-col gap-6"
      onSubmit={(e) => void onSubmit(e)}
    >
      <Card title="Program">
        <div className="grid gap-4 md:grid-cols-2">
          <TextField label="Name" required error={errors.name?.message} {...register("name")} />
          <TextField label="Customer" error={errors.customer?.message} {...register("customer")} />
          <TextField
            label="Application"
            hint="e.g. laser eyewear filter, camera cover glass AR"
            error={errors.application?.message}
            {...register("application")}
          />
          <div className="flex flex-col justify-center gap-1">
            <Checkbox label="Protective filter (eye or sensor protection)" {...register("protective")} />
            {errors.protective?.message && (
              <p className="text-xs font-medium text-verdict-fail">{errors.protective.message}</p>
            )}
          </div>
          <TextArea
            label="Description"
            rows={3}
            wrapperClassName="md:col-span-2"
            error={errors.description?.message}
            {...register("description")}
          />
        </div>
        {protective && <ProtectiveCaution application={application || null} className="mt-4" />}
      </Card>

      <Card
        title="Evidence rules and studies"
        description="A revision can be signed off when the lower Wilson bound of its evidence run, at the confidence below, reaches the target. The server assigns the evidence run's seed; its trials are the minimum below. Changing these rules, the mask or the error model makes a new program version and sends approved revisions back to review."
      >
        <div className="grid gap-4 sm:grid-cols-3">
          <TextField
            label="Target yield (%)"
            required
            inputMode="decimal"
            hint="Share of simulated runs that must pass every band."
            error={errors.targetYieldPct?.message}
            {...register("targetYieldPct")}
          />
          <TextField
            label="Minimum evidence trials"
            required
            inputMode="numeric"
            hint="At least 100; 2,000 lets a 95 % design show a bound near 94 %."
            error={errors.minEvidenceTrials?.message}
            {...register("minEvidenceTrials")}
          />
          <TextField
            label="Confidence (%)"
            required
            inputMode="decimal"
            hint="Two-sided Wilson interval; its lower end is compared with the target."
            error={errors.confidencePct?.message}
            {...register("confidencePct")}
          />
          <TextField
            label="Default trials"
            required
            inputMode="numeric"
            error={errors.trials?.message}
            {...register("trials")}
          />
          <TextField
            label="Default seed"
            required
            className="font-mono"
            hint="The same seed and trials give the same result."
            error={errors.seed?.message}
            {...register("seed")}
          />
        </div>
      </Card>

      <Card title="Process error model" description="All spreads are one standard deviation (1σ).">
        <div className="grid gap-4 sm:grid-cols-2 lg:grid-cols-4">
          <TextField
            label="Thickness, relative σ (%)"
            required
            inputMode="decimal"
            error={errors.relativePct?.message}
            {...register("relativePct")}
          />
          <TextField
            label="Thickness, absolute σ (nm)"
            required
            inputMode="decimal"
            error={errors.absoluteNm?.message}
            {...register("absoluteNm")}
          />
          <SelectField
            label="Distribution"
            options={[
              { value: "normal", label: "normal" },
              { value: "uniform", label: "uniform" },
            ]}
            // Set on the element too, so the choice shows before react-hook-form syncs it.
            defaultValue={initial.distribution}
            error={errors.distribution?.message}
            {...register("distribution")}
          />
          <TextField
            label="Truncation (± σ)"
            inputMode="decimal"
            placeholder="none"
            hint="Normal draws only; 0.5 to 20."
            error={errors.truncateSigma?.message}
            {...register("truncateSigma")}
          />
          <TextField
            label="Systematic thickness (%)"
            placeholder="none"
            hint="One number, or per material: Ta2O5 = 0.5, SiO2 = 0.4"
            wrapperClassName="lg:col-span-2"
            error={errors.systematicPct?.message}
            {...register("systematicPct")}
          />
          <TextField
            label="Index drift (%)"
            placeholder="none"
            hint="Per run; one number or per material."
            error={errors.indexDriftPct?.message}
            {...register("indexDriftPct")}
          />
          <TextField
            label="Index noise, per layer (%)"
            inputMode="decimal"
            placeholder="none"
            error={errors.indexNoisePct?.message}
            {...register("indexNoisePct")}
          />
        </div>
      </Card>

      <Card
        title="Spec mask"
        description={
          editing
            ? "A design passes when every band and colour requirement passes. Existing revisions keep the mask they were created with."
            : "A design passes when every band and colour requirement passes."
        }
      >
        <SpecBandTable control={control} register={register} errors={errors} colourCount={colourCount} />
        <h3 className="mb-2 mt-5 text-sm font-semibold text-ink-800">Colour requirements</h3>
        <ColourRequirementTable control={control} register={register} errors={errors} bandCount={bandCount} />
      </Card>

      {mutation.isError && (
        <Notice tone="error" title={editing ? "The program was not saved" : "The program was not created"}>
          <p>{refusalText(mutation.error, editing)}</p>
          {unplaced.length > 0 && (
            <ul className="mt-1 list-disc pl-5 text-xs">
              {unplaced.map((m) => (
                <li key={m}>{m}</li>
              ))}
            </ul>
          )}
        </Notice>
      )}

      <div className="flex flex-wrap gap-3">
        <Button type="submit" loading={mutation.isPending}>
          {editing ? "Save program" : "Create program"}
        </Button>
        {onCancel && (
          <Button variant="ghost" onClick={onCancel}>
            Cancel
          </Button>
        )}
      </div>
    </form>
  );
}
