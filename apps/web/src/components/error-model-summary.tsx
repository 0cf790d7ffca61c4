import { describeProcess, type ErrorModel } from "@stackproof/optics";

function perMaterial(v: number | Record<string, number> | undefined): string {
  if (v === undefined) return "none";
  if (typeof v === "number") return `${v} % (every material)`;
  const entries = Object.entries(v);
  return entries.length === 0 ? "none" : entries.map(([m, x]) => `${m} ${x} %`).join(", ");
}

/** The error model in the optics package's plain words; a stored model it cannot read is said to be so. */
function inWords(model: ErrorModel): string {
  try {
    return describeProcess(model);
  } catch {
    return "not readable (see the figures below)";
  }
}

/**
 * The error model: one line in plain words (the process model when there is one, else the independent errors), then
 * its figures (all spreads 1σ). With a process model the per-layer and systematic thickness figures are not used.
 */
export function ErrorModelSummary({ model }: { model: ErrorModel | null | undefined }) {
  if (!model) return <p className="text-sm text-ink-500">No error model set.</p>;
  const t = model.thickness ?? {};
  const process = model.process !== undefined;
  const unused = process ? "; not used: the process sets every thickness" : "";
  const rows: Array<[string, string]> = [
    [
      "Thickness, per layer",
      `${t.relativePct ?? 0} % + ${t.absoluteNm ?? 0} nm, ${t.distribution ?? "normal"}${t.truncateSigma ? `, cut at ±${t.truncateSigma}σ` : ""}${unused}`,
    ],
    ["Thickness, systematic", `${perMaterial(model.systematicPct)}${unused}`],
    ["Index drift", perMaterial(model.indexDriftPct)],
    ["Index noise, per layer", `${model.indexNoisePct ?? 0} %`],
  ];
  return (
    <div>
      <p className="mb-2 text-sm text-ink-900" data-testid="error-model-words">
        {inWords(model)}
      </p>
      <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1.5 text-sm">
        {rows.map(([k, v]) => (
          <div key={k} className="contents">
            <dt className="text-ink-500">{k}</dt>
            <dd className="font-mono text-ink-900">{v}</dd>
          </div>
        ))}
        <p className="col-span-2 mt-1 text-xs text-ink-500">All spreads are one standard deviation.</p>
      </dl>
    </div>
  );
}
