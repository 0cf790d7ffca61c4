import { useForm } from "react-hook-form";
import { zodResolver } from "@hookform/resolvers/zod";
import { z } from "zod";
import { Button, Notice, SelectField, TextField, errorMessage } from "../../../components/ui/index.ts";
import { csvProblemsOf } from "../../../lib/api-errors.ts";
import { useUploadMaterial } from "../api/upload-material.ts";
import type { MaterialItem } from "../api/get-materials.ts";

const MAX_BYTES = 1024 * 1024;

const schema = z.object({
  id: z
    .string()
    .trim()
    .regex(
      /^[A-Za-z0-9][A-Za-z0-9_.+-]{0,63}$/,
      "Use 1–64 letters, digits, _ . + - (starting with a letter or digit).",
    ),
  name: z.string().trim().min(1, "Give the material a name.").max(200),
  role: z.enum(["layer", "substrate", "medium", "metal"]),
  source: z.string().trim().max(500).optional(),
  file: z
    .custom<FileList>((v) => typeof FileList !== "undefined" && v instanceof FileList, "Choose a CSV file.")
    .refine((f) => f.length === 1, "Choose a CSV file.")
    .refine((f) => (f[0]?.size ?? 0) <= MAX_BYTES, "The file is over 1 MB."),
});
type Values = z.infer<typeof schema>;

export interface UploadMaterialFormProps {
  onUploaded?: (m: MaterialItem) => void;
}

/** Upload of an n,k table; the server's row and column findings are listed when it refuses the file. */
export function UploadMaterialForm({ onUploaded }: UploadMaterialFormProps) {
  const upload = useUploadMaterial();
  const {
    register,
    handleSubmit,
    reset,
    formState: { errors },
  } = useForm<Values>({
    resolver: zodResolver(schema),
    defaultValues: { role: "layer", id: "", name: "", source: "" },
  });

  const problems = csvProblemsOf(upload.error);

  return (
    <form
      noValidate
      aria-label="Upload an n,k table"
      className="flex flex-col gap-4"
      onSubmit={handleSubmit((v) => {
        const file = v.file[0];
        if (!file) return;
        upload.mutate(
          { file, id: v.id, name: v.name, role: v.role, source: v.source || undefined },
          {
            onSuccess: (m) => {
              reset();
              onUploaded?.(m);
            },
          },
        );
      })}
    >
      <p className="text-sm text-ink-700">
        CSV with a header row: <code className="font-mono text-xs">wavelength_nm,n,k</code> or{" "}
        <code className="font-mono text-xs">wavelength_um,n,k</code>, wavelengths increasing, k ≥ 0 (N = n −
        ik). Up to 1 MB.
      </p>
      {upload.isSuccess && (
        <Notice tone="success" onDismiss={() => upload.reset()}>
          Added <strong>{upload.data.name}</strong> (<span className="font-mono">{upload.data.id}</span>) to
          the workspace library.
        </Notice>
      )}
      {upload.isError && (
        <Notice tone="error" title="The file was not added">
          <p>{errorMessage(upload.error)}</p>
          {problems.length > 0 && (
            <table className="mt-2 w-full border-collapse text-left text-xs">
              <caption className="sr-only">Problems found in the file</caption>
              <thead>
                <tr className="border-b border-verdict-fail/30">
                  <th scope="col" className="py-1 pr-3">
                    Row
                  </th>
                  <th scope="col" className="py-1 pr-3">
                    Column
                  </th>
                  <th scope="col" className="py-1">
                    Problem
                  </th>
                </tr>
              </thead>
              <tbody>
                {problems.slice(0, 50).map((p, i) => (
                  <tr key={i} className="border-b border-verdict-fail/10">
                    <td className="py-1 pr-3 font-mono">{p.row}</td>
                    <td className="py-1 pr-3 font-mono">{p.column === "-" ? "—" : p.column}</td>
                    <td className="py-1">{p.message}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          )}
          {problems.length > 50 && <p className="mt-1 text-xs">…and {problems.length - 50} more.</p>}
        </Notice>
      )}
      <div className="grid gap-4 sm:grid-cols-2">
        <TextField
          label="Material id"
          hint="What designs refer to, e.g. TiO2-ebeam"
          error={errors.id?.message}
          required
          {...register("id")}
        />
        <TextField
          label="Name"
          hint="e.g. titanium dioxide, e-beam"
          error={errors.name?.message}
          required
          {...register("name")}
        />
        <SelectField
          label="Used as"
          error={errors.role?.message}
          options={[
            { value: "layer", label: "Layer material" },
            { value: "substrate", label: "Substrate" },
            { value: "medium", label: "Incident or exit medium" },
            { value: "metal", label: "Metal" },
          ]}
          {...register("role")}
        />
        <TextField
          label="Source of the data"
          hint="Optional: where the n,k values come from"
          error={errors.source?.message}
          {...register("source")}
        />
      </div>
      <TextField
        label="n,k table (CSV)"
        type="file"
        accept=".csv,text/csv,text/plain"
        className="py-1.5"
        error={errors.file?.message}
        required
        {...register("file")}
      />
      <div>
        <Button type="submit" loading={upload.isPending} loadingLabel="Uploading…">
          Add to library
        </Button>
      </div>
    </form>
  );
}
