import { useId, useState } from "react";
import {
  Button,
  Dialog,
  ErrorState,
  Notice,
  Spinner,
  StatusPill,
  TextArea,
  cx,
  errorMessage,
} from "../../../components/ui/index.ts";
import { ApiError } from "../../../lib/api-client.ts";
import { useSession } from "../../../lib/session.ts";
import type { RevisionStatus } from "@stackproof/contracts";
import { useGate, type GateCheck } from "../api/get-gate.ts";
import { useTransitionRevision } from "../api/transition-revision.ts";
import { availableActions, type ActionSpec } from "./gate-rules.ts";
import { Link } from "react-router";
import { paths } from "../../../config/paths.ts";
import { useRevisionRelease } from "../api/get-revision-release.ts";

export interface ReleaseGateProps {
  /** The revision the gate is for (GET /revisions/:id/gate, POST /revisions/:id/transitions). */
  revisionId: string;
  /** Its design; used to refresh the design's revision list after a transition. */
  designId: string;
  /** The revision's current state, as the page already knows it. */
  status: RevisionStatus;
  /** User id of the revision's author (an author cannot sign off their own revision). */
  authorId: string;
  /** Called after the server accepted a transition, with the action taken. */
  onTransition?: (action: ActionSpec["action"]) => void;
  className?: string;
}

const checkTitle: Record<string, string> = {
  verified_yield: "Verified yield meets the target",
  blocking_threads: "No blocking thread is open",
  independent_approver: "Signed off by someone other than the author",
  state: "The revision is in a state that allows it",
};

function CheckRow({ check }: { check: GateCheck }) {
  return (
    <li className="flex gap-3 py-2" data-check={check.id} data-ok={check.ok}>
      <span
        aria-hidden
        className={cx(
          "mt-0.5 flex h-5 w-5 shrink-0 items-center justify-center rounded-full text-xs font-bold",
          check.ok ? "bg-verdict-pass text-white" : "border-2 border-verdict-fail text-verdict-fail",
        )}
      >
        {check.ok ? "✓" : "✕"}
      </span>
      <div className="min-w-0">
        <p className="text-sm font-medium text-ink-900">
          {checkTitle[check.id] ?? check.id}
          <span className="sr-only">{check.ok ? ": met" : ": not met"}</span>
        </p>
        <p className={cx("text-sm", check.ok ? "text-ink-500" : "text-verdict-fail")}>{check.message}</p>
      </div>
    </li>
  );
}

/**
 * The sign-off checklist of a revision and the workflow buttons the signed-in person may use.
 * Buttons are shown by role; one whose condition fails stays visible but disabled, with the reason under it.
 * When the server refuses (422 gate, 409 state conflict) its message is shown above the buttons.
 *
 * `<ReleaseGate revisionId={rev.id} designId={rev.designId} status={rev.status} authorId={rev.author.id} />`
 */
export function ReleaseGate({
  revisionId,
  designId,
  status,
  authorId,
  onTransition,
  className,
}: ReleaseGateProps) {
  const session = useSession();
  const gate = useGate(revisionId);
  const transition = useTransitionRevision(revisionId, designId);
  const [pending, setPending] = useState<ActionSpec | null>(null);
  const [note, setNote] = useState("");
  const [noteError, setNoteError] = useState<string | undefined>();
  const [done, setDone] = useState<string | null>(null);
  const [releaseId, setReleaseId] = useState<string | null>(null);
  const baseId = useId();

  const actions = availableActions(session, status, authorId, gate.data);
  const closed = status === "released" || status === "withdrawn";
  // The server's "state" check asks whether the revision can be signed off now; past sign-off it only confuses.
  const pastSignOff = closed || status === "approved";
  const found = useRevisionRelease(revisionId, closed).data;
  const release = releaseId ? { id: releaseId } : found;

  function open(spec: ActionSpec) {
    transition.reset();
    setDone(null);
    setNote("");
    setNoteError(undefined);
    setPending(spec);
  }

  function confirm() {
    if (!pending) return;
    if (pending.noteRequired && !note.trim()) {
      setNoteError("Write a short note; it goes on the record.");
      return;
    }
    const spec = pending;
    transition.mutate(
      { action: spec.action, ...(note.trim() ? { note: note.trim() } : {}) },
      {
        onSuccess: (result) => {
          setPending(null);
          setDone(`${spec.label}: done.`);
          if (result?.releaseId) setReleaseId(result.releaseId);
          onTransition?.(spec.action);
        },
        onError: () => setPending(null),
      },
    );
  }

  const refusal =
    transition.error instanceof ApiError &&
    (transition.error.status === 422 || transition.error.status === 409)
      ? transition.error.status === 422
        ? "The server refused: a sign-off condition is not met."
        : "The server refused: the revision's state changed meanwhile."
      : "The action did not go through.";

  return (
    <section
      aria-labelledby={`${baseId}-title`}
      className={cx("rounded-xl border border-ink-100 bg-white shadow-sm", className)}
      data-testid="release-gate"
    >
      <header className="flex flex-wrap items-center gap-2 border-b border-ink-100 px-4 py-3">
        <h2 id={`${baseId}-title`} className="flex-1 text-base font-semibold">
          Sign-off gate
        </h2>
        <StatusPill status={status} />
      </header>
      <div className="px-4 py-2">
        {gate.isPending ? (
          <Spinner label="Checking the sign-off conditions…" showLabel className="py-2" />
        ) : gate.isError ? (
          <ErrorState error={gate.error} onRetry={() => void gate.refetch()} className="my-2" />
        ) : (
          <>
            {status === "approved" && (
              <p className="pt-2 text-xs text-ink-500">
                Signed off. Releasing files the record for this exact revision and its verified run.
              </p>
            )}
            {closed && (
              <p className="pt-2 text-xs text-ink-500">
                {status === "released" ? "Released." : "Withdrawn."} The conditions as they stand today; the
                release record keeps those at the time of release.
              </p>
            )}
            <ul aria-label="Sign-off conditions" className="divide-y divide-ink-100">
              {gate.data.checks
                .filter((c) => !(pastSignOff && c.id === "state"))
                .map((c) => (
                  <CheckRow key={c.id} check={c} />
                ))}
            </ul>
          </>
        )}
      </div>
      <div className="flex flex-col gap-3 border-t border-ink-100 bg-paper/50 px-4 py-3">
        {transition.isError && (
          <Notice tone="error" title={refusal} onDismiss={() => transition.reset()}>
            {errorMessage(transition.error)}
          </Notice>
        )}
        {done && (
          <Notice tone="success" onDismiss={() => setDone(null)}>
            {done}
          </Notice>
        )}
        {release && (
          <p className="text-sm">
            <Link
              to={paths.release(release.id)}
              className="font-medium text-film-teal underline underline-offset-2"
            >
              Open the release record
            </Link>
          </p>
        )}
        {actions.length === 0 ? (
          <p className="text-sm text-ink-500">
            {status === "withdrawn"
              ? "This revision was withdrawn; it stays on record."
              : "Nothing here is yours to do at this state."}
          </p>
        ) : (
          <ul className="flex flex-wrap gap-3" aria-label="Workflow actions">
            {actions.map(({ spec, blockedBy }) => {
              const reasonId = `${baseId}-${spec.action}-reason`;
              return (
                <li key={spec.action} className="flex max-w-xs flex-col gap-1">
                  <Button
                    variant={spec.variant}
                    disabled={blockedBy !== null || transition.isPending}
                    aria-describedby={blockedBy ? reasonId : undefined}
                    loading={transition.isPending && transition.variables?.action === spec.action}
                    onClick={() => open(spec)}
                  >
                    {spec.label}
                  </Button>
                  {blockedBy && (
                    <p id={reasonId} className="text-xs text-ink-700">
                      {blockedBy}
                    </p>
                  )}
                </li>
              );
            })}
          </ul>
        )}
      </div>
      <Dialog
        open={pending !== null}
        onClose={() => setPending(null)}
        title={pending ? `${pending.label}?` : ""}
        description={pending?.confirm}
        footer={
          <>
            <Button variant="ghost" onClick={() => setPending(null)}>
              Cancel
            </Button>
            <Button
              variant={pending?.variant === "danger" ? "danger" : "primary"}
              onClick={confirm}
              loading={transition.isPending}
            >
              {pending?.label}
            </Button>
          </>
        }
      >
        {pending && (
          <TextArea
            label={pending.noteLabel}
            value={note}
            onChange={(e) => {
              setNote(e.target.value);
              setNoteError(undefined);
            }}
            error={noteError}
            rows={3}
            maxLength={2000}
            data-autofocus
          />
        )}
      </Dialog>
    </section>
  );
}
