import type { Design } from "@stackproof/optics";
import type { RevisionDiff } from "../api/diff.ts";

function layerText(v: unknown): string {
  if (typeof v === "number") return `${v.toFixed(2)} nm`;
  if (v && typeof v === "object") {
    const l = v as { material?: string; thickness?: number; locked?: boolean };
    return [l.material, typeof l.thickness === "number" ? `${l.thickness.toFixed(2)} nm` : null, l.locked ? "locked" : null].filter(Boolean).join(" · ");
  }
  return "—";
}

/** The server's layer diff of revision b against a, with both stacks for context. */
export function LayerDiff({ diff, a, b, labelA, labelB }: { diff: RevisionDiff; a: Design; b: Design; labelA: string; labelB: string }) {
  const summary = typeof diff.summary === "string" ? diff.summary : JSON.stringify(diff.summary);
  const rows = [
    ...diff.changed.map((c) => ({ kind: "changed" as const, index: c.index, before: layerText(c.before), after: layerText(c.after), delta: c.deltaNm })),
    ...diff.added.map((c) => ({ kind: "added" as const, index: c.index, before: "—", after: layerText(c.layer ?? c), delta: null })),
    ...diff.removed.map((c) => ({ kind: "removed" as const, index: c.index, before: layerText(c.layer ?? c), after: "—", delta: null })),
  ].sort((x, y) => x.index - y.index);
  return (
    <div className="space-y-2">
      <p className="text-sm text-ink-700" data-testid="diff-summary">
        {summary} ({labelA}: {a.layers.length} layers, {labelB}: {b.layers.length} layers)
      </p>
      {rows.length === 0 ? (
        <p className="text-sm text-ink-500">The two stacks have the same layers.</p>
      ) : (
        <table className="w-full text-sm" aria-label="Layer differences">
          <thead className="text-left text-xs text-ink-500">
            <tr>
              <th className="py-1 font-medium">Layer</th>
              <th className="py-1 font-medium">Change</th>
              <th className="py-1 font-medium">{labelA}</th>
              <th className="py-1 font-medium">{labelB}</th>
              <th className="py-1 text-right font-medium">Δ (nm)</th>
            </tr>
          </thead>
          <tbody>
            {rows.map((r) => (
              <tr key={`${r.kind}-${r.index}`} className="border-t border-ink-100">
                <td className="py-1 tabular">{r.index + 1}</td>
                <td className={`py-1 ${r.kind === "added" ? "text-verdict-pass" : r.kind === "removed" ? "text-verdict-fail" : "text-film-amber"}`}>{r.kind}</td>
                <td className="py-1 font-mono text-xs">{r.before}</td>
                <td className="py-1 font-mono text-xs">{r.after}</td>
                <td className="py-1 text-right tabular">{r.delta === null ? "" : `${r.delta > 0 ? "+" : ""}${r.delta.toFixed(2)}`}</td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
    </div>
  );
}
