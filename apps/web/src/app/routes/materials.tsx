import { useMemo, useState } from "react";
import {
  Badge,
  Card,
  EmptyState,
  ErrorState,
  PageSpinner,
  TextField,
  cx,
} from "../../components/ui/index.ts";
import {
  materialsQueryOptions,
  useMaterials,
  type MaterialItem,
} from "../../features/materials/api/get-materials.ts";
import { DispersionChart } from "../../features/materials/components/dispersion-chart.tsx";
import { UploadMaterialForm } from "../../features/materials/components/upload-material-form.tsx";
import {
  modelSummary,
  naturalRange,
  rangeLabel,
  sampleDispersion,
} from "../../features/materials/lib/dispersion.ts";
import { queryClient } from "../../lib/query-client.ts";
import { hasRole, useSession } from "../../lib/session.ts";

export function loader() {
  void queryClient.prefetchQuery(materialsQueryOptions());
  return null;
}

function MaterialDetail({ material }: { material: MaterialItem }) {
  const [from, to] = naturalRange(material.model);
  const [start, setStart] = useState(from);
  const [stop, setStop] = useState(to);
  const valid = Number.isFinite(start) && Number.isFinite(stop) && start > 0 && stop > start;
  const curve = useMemo(
    () => (valid ? sampleDispersion(material.model, start, stop) : null),
    [material.model, start, stop, valid],
  );
  const at550 = useMemo(() => sampleDispersion(material.model, 550, 550, 2).points[0], [material.model]);

  return (
    <div className="flex flex-col gap-4">
      <div className="flex flex-wrap items-end gap-3">
        <TextField
          label="From (nm)"
          type="number"
          min={1}
          value={Number.isFinite(start) ? start : ""}
          onChange={(e) => setStart(e.target.valueAsNumber)}
          wrapperClassName="w-32"
          className="font-mono"
        />
        <TextField
          label="To (nm)"
          type="number"
          min={1}
          value={Number.isFinite(stop) ? stop : ""}
          onChange={(e) => setStop(e.target.valueAsNumber)}
          wrapperClassName="w-32"
          className="font-mono"
          error={valid ? undefined : "Give 0 < from < to."}
        />
        {at550 && (
          <p className="pb-2 font-mono text-sm text-ink-700 tabular">
            at 550 nm: n = {at550.n.toFixed(4)}, k = {at550.k === 0 ? "0" : at550.k.toExponential(2)}
          </p>
        )}
      </div>
      {curve && curve.points.length >= 2 && (
        <DispersionChart
          points={curve.points}
          title={`n and k of ${material.name} from ${start} to ${stop} nm`}
        />
      )}
      {valid && (start < from || stop > to) && (
        <p className="text-sm text-verdict-warn" role="status">
          The model is valid over {rangeLabel(material.model)}; outside it the values are extrapolated and
          results carry a warning.
        </p>
      )}
      {curve && curve.refused > 0 && (
        <p className="text-sm text-verdict-warn" role="status">
          {curve.refused} of the sampled wavelengths are outside what this model covers: {curve.firstError}
        </p>
      )}
      <dl className="grid grid-cols-[8rem_1fr] gap-x-4 gap-y-1 text-sm">
        <dt className="text-ink-500">Model</dt>
        <dd>{modelSummary(material.model)}</dd>
        <dt className="text-ink-500">Valid range</dt>
        <dd className="font-mono">{rangeLabel(material.model)}</dd>
        <dt className="text-ink-500">Source</dt>
        <dd>{material.source || "—"}</dd>
      </dl>
    </div>
  );
}

export function Component() {
  const session = useSession();
  const materials = useMaterials();
  const [selectedId, setSelectedId] = useState<string | null>(null);
  const [filter, setFilter] = useState("");
  const canUpload = hasRole(session, "designer", "admin");

  if (materials.isPending) return <PageSpinner label="Loading the materials library…" />;
  if (materials.isError)
    return <ErrorState error={materials.error} onRetry={() => void materials.refetch()} />;

  const q = filter.trim().toLowerCase();
  const items = materials.data.items.filter(
    (m) => !q || m.id.toLowerCase().includes(q) || m.name.toLowerCase().includes(q),
  );
  const selected = materials.data.items.find((m) => m.id === selectedId) ?? items[0] ?? null;

  return (
    <div className="flex flex-col gap-6">
      <title>Materials · Stackproof</title>
      <header>
        <h1 className="text-2xl font-semibold tracking-tight">Materials</h1>
        <p className="mt-1 text-sm text-ink-700">
          The built-in library and your workspace's own n,k tables. Pick a material to see its dispersion.
        </p>
      </header>
      <div className="grid gap-6 lg:grid-cols-[minmax(0,5fr)_minmax(0,7fr)]">
        <Card title="Library" description={`${materials.data.items.length} materials`} flush>
          <div className="border-b border-ink-100 px-4 py-3">
            <TextField
              label="Find a material"
              type="search"
              placeholder="Formula or name"
              value={filter}
              onChange={(e) => setFilter(e.target.value)}
            />
          </div>
          {items.length === 0 ? (
            <div className="p-4">
              <EmptyState title="No material matches" />
            </div>
          ) : (
            <div className="max-h-[32rem] overflow-y-auto">
              <table className="w-full border-collapse text-left text-sm">
                <caption className="sr-only">Materials; choose one to plot it</caption>
                <thead className="sticky top-0 bg-white">
                  <tr className="border-b border-ink-100 text-xs tracking-wide text-ink-500 uppercase">
                    <th scope="col" className="px-4 py-2 font-semibold">
                      Id
                    </th>
                    <th scope="col" className="px-2 py-2 font-semibold">
                      Name
                    </th>
                    <th scope="col" className="px-2 py-2 font-semibold">
                      Use
                    </th>
                    <th scope="col" className="px-2 py-2 font-semibold">
                      Valid range
                    </th>
                    <th scope="col" className="px-4 py-2 font-semibold">
                      Origin
                    </th>
                  </tr>
                </thead>
                <tbody>
                  {items.map((m) => {
                    const active = selected?.id === m.id;
                    return (
                      <tr
                        key={m.id}
                        className={cx(
                          "border-b border-ink-100 last:border-0",
                          active ? "bg-film-teal/8" : "hover:bg-paper/70",
                        )}
                      >
                        <td className="px-4 py-2">
                          <button
                            type="button"
                            aria-pressed={active}
                            onClick={() => setSelectedId(m.id)}
                            className={cx(
                              "font-mono font-medium hover:underline",
                              active ? "text-film-teal" : "text-ink-900",
                            )}
                          >
                            {m.id}
                          </button>
                        </td>
                        <td className="px-2 py-2 text-ink-700">{m.name}</td>
                        <td className="px-2 py-2 text-ink-500">{m.role}</td>
                        <td className="px-2 py-2 font-mono text-xs whitespace-nowrap text-ink-500">
                          {rangeLabel(m.model)}
                        </td>
                        <td className="px-4 py-2">
                          {m.builtIn ? <Badge>built-in</Badge> : <Badge tone="teal">workspace</Badge>}
                        </td>
                      </tr>
                    );
                  })}
                </tbody>
              </table>
            </div>
          )}
        </Card>
        <Card
          title={selected ? `${selected.name}` : "Dispersion"}
          description={selected ? <span className="font-mono">{selected.id}</span> : undefined}
        >
          {selected ? (
            <MaterialDetail key={selected.id} material={selected} />
          ) : (
            <EmptyState title="Choose a material" />
          )}
        </Card>
      </div>
      {canUpload ? (
        <Card
          title="Add an n,k table"
          description="Workspace materials can be used in every design of the workspace."
        >
          <UploadMaterialForm onUploaded={(m) => setSelectedId(m.id)} />
        </Card>
      ) : (
        <p className="text-sm text-ink-500">
          Designers and administrators can add n,k tables to the library.
        </p>
      )}
    </div>
  );
}
