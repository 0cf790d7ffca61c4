// /designs/new?program= — a new design from a starter stack or an imported file, checked against the program's mask.
import { useMemo, useState } from "react";
import type { FormEvent } from "react";
import { Link, useNavigate, useSearchParams } from "react-router";
import type { LoaderFunctionArgs } from "react-router";
import type { Design } from "@stackproof/optics";
import { queryClient } from "../../../lib/query-client.ts";
import { hasRole, requireSession, useSession } from "../../../lib/session.ts";
import { paths } from "../../../config/paths.ts";
import { EmptyState, ErrorState, PageSpinner } from "../../../components/ui/index.ts";
import { ProtectiveCaution } from "../../../components/protective-caution.tsx";
import { programQueryOptions, useProgram } from "../../../features/workspace/api/get-program.ts";
import { useCreateDesign, firstRevisionId } from "../../../features/workspace/api/create-design.ts";
import { importDesign } from "../../../features/workspace/api/import-design.ts";
import { STARTERS, maskReferenceWavelength } from "../../../features/workspace/lib/starters.ts";
import { SpectrumPanel } from "../../../features/spectrum/components/spectrum-panel.tsx";
import type { ChartView } from "../../../features/spectrum/components/spectrum-panel.tsx";
import { defaultView } from "./workspace-view.ts";

export async function loader({ request }: LoaderFunctionArgs) {
  const programId = new URL(request.url).searchParams.get("program");
  await Promise.all([requireSession(request), programId ? queryClient.ensureQueryData(programQueryOptions(programId)) : null]);
  return null;
}

const field = "mt-0.5 w-full rounded border border-ink-300 bg-white px-2 py-1.5 text-sm";

export function Component() {
  const [search] = useSearchParams();
  const programId = search.get("program") ?? "";
  const program = useProgram(programId || undefined);
  const session = useSession();
  if (!programId) return <EmptyState title="Choose a program first" description="A design belongs to a program: open one from the overview and start the design there." />;
  if (program.error) return <ErrorState error={program.error} title="The program could not be loaded" />;
  if (!program.data) return <PageSpinner label="Loading the program…" />;
  if (!hasRole(session, "designer")) return <EmptyState title="Only designers create designs" description="Ask a designer of your workspace, or an administrator for the role." />;
  return <NewDesignForm program={program.data} />;
}

function NewDesignForm({ program }: { program: NonNullable<ReturnType<typeof useProgram>["data"]> }) {
  const navigate = useNavigate();
  const create = useCreateDesign();
  const [name, setName] = useState("");
  const [source, setSource] = useState<"starter" | "file">("starter");
  const [starterId, setStarterId] = useState(STARTERS[2]?.id ?? "bare");
  const [reference, setReference] = useState(String(maskReferenceWavelength(program.specMask)));
  const [imported, setImported] = useState<{ design: Design; warnings: string[]; file: string } | null>(null);
  const [importError, setImportError] = useState<string | null>(null);
  const [note, setNote] = useState("First revision");
  const [error, setError] = useState<string | null>(null);
  const ref = Number(reference);

  const stack = useMemo<Design | null>(() => {
    if (source === "file") return imported ? { ...imported.design, name: name || imported.design.name } : null;
    const starter = STARTERS.find((s) => s.id === starterId);
    if (!starter || !(ref > 0)) return null;
    try {
      return starter.build(name || "Untitled design", ref);
    } catch {
      return null;
    }
  }, [source, imported, starterId, ref, name]);
  const [view, setView] = useState<ChartView>(() => defaultView(STARTERS[0]!.build("preview", maskReferenceWavelength(program.specMask)), program.specMask));

  const onFile = async (file: File | undefined) => {
    if (!file) return;
    setImportError(null);
    try {
      const r = await importDesign(file);
      setImported({ design: r.stack, warnings: r.warnings, file: file.name });
      if (!name) setName(r.stack.name);
    } catch (e) {
      setImported(null);
      setImportError(e instanceof Error ? e.message : String(e));
    }
  };

  const submit = (e: FormEvent) => {
    e.preventDefault();
    if (!name.trim()) return setError("Give the design a name.");
    if (!stack) return setError(source === "file" ? "Import a CSV or JSON design file first." : "The reference wavelength must be a positive number of nm.");
    setError(null);
    create.mutate(
      { programId: program.id, name: name.trim(), stack: { ...stack, name: name.trim() }, note: note.trim() || "First revision" },
      {
        onSuccess: (d) => {
          const rev = firstRevisionId(d);
          navigate(rev ? paths.revision(d.id, rev) : paths.design(d.id));
        },
      },
    );
  };

  return (
    <div className="space-y-4">
      <header>
        <p className="text-xs text-ink-500">
          <Link to={paths.program(program.id)} className="hover:underline">
            {program.name}
          </Link>{" "}
          · {program.customer}
        </p>
        <h1 className="text-xl font-semibold">New design</h1>
      </header>
      {program.protective ? <ProtectiveCaution application={program.application} compact /> : null}
      <div className="grid gap-4 lg:grid-cols-[380px_minmax(0,1fr)]">
        <form onSubmit={submit} className="space-y-3 rounded-lg border border-ink-100 bg-white p-4" aria-label="New design">
          <label className="block text-xs text-ink-700">
            Name
            <input className={field} value={name} onChange={(e) => setName(e.target.value)} required maxLength={120} />
          </label>
          <fieldset className="space-y-1 text-sm">
            <legend className="text-xs text-ink-700">Start from</legend>
            <label className="flex items-center gap-2">
              <input type="radio" name="source" checked={source === "starter"} onChange={() => setSource("starter")} /> a starter stack
            </label>
            <label className="flex items-center gap-2">
              <input type="radio" name="source" checked={source === "file"} onChange={() => setSource("file")} /> an imported file (CSV or JSON)
            </label>
          </fieldset>
          {source === "starter" ? (
            <>
              <label className="block text-xs text-ink-700">
                Starter
                <select className={field} value={starterId} onChange={(e) => setStarterId(e.target.value)}>
                  {STARTERS.map((s) => (
                    <option key={s.id} value={s.id}>
                      {s.name}
                    </option>
                  ))}
                </select>
                <span className="mt-1 block text-ink-500">{STARTERS.find((s) => s.id === starterId)?.description}</span>
              </label>
              <label className="block text-xs text-ink-700">
                Reference wavelength λ0 (nm) — from the mask’s bands
                <input className={field} value={reference} inputMode="decimal" onChange={(e) => setReference(e.target.value)} />
              </label>
            </>
          ) : (
            <label className="block text-xs text-ink-700">
              Design file (CSV: material,thickness_nm[,locked] with a header; or a JSON design)
              <input type="file" accept=".csv,.json,text/csv,application/json" className={field} onChange={(e) => void onFile(e.target.files?.[0])} />
              {imported ? (
                <span className="mt-1 block text-ink-700" role="status">
                  {imported.file}: {imported.design.layers.length} layers{imported.warnings.length ? ` — ${imported.warnings.join("; ")}` : ""}
                </span>
              ) : null}
              {importError ? (
                <span role="alert" className="mt-1 block text-verdict-fail">
                  {importError}
                </span>
              ) : null}
            </label>
          )}
          <label className="block text-xs text-ink-700">
            Note for revision 1
            <input className={field} value={note} onChange={(e) => setNote(e.target.value)} maxLength={500} />
          </label>
          {error || create.error ? (
            <p role="alert" className="text-sm text-verdict-fail">
              {error ?? create.error?.message}
            </p>
          ) : null}
          <button type="submit" disabled={create.isPending} className="rounded bg-film-teal px-4 py-2 text-sm font-semibold text-white disabled:opacity-40">
            {create.isPending ? "Creating…" : "Create design"}
          </button>
        </form>
        <div className="min-w-0">
          {stack ? (
            <SpectrumPanel design={stack} mask={program.specMask} view={view} onViewChange={setView} height={300} title={`Preview of ${stack.name} against the ${program.name} mask`} />
          ) : (
            <EmptyState title="No stack yet" description="Pick a starter or import a file to preview it against the program’s mask." />
          )}
        </div>
      </div>
    </div>
  );
}
