import { useState } from "react";
import { Button, Notice, TextArea, cx, errorMessage } from "../../../components/ui/index.ts";
import { hasRole, useSession } from "../../../lib/session.ts";
import type { Gate } from "../api/get-gate.ts";
import { useDecideDeviation, useRequestDeviation, useStartEvidenceRun } from "../api/evidence.ts";

const pct = (x: number, digits = 1) => `${(x * 100).toFixed(digits)} %`;

/**
 * The evidence the gate reads: the rules of the program version, the server-assigned evidence run and, when it is
 * done, its point yield and the lower Wilson bound compared with the target. Designers, reviewers and approvers can
 * start the evidence run here (asking again returns the same run).
 */
export function EvidencePanel({ revisionId, gate }: { revisionId: string; gate: Gate }) {
  const session = useSession();
  const start = useStartEvidenceRun(revisionId);
  const e = gate.evidence;
  if (!e) return null;
  const f = e.figures;
  const canStart = session !== null && hasRole(session, "designer", "reviewer", "approver");
  const busy = e.run?.status === "queued" || e.run?.status === "running";
  return (
    <div className="rounded-lg border border-ink-100 bg-paper/60 p-3" data-testid="gate-evidence">
      <div className="flex flex-wrap items-baseline gap-x-4 gap-y-1">
        <h3 className="text-sm font-semibold">Evidence</h3>
        <span className="text-xs text-ink-700">
          Program version {e.programVersion}: at least {e.minTrials.toLocaleString("en")} trials, lower{" "}
          {pct(e.confidence)} Wilson bound ≥ target {pct(e.targetYield)}
        </span>
      </div>
      {f ? (
        <dl className="mt-2 grid grid-cols-2 gap-x-4 gap-y-1 text-sm sm:grid-cols-4">
          <div>
            <dt className="text-xs text-ink-500">Point yield</dt>
            <dd className="tabular font-semibold" data-testid="evidence-yield">
              {pct(f.yield)}
            </dd>
          </div>
          <div>
            <dt className="text-xs text-ink-500">Lower bound ({pct(f.confidence, 0)})</dt>
            <dd
              className={cx("tabular font-semibold", f.pass ? "text-verdict-pass" : "text-verdict-fail")}
              data-testid="evidence-bound"
            >
              {pct(f.lowerBound, 2)}
            </dd>
          </div>
          <div>
            <dt className="text-xs text-ink-500">Trials</dt>
            <dd className="tabular" data-testid="evidence-trials">
              {f.passCount.toLocaleString("en")} / {f.trials.toLocaleString("en")}
            </dd>
          </div>
          <div>
            <dt className="text-xs text-ink-500">Target</dt>
            <dd className="tabular">{pct(f.targetYield)}</dd>
          </div>
        </dl>
      ) : (
        <p className="mt-2 text-sm text-ink-700">
          {e.run
            ? `The evidence run is ${e.run.status} (${e.run.trials.toLocaleString("en")} trials).`
            : "No evidence run yet."}
        </p>
      )}
      <p className="mt-2 text-xs text-ink-700" data-testid="evidence-error-model">
        <span className="text-ink-500">Error model:</span> {e.errorModelText}
      </p>
      <p className="mt-1 break-all text-xs text-ink-500">
        Seed <span className="font-mono">{e.seed}</span>, assigned by the server from the revision's content
        and the program's error model. Runs with any other seed, trial count or error model are what-if
        studies and do not count.
      </p>
      {!e.run && canStart ? (
        <div className="mt-2">
          <Button size="sm" onClick={() => start.mutate()} loading={start.isPending || busy}>
            Start the evidence run
          </Button>
        </div>
      ) : null}
      {start.isError ? (
        <Notice tone="error" className="mt-2" onDismiss={() => start.reset()}>
          {errorMessage(start.error)}
        </Notice>
      ) : null}
    </div>
  );
}

/** Whether the revision's mask deviates from the program's, its deviation, and asking for or deciding it. */
export function DeviationPanel({
  revisionId,
  authorId,
  gate,
}: {
  revisionId: string;
  authorId: string;
  gate: Gate;
}) {
  const session = useSession();
  const ask = useRequestDeviation(revisionId);
  const decide = useDecideDeviation(revisionId);
  const [reason, setReason] = useState("");
  const [reasonError, setReasonError] = useState<string | undefined>();
  const [note, setNote] = useState("");
  const d = gate.deviation;
  if (!d?.required) return null;
  const cur = d.current;
  const me = session?.user.id;
  const canAsk =
    session !== null &&
    hasRole(session, "designer", "approver") &&
    (cur === null || cur.status === "rejected");
  const canDecide =
    session !== null &&
    cur?.status === "pending" &&
    hasRole(session, "approver") &&
    cur.requestedBy?.id !== me &&
    authorId !== me;
  const err = ask.error ?? decide.error;
  return (
    <div
      className={cx(
        "rounded-lg border p-3",
        d.accepted ? "border-ink-100 bg-paper/60" : "border-verdict-fail/40 bg-verdict-fail/5",
      )}
      data-testid="gate-deviation"
    >
      <h3 className="text-sm font-semibold">Spec deviation</h3>
      <p className="mt-1 text-sm text-ink-700">
        This revision's mask differs from the program's:{" "}
        {d.bands.map((b) => `${b.id} ${b.change}`).join(", ")}.
      </p>
      {cur ? (
        <dl className="mt-2 grid gap-1 text-sm">
          <div>
            <dt className="inline text-ink-500">Status: </dt>
            <dd className="inline font-semibold" data-testid="deviation-status">
              {cur.status}
            </dd>
          </div>
          <div>
            <dt className="inline text-ink-500">Reason: </dt>
            <dd className="inline">{cur.reason}</dd>
          </div>
          <div>
            <dt className="inline text-ink-500">Asked for by: </dt>
            <dd className="inline">
              {cur.requestedBy?.name ?? "—"}, {new Date(cur.requestedAt).toLocaleString("en-GB")}
            </dd>
          </div>
          {cur.decidedBy ? (
            <div>
              <dt className="inline text-ink-500">
                {cur.status === "accepted" ? "Accepted" : "Rejected"} by:{" "}
              </dt>
              <dd className="inline">
                {cur.decidedBy.name}
                {cur.decidedAt ? `, ${new Date(cur.decidedAt).toLocaleString("en-GB")}` : ""}
                {cur.decisionNote ? ` — ${cur.decisionNote}` : ""}
              </dd>
            </div>
          ) : null}
        </dl>
      ) : (
        <p className="mt-1 text-sm text-verdict-fail">
          No deviation has been asked for. It needs a written reason and acceptance by someone other than its
          author.
        </p>
      )}
      {canAsk ? (
        <form
          className="mt-2 flex flex-col gap-2"
          onSubmit={(ev) => {
            ev.preventDefault();
            if (reason.trim().length < 10) {
              setReasonError("Write the reason (10 characters or more).");
              return;
            }
            ask.mutate(reason.trim(), { onSuccess: () => setReason("") });
          }}
        >
          <TextArea
            label="Reason for the deviation"
            value={reason}
            onChange={(ev) => {
              setReason(ev.target.value);
              setReasonError(undefined);
            }}
            error={reasonError}
            rows={2}
            maxLength={5000}
          />
          <div>
            <Button size="sm" type="submit" loading={ask.isPending}>
              Ask for the deviation
            </Button>
          </div>
        </form>
      ) : null}
      {canDecide && cur ? (
        <div className="mt-2 flex flex-col gap-2">
          <TextArea
            label="Decision note (optional)"
            value={note}
            onChange={(ev) => setNote(ev.target.value)}
            rows={2}
          />
          <div className="flex gap-2">
            <Button
              size="sm"
              onClick={() => decide.mutate({ deviationId: cur.id, accept: true, note })}
              loading={decide.isPending}
            >
              Accept the deviation
            </Button>
            <Button
              size="sm"
              variant="secondary"
              onClick={() => decide.mutate({ deviationId: cur.id, accept: false, note })}
              disabled={decide.isPending}
            >
              Reject
            </Button>
          </div>
        </div>
      ) : null}
      {err ? (
        <Notice tone="error" className="mt-2">
          {errorMessage(err)}
        </Notice>
      ) : null}
    </div>
  );
}
