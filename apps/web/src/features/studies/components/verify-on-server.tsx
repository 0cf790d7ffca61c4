import { useEffect, useState } from "react";
import { useQueryClient } from "@tanstack/react-query";
import type { YieldResult, YieldStudy } from "@stackproof/optics";
import { useCreateYieldRun, useYieldRun } from "../api/yield-runs.ts";

function pct(v: number): string {
  return `${(v * 100).toFixed(1)} %`;
}

/** Sends the browser's study to the server (same trials, seed and error model) and shows its verified result. */
export function VerifyOnServer({
  revisionId,
  study,
  clientResult,
  disabledReason,
}: {
  revisionId: string;
  study: YieldStudy;
  clientResult: YieldResult;
  disabledReason: string | null;
}) {
  const create = useCreateYieldRun();
  const [runId, setRunId] = useState<string | null>(null);
  const run = useYieldRun(runId);
  const r = run.data;
  const qc = useQueryClient();
  const finishedStatus = r?.status === "done" || r?.status === "failed" ? r.status : null;
  useEffect(() => {
    // A finished server run changes what the sign-off gate and the overview show.
    if (!finishedStatus) return;
    void qc.invalidateQueries({ queryKey: ["revisions", revisionId, "gate"] });
    void qc.invalidateQueries({ queryKey: ["revisions", revisionId, "yield-runs"] });
    void qc.invalidateQueries({ queryKey: ["overview"] });
  }, [finishedStatus, qc, revisionId]);
  const verify = () =>
    create.mutate(
      { revisionId, trials: study.trials, seed: study.seed, errorModel: clientResult.errorModel, clientResult },
      { onSuccess: (created) => setRunId(created.id) },
    );
  const busy = create.isPending || (r !== undefined && (r.status === "queued" || r.status === "running"));
  return (
    <div className="rounded-md border border-ink-100 bg-paper p-3" data-testid="verify-panel">
      <div className="flex flex-wrap items-center gap-3">
        <button
          type="button"
          onClick={verify}
          disabled={Boolean(disabledReason) || busy}
          className="rounded bg-film-violet px-3 py-1.5 text-sm font-semibold text-white disabled:opacity-40"
        >
          {busy ? "Verifying on the server…" : r?.status === "done" ? "Verify again" : "Verify on server"}
        </button>
        {disabledReason ? <span className="text-xs text-ink-700">{disabledReason}</span> : null}
        {r && (r.status === "queued" || r.status === "running") ? (
          <span className="flex items-center gap-2 text-xs text-ink-700" aria-live="polite">
            <progress max={r.progress.total || 1} value={r.progress.done} className="h-2 w-40 accent-film-violet" aria-label="Server trials" />
            {r.status === "queued" ? "queued" : `${r.progress.done} / ${r.progress.total}`}
          </span>
        ) : null}
      </div>
      {create.error ? (
        <p role="alert" className="mt-2 text-xs text-verdict-fail">
          The server did not accept the run: {create.error.message}
        </p>
      ) : null}
      {run.error ? (
        <p role="alert" className="mt-2 text-xs text-verdict-fail">
          Could not read the server run: {run.error.message}
        </p>
      ) : null}
      {r && r.status === "failed" ? (
        <p role="alert" className="mt-2 text-xs text-verdict-fail">
          The server run failed{r.error ? `: ${r.error}` : "."}
        </p>
      ) : null}
      {r && r.status === "cancelled" ? <p className="mt-2 text-xs text-ink-700">The server run was cancelled.</p> : null}
      {r?.status === "done" && r.result ? (
        <div className="mt-3 grid gap-3 sm:grid-cols-3" data-testid="server-result">
          <div>
            <div className="text-xs text-ink-500">Browser</div>
            <div className="text-lg font-semibold tabular">{pct(clientResult.yield)}</div>
            <div className="text-xs tabular text-ink-700">
              {pct(clientResult.interval.low)} – {pct(clientResult.interval.high)}
            </div>
          </div>
          <div>
            <div className="text-xs text-ink-500">Server (engine {r.engineVersion})</div>
            <div className="text-lg font-semibold tabular">{pct(r.result.yield)}</div>
            <div className="text-xs tabular text-ink-700">
              {pct(r.result.interval.low)} – {pct(r.result.interval.high)} · {r.result.passCount}/{r.result.trials}
            </div>
          </div>
          <div className="self-center">
            {r.verified === true ? (
              <span className="rounded bg-verdict-pass/10 px-2 py-1 text-sm font-semibold text-verdict-pass" data-verdict="match">
                ✓ Match: the server reproduced the browser result
              </span>
            ) : r.verified === false ? (
              <span className="rounded bg-verdict-fail/10 px-2 py-1 text-sm font-semibold text-verdict-fail" data-verdict="mismatch">
                ✗ Mismatch{r.mismatch ? `: ${r.mismatch}` : ""}
              </span>
            ) : (
              <span className="text-sm text-ink-700">Server result recorded (no browser result compared)</span>
            )}
          </div>
        </div>
      ) : null}
    </div>
  );
}
