// The design workspace of one revision: live spectrum against the spec mask, review threads beside it,
// the layer editor, and tabs for tolerance studies, Nudge (local optimizer), as-built data, history and sign-off.
import { useCallback, useDeferredValue, useMemo, useReducer, useRef, useState } from "react";
import type { ReactNode } from "react";
import { Link, useNavigate, useParams } from "react-router";
import type { LoaderFunctionArgs } from "react-router";
import { useQueryClient } from "@tanstack/react-query";
import type { Design, YieldResult } from "@stackproof/optics";
import { queryClient } from "../../../lib/query-client.ts";
import { hasRole, requireSession, useSession } from "../../../lib/session.ts";
import { paths } from "../../../config/paths.ts";
import { ErrorState, PageSpinner, StatusPill } from "../../../components/ui/index.ts";
import { ProtectiveCaution } from "../../../components/protective-caution.tsx";
import { ReleaseGate } from "../../../features/approvals/components/release-gate.tsx";
import { revisionQueryOptions, useRevision } from "../../../features/workspace/api/get-revision.ts";
import { designQueryOptions, useDesign } from "../../../features/workspace/api/get-design.ts";
import { programQueryOptions, useProgram } from "../../../features/workspace/api/get-program.ts";
import { materialsQueryOptions, useMaterials } from "../../../features/workspace/api/get-materials.ts";
import { staleBaseOf, useCreateRevision } from "../../../features/workspace/api/create-revision.ts";
import type { DesignDetail, Program, Revision } from "@stackproof/contracts";
import { editorReducer, initEditor, sameDesign } from "../../../features/workspace/lib/editor-state.ts";
import { libraryOptions, withWorkspaceMaterials } from "../../../features/workspace/lib/materials.ts";
import type { MaterialOption } from "../../../features/workspace/lib/materials.ts";
import { LayerEditor } from "../../../features/workspace/components/layer-editor.tsx";
import { SaveRevisionForm } from "../../../features/workspace/components/save-revision.tsx";
import { UnsavedGuard } from "../../../features/workspace/components/unsaved-guard.tsx";
import { ImportExport } from "../../../features/workspace/components/import-export.tsx";
import { SpectrumPanel } from "../../../features/spectrum/components/spectrum-panel.tsx";
import type { ChartView } from "../../../features/spectrum/components/spectrum-panel.tsx";
import type {
  ChartCurve,
  ChartEnvelope,
  ChartMarker,
} from "../../../features/spectrum/components/spectrum-chart.tsx";
import { computeLiveSpectrum } from "../../../features/spectrum/lib/use-live-spectrum.ts";
import { spectrumCurves } from "../../../features/spectrum/lib/curves.ts";
import { useElementWidth } from "../../../features/spectrum/components/use-element-width.ts";
import { StudiesPanel } from "../../../features/studies/components/studies-panel.tsx";
import { RefinementPanel } from "../../../features/refinement/components/refinement-panel.tsx";
import { ProcessPanel } from "../../../features/process/components/process-panel.tsx";
import { ReviewPanel } from "../../../features/review/components/review-panel.tsx";
import { useThreads } from "../../../features/review/api/threads.ts";
import type { ThreadAnchor } from "../../../features/review/api/threads.ts";
import { anchorSpan, describeAnchor, openLayerThreads } from "../../../features/review/lib/anchors.ts";
import { RevisionHistory } from "../../../features/revisions/components/revision-history.tsx";
import { AsBuiltPanel } from "../../../features/as-built/components/as-built-panel.tsx";
import type { MeasuredOverlay } from "../../../features/as-built/components/as-built-panel.tsx";
import { defaultView } from "./workspace-view.ts";

export async function loader({ params, request }: LoaderFunctionArgs) {
  const { designId = "", revisionId = "" } = params;
  // Everything the page cannot render without, fetched side by side.
  await Promise.all([
    requireSession(request),
    queryClient.ensureQueryData(revisionQueryOptions(revisionId)),
    queryClient
      .ensureQueryData(designQueryOptions(designId))
      .then((d) => queryClient.ensureQueryData(programQueryOptions(d.program.id))),
    queryClient.ensureQueryData(materialsQueryOptions()).catch(() => null),
  ]);
  return null;
}

export function Component() {
  const { designId = "", revisionId = "" } = useParams();
  const revision = useRevision(revisionId);
  const design = useDesign(designId);
  const program = useProgram(design.data?.program.id);
  const materials = useMaterials();
  if (revision.error || design.error || program.error) {
    return (
      <ErrorState
        error={revision.error ?? design.error ?? program.error}
        title="This revision could not be opened"
        onRetry={() => void Promise.all([revision.refetch(), design.refetch(), program.refetch()])}
      />
    );
  }
  if (!revision.data || !design.data || !program.data) return <PageSpinner label="Opening the workspace…" />;
  return (
    <Workspace
      key={revision.data.id}
      revision={revision.data}
      design={design.data}
      program={program.data}
      materials={materials.data ?? libraryOptions()}
    />
  );
}

type TabId = "study" | "process" | "refine" | "asbuilt" | "history";

function Workspace({
  revision,
  design,
  program,
  materials,
}: {
  revision: Revision;
  design: DesignDetail;
  program: Program;
  materials: MaterialOption[];
}) {
  const session = useSession();
  const navigate = useNavigate();
  const qc = useQueryClient();
  const [state, dispatch] = useReducer(editorReducer, revision.stack, initEditor);
  const [view, setView] = useState<ChartView>(() =>
    defaultView(revision.stack, revision.specMask ?? program.specMask),
  );
  const [selected, setSelected] = useState<number | null>(null);
  const [proposed, setProposed] = useState<ThreadAnchor | null>(null);
  const [studyResult, setStudyResult] = useState<YieldResult | null>(null);
  const [preview, setPreview] = useState<Design | null>(null);
  const [measured, setMeasured] = useState<MeasuredOverlay[]>([]);
  const [tab, setTab] = useState<TabId>("study");
  const [tabsRef, tabsWidth] = useElementWidth<HTMLDivElement>(620);
  const create = useCreateRevision();
  // Set once a save succeeded, so the move to the new revision is not taken for leaving with unsaved edits.
  const leavingSaved = useRef(false);
  const threads = useThreads(revision.id);

  const mask = revision.specMask ?? program.specMask;
  const current = useMemo(() => withWorkspaceMaterials(state.present, materials), [state.present, materials]);
  // Panels other than the chart and the table follow the edits at lower priority, so a keystroke redraws the
  // curve first and the study, refinement and as-built panels catch up in a later render.
  const deferred = useDeferredValue(current);
  const dirty = !sameDesign(state.present, revision.stack);
  const range = useMemo(
    () => ({ start: view.settings.start, stop: view.settings.stop }),
    [view.settings.start, view.settings.stop],
  );
  const savedStack = useMemo(
    () => withWorkspaceMaterials(revision.stack, materials),
    [revision.stack, materials],
  );
  const threadLayers = useMemo(() => openLayerThreads(threads.data ?? []), [threads.data]);
  const canThread = hasRole(session, "reviewer", "approver", "designer");
  const bandAction = useMemo(
    () => ({ label: "Thread", onPick: (bandId: string) => setProposed({ kind: "band", bandId }) }),
    [],
  );
  const onTransition = useCallback(
    () => void qc.invalidateQueries({ queryKey: ["designs", design.id] }),
    [qc, design.id],
  );
  const focusThread = useCallback((t: { anchor: ThreadAnchor }) => {
    if (t.anchor.kind === "layer") setSelected(t.anchor.index);
  }, []);
  const status = design.revisions.find((r) => r.id === revision.id)?.status ?? revision.status;
  const isDesigner = hasRole(session, "designer");
  const changedLayers = useMemo(() => {
    const s = new Set<number>();
    state.present.layers.forEach((l, i) => {
      const before = revision.stack.layers[i];
      if (!before || before.material !== l.material || Math.abs(before.thickness - l.thickness) > 1e-9)
        s.add(i);
    });
    return s;
  }, [state.present.layers, revision.stack.layers]);

  const save = useCallback(
    (stack: Design, note: string) =>
      create.mutate(
        {
          designId: design.id,
          baseRevisionId: revision.id,
          stack: withWorkspaceMaterials(stack, materials),
          note,
        },
        {
          onSuccess: (r) => {
            leavingSaved.current = true;
            void navigate(paths.revision(design.id, r.id));
          },
        },
      ),
    [create, design.id, revision.id, materials, navigate],
  );
  const staleBase = staleBaseOf(create.error);
  const stale = staleBase
    ? {
        baseNumber: staleBase.baseRevision?.number ?? null,
        latestNumber: staleBase.latestRevision.number,
        latestHref: paths.revision(design.id, staleBase.latestRevision.id),
      }
    : null;

  const overlays: ChartCurve[] = [];
  if (preview) {
    const p = computeLiveSpectrum(withWorkspaceMaterials(preview, materials), view.settings);
    if (p.ok)
      overlays.push(
        ...spectrumCurves(p.spectrum, view.scale === "od" ? ["OD"] : view.quantities, {
          idPrefix: "refined-",
          labelPrefix: "refined ",
          dashed: true,
          color: () => "#6a4fa3",
        }),
      );
  }
  for (const m of measured) {
    overlays.push({
      id: m.id,
      label: m.label,
      quantity: m.quantity,
      wavelengths: m.wavelengths,
      values: m.values,
      color: m.kind === "measured" ? "#0b1524" : "#6a4fa3",
      dashed: m.kind === "fitted",
    });
  }
  const envelopes: ChartEnvelope[] = [];
  // The study ran on the stack as it was when started; its 5–95 % envelope is drawn over the live curve.
  // Several envelopes may share quantity, angle and polarization (a cone and an angle range both about 0°): the index keys them.
  (studyResult?.envelopes ?? []).forEach((env, i) => {
    const lo = env.percentiles.find((p) => p.p === 5) ?? env.percentiles[0];
    const hi = env.percentiles.find((p) => p.p === 95) ?? env.percentiles[env.percentiles.length - 1];
    if (!lo || !hi) return;
    envelopes.push({
      id: `env-${i}-${env.quantity}-${env.angleDeg}-${env.polarization}`,
      label: `${env.quantity} 5–95 % (${env.conditions})`,
      quantity: env.quantity,
      wavelengths: env.wavelengths,
      lower: lo.values,
      upper: hi.values,
      color: "#7cc6c0",
    });
  });
  const markers: ChartMarker[] = [];
  for (const t of threads.data ?? []) {
    const span = anchorSpan(t.anchor, mask.bands);
    if (span && t.status === "open")
      markers.push({
        id: t.id,
        label: `${t.severity} thread: ${describeAnchor(t.anchor, mask.bands)} — ${t.comments[0]?.body ?? ""}`,
        tone: "open",
        ...span,
      });
  }
  if (proposed?.kind === "range")
    markers.push({
      id: "proposed",
      label: "New thread range",
      start: proposed.start,
      stop: proposed.stop,
      tone: "resolved",
    });

  const tabs: { id: TabId; label: string; content: ReactNode }[] = [
    {
      id: "study",
      label: "Tolerance study",
      content: (
        <StudiesPanel
          revisionId={revision.id}
          design={deferred}
          mask={mask}
          errorModel={program.errorModel}
          defaults={program.studyDefaults}
          targetYield={program.targetYield}
          dirty={dirty}
          canVerify={hasRole(session, "designer", "reviewer", "approver")}
          range={range}
          onResult={setStudyResult}
        />
      ),
    },
    {
      id: "process",
      label: "Process",
      content: (
        <ProcessPanel
          design={deferred}
          mask={mask}
          errorModel={program.errorModel}
          defaults={program.studyDefaults}
          targetYield={program.targetYield}
        />
      ),
    },
    {
      id: "refine",
      label: "Nudge",
      content: (
        <RefinementPanel
          design={deferred}
          mask={mask}
          errorModel={program.errorModel}
          defaults={program.studyDefaults}
          onPreview={setPreview}
          onKeep={save}
          canKeep={isDesigner}
          keeping={create.isPending}
          keepError={create.error?.message ?? null}
        />
      ),
    },
    {
      id: "asbuilt",
      label: "As built",
      content: (
        <AsBuiltPanel
          revisionId={revision.id}
          design={savedStack}
          canUpload={isDesigner}
          width={tabsWidth}
          onOverlay={setMeasured}
          errorModel={program.errorModel}
          programId={program.id}
          mask={mask}
        />
      ),
    },
    {
      id: "history",
      label: `Revisions (${design.revisions.length})`,
      content: <RevisionHistory designId={design.id} revisions={design.revisions} currentId={revision.id} />,
    },
  ];

  return (
    <div className="space-y-4" data-testid="workspace">
      <UnsavedGuard dirty={dirty} allow={leavingSaved} />
      <header className="flex flex-wrap items-start gap-x-6 gap-y-2">
        <div className="min-w-0">
          <p className="text-xs text-ink-500">
            <Link to={paths.program(program.id)} className="hover:underline">
              {program.name}
            </Link>{" "}
            · {program.customer} · target yield {(program.targetYield * 100).toFixed(0)} %
          </p>
          <h1 className="flex flex-wrap items-center gap-2 text-xl font-semibold">
            {design.name} <span className="font-mono text-base text-ink-500">r{revision.number}</span>{" "}
            <StatusPill status={status} />
            {dirty ? (
              <span
                className="rounded bg-film-amber/15 px-2 py-0.5 text-xs font-medium text-[#8a5210]"
                data-testid="unsaved"
              >
                unsaved edits
              </span>
            ) : null}
            {dirty && !isDesigner ? (
              <span className="text-xs font-normal text-ink-700">
                what-if only: saving a revision takes the designer role
              </span>
            ) : null}
          </h1>
          <p className="text-xs text-ink-700">
            {revision.author?.name ?? "unknown author"} · {new Date(revision.createdAt).toLocaleString()} · “
            {revision.note}” ·{" "}
            <span className="font-mono" title="Revision hash">
              {revision.hash.slice(0, 12)}
            </span>
          </p>
        </div>
        <div className="ml-auto flex min-w-72 flex-col items-end gap-2">
          <ImportExport
            design={current}
            revisionNumber={revision.number}
            canImport={isDesigner}
            onImported={(d) => dispatch({ type: "replace", design: d })}
          />
          <SaveRevisionForm
            canSave={isDesigner}
            dirty={dirty}
            pending={create.isPending}
            error={create.error?.message ?? null}
            stale={stale}
            onSave={(note) => save(state.present, note)}
          />
        </div>
      </header>
      {program.protective ? <ProtectiveCaution application={program.application} /> : null}
      <div className="grid gap-4 xl:grid-cols-[minmax(0,1fr)_380px]">
        <div className="min-w-0 space-y-4">
          {/* The chart stays in view (sticky) while the layer grid below it scrolls: both visible at 1280×800 and up. */}
          <div className="lg:sticky lg:top-0 lg:z-10 lg:bg-paper lg:pb-1" data-testid="sticky-spectrum">
            <SpectrumPanel
              design={current}
              mask={mask}
              view={view}
              onViewChange={setView}
              overlays={overlays}
              envelopes={envelopes}
              markers={markers}
              height={240}
              onSelectRange={(start, stop) => setProposed({ kind: "range", start, stop })}
              bandAction={canThread ? bandAction : undefined}
            />
          </div>
          {proposed?.kind === "range" ? (
            <p className="text-xs text-ink-700" role="status">
              Range {proposed.start}–{proposed.stop} nm selected for a new review thread (see the thread
              form).{" "}
              <button type="button" className="underline" onClick={() => setProposed(null)}>
                Clear
              </button>
            </p>
          ) : null}
          <div className="grid gap-4 2xl:grid-cols-2">
            <section
              aria-labelledby="layers-h"
              className="min-w-0 rounded-lg border border-ink-100 bg-white p-3"
            >
              <div className="mb-2 flex items-center gap-2">
                <h2 id="layers-h" className="text-base font-semibold">
                  Layers
                </h2>
                <span className="text-xs text-ink-500">
                  layer 1 sits on the substrate; light arrives from the last layer’s side
                </span>
                {selected !== null && hasRole(session, "reviewer", "approver", "designer") ? (
                  <button
                    type="button"
                    className="ml-auto rounded border border-film-violet/40 px-2 py-0.5 text-xs text-film-violet"
                    onClick={() => setProposed({ kind: "layer", index: selected })}
                  >
                    Thread on layer {selected + 1}
                  </button>
                ) : null}
              </div>
              <LayerEditor
                state={state}
                dispatch={dispatch}
                materials={materials}
                selected={selected}
                onSelect={setSelected}
                threadLayers={threadLayers}
                changedLayers={changedLayers}
              />
            </section>
            <section
              ref={tabsRef}
              className="min-w-0 rounded-lg border border-ink-100 bg-white p-3"
              style={{ contentVisibility: "auto", containIntrinsicSize: "auto 900px" }}
            >
              <div
                role="tablist"
                aria-label="Workspace tools"
                className="mb-3 flex flex-wrap gap-1 border-b border-ink-100"
              >
                {tabs.map((t) => (
                  <button
                    key={t.id}
                    type="button"
                    role="tab"
                    id={`ws-tab-${t.id}`}
                    aria-selected={tab === t.id}
                    aria-controls={`ws-panel-${t.id}`}
                    tabIndex={tab === t.id ? 0 : -1}
                    onClick={() => setTab(t.id)}
                    onKeyDown={(e) => {
                      const i = tabs.findIndex((x) => x.id === tab);
                      const next =
                        e.key === "ArrowRight"
                          ? tabs[(i + 1) % tabs.length]
                          : e.key === "ArrowLeft"
                            ? tabs[(i - 1 + tabs.length) % tabs.length]
                            : undefined;
                      if (next) {
                        e.preventDefault();
                        setTab(next.id);
                        document.getElementById(`ws-tab-${next.id}`)?.focus();
                      }
                    }}
                    className={`-mb-px border-b-2 px-3 py-1.5 text-sm font-medium ${tab === t.id ? "border-film-amber text-ink-900" : "border-transparent text-ink-500 hover:text-ink-900"}`}
                  >
                    {t.label}
                  </button>
                ))}
              </div>
              {/* Panels stay mounted so a running study keeps going while another tab is open. */}
              {tabs.map((t) => (
                <div
                  key={t.id}
                  role="tabpanel"
                  id={`ws-panel-${t.id}`}
                  aria-labelledby={`ws-tab-${t.id}`}
                  hidden={tab !== t.id}
                >
                  {t.content}
                </div>
              ))}
            </section>
          </div>
        </div>
        <aside className="space-y-4" aria-label="Sign-off and review">
          <ReleaseGate
            revisionId={revision.id}
            designId={design.id}
            status={status}
            authorId={revision.author?.id ?? ""}
            onTransition={onTransition}
          />
          <ReviewPanel
            revisionId={revision.id}
            revisionNumber={revision.number}
            bands={mask.bands}
            layerCount={revision.stack.layers.length}
            proposed={proposed}
            onProposedChange={setProposed}
            canStart={hasRole(session, "reviewer", "approver", "designer")}
            canModerate={hasRole(session, "reviewer", "approver")}
            currentUserId={session?.user.id ?? null}
            onFocusThread={focusThread}
          />
        </aside>
      </div>
    </div>
  );
}
