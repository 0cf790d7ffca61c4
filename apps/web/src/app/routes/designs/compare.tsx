// /designs/:designId/compare?a=&b= — layer diff and overlaid spectra of two revisions.
import { useMemo, useState } from "react";
import { Link, useParams, useSearchParams } from "react-router";
import type { LoaderFunctionArgs } from "react-router";
import { queryClient } from "../../../lib/query-client.ts";
import { requireSession } from "../../../lib/session.ts";
import { paths } from "../../../config/paths.ts";
import { ErrorState, PageSpinner, StatusPill } from "../../../components/ui/index.ts";
import { revisionQueryOptions, useRevision } from "../../../features/workspace/api/get-revision.ts";
import { designQueryOptions, useDesign } from "../../../features/workspace/api/get-design.ts";
import { materialsQueryOptions, useMaterials } from "../../../features/workspace/api/get-materials.ts";
import { libraryOptions, withWorkspaceMaterials } from "../../../features/workspace/lib/materials.ts";
import { diffQueryOptions, useRevisionDiff } from "../../../features/revisions/api/diff.ts";
import { LayerDiff } from "../../../features/revisions/components/layer-diff.tsx";
import { SpectrumPanel } from "../../../features/spectrum/components/spectrum-panel.tsx";
import type { ChartView } from "../../../features/spectrum/components/spectrum-panel.tsx";
import { computeLiveSpectrum } from "../../../features/spectrum/lib/use-live-spectrum.ts";
import { spectrumCurves } from "../../../features/spectrum/lib/curves.ts";
import { defaultView } from "./workspace-view.ts";

export async function loader({ params, request }: LoaderFunctionArgs) {
  const url = new URL(request.url);
  const a = url.searchParams.get("a") ?? "";
  const b = url.searchParams.get("b") ?? "";
  await Promise.all([
    requireSession(request),
    queryClient.ensureQueryData(designQueryOptions(params.designId ?? "")),
    a ? queryClient.ensureQueryData(revisionQueryOptions(a)) : null,
    b ? queryClient.ensureQueryData(revisionQueryOptions(b)) : null,
    a && b ? queryClient.prefetchQuery(diffQueryOptions(b, a)) : null,
    queryClient.ensureQueryData(materialsQueryOptions()).catch(() => null),
  ]);
  return null;
}

export function Component() {
  const { designId = "" } = useParams();
  const [search] = useSearchParams();
  const aId = search.get("a") ?? "";
  const bId = search.get("b") ?? "";
  const design = useDesign(designId);
  const a = useRevision(aId);
  const b = useRevision(bId);
  const diff = useRevisionDiff(bId, aId);
  const materials = useMaterials();
  if (!aId || !bId) return <ErrorState error={new Error("Pick two revisions to compare (?a=…&b=…).")} title="Nothing to compare" />;
  const error = design.error ?? a.error ?? b.error;
  if (error) return <ErrorState error={error} title="The comparison could not be loaded" />;
  if (!design.data || !a.data || !b.data) return <PageSpinner label="Loading both revisions…" />;
  return <Comparison designId={designId} designName={design.data.name} a={a.data} b={b.data} diff={diff} materials={materials.data ?? libraryOptions()} />;
}

function Comparison({
  designId,
  designName,
  a,
  b,
  diff,
  materials,
}: {
  designId: string;
  designName: string;
  a: NonNullable<ReturnType<typeof useRevision>["data"]>;
  b: NonNullable<ReturnType<typeof useRevision>["data"]>;
  diff: ReturnType<typeof useRevisionDiff>;
  materials: ReturnType<typeof libraryOptions>;
}) {
  const [view, setView] = useState<ChartView>(() => defaultView(b.stack, b.specMask));
  const stackA = useMemo(() => withWorkspaceMaterials(a.stack, materials), [a.stack, materials]);
  const stackB = useMemo(() => withWorkspaceMaterials(b.stack, materials), [b.stack, materials]);
  const sa = computeLiveSpectrum(stackA, view.settings);
  const overlays = sa.ok ? spectrumCurves(sa.spectrum, view.scale === "od" ? ["OD"] : view.quantities, { idPrefix: "a-", labelPrefix: `r${a.number} `, dashed: true, color: () => "#5a708f" }) : [];
  return (
    <div className="space-y-4">
      <header>
        <p className="text-xs text-ink-500">
          <Link to={paths.design(designId)} className="hover:underline">
            {designName}
          </Link>
        </p>
        <h1 className="flex flex-wrap items-center gap-2 text-xl font-semibold">
          Compare
          <Link to={paths.revision(designId, a.id)} className="font-mono underline-offset-2 hover:underline">
            r{a.number}
          </Link>
          <StatusPill status={a.status} /> with
          <Link to={paths.revision(designId, b.id)} className="font-mono underline-offset-2 hover:underline">
            r{b.number}
          </Link>
          <StatusPill status={b.status} />
        </h1>
        <p className="text-xs text-ink-700">
          r{a.number}: “{a.note}” · r{b.number}: “{b.note}”
        </p>
      </header>
      <SpectrumPanel design={stackB} mask={b.specMask} view={view} onViewChange={setView} overlays={overlays} title={`Spectra of r${b.number} (solid) and r${a.number} (dashed)`} primaryLabel={`r${b.number} (solid)`} />
      <section aria-labelledby="diff-h" className="rounded-lg border border-ink-100 bg-white p-3">
        <h2 id="diff-h" className="mb-2 text-base font-semibold">
          Layer changes from r{a.number} to r{b.number}
        </h2>
        {diff.isPending ? <p className="text-sm text-ink-500">Loading the diff…</p> : null}
        {diff.error ? <ErrorState error={diff.error} title="The server could not diff these revisions" /> : null}
        {diff.data ? <LayerDiff diff={diff.data} a={a.stack} b={b.stack} labelA={`r${a.number}`} labelB={`r${b.number}`} /> : null}
      </section>
    </div>
  );
}
