// Review threads beside the chart: start a thread on a band, a wavelength range, a layer or the whole design;
// reply with @mentions; resolve and reopen. Each thread says whether its anchor passes on this revision.
import { useEffect, useId, useRef, useState, memo } from "react";
import type { FormEvent } from "react";
import type { SpecBand } from "@stackproof/optics";
import { useAddComment, useCreateThread, useMembers, useSetThreadState, useThreads } from "../api/threads.ts";
import type { ReviewThread, ThreadAnchor } from "../api/threads.ts";
import { describeAnchor } from "../lib/anchors.ts";
import { MentionTextarea } from "./mention-textarea.tsx";

export interface ReviewPanelProps {
  revisionId: string;
  revisionNumber: number;
  bands: readonly SpecBand[];
  layerCount: number;
  /** anchor proposed from the chart (dragged range) or the layer table (selected row) */
  proposed: ThreadAnchor | null;
  onProposedChange: (a: ThreadAnchor | null) => void;
  canStart: boolean;
  /** people who may resolve any thread (reviewer, approver); authors may resolve their own */
  canModerate: boolean;
  currentUserId: string | null;
  onFocusThread?: (t: ReviewThread) => void;
}

const fieldCls = "mt-0.5 w-full rounded border border-ink-300 bg-white px-2 py-1 text-sm";

export const ReviewPanel = memo(function ReviewPanel(props: ReviewPanelProps) {
  const threads = useThreads(props.revisionId);
  const [filter, setFilter] = useState<"open" | "all">("open");
  const list = (threads.data ?? []).filter((t) => filter === "all" || t.status === "open");
  const openCount = (threads.data ?? []).filter((t) => t.status === "open").length;
  const blocking = (threads.data ?? []).filter((t) => t.status === "open" && t.severity === "blocking").length;
  return (
    <section aria-labelledby="review-h" className="space-y-3">
      <div className="flex items-center gap-2">
        <h2 id="review-h" className="text-base font-semibold">
          Review threads
        </h2>
        <span className="text-xs text-ink-500">
          {openCount} open{blocking ? `, ${blocking} blocking` : ""}
        </span>
        <div role="radiogroup" aria-label="Show threads" className="ml-auto flex rounded border border-ink-300 text-xs">
          {(["open", "all"] as const).map((f) => (
            <button key={f} type="button" role="radio" aria-checked={filter === f} onClick={() => setFilter(f)} className={`px-2 py-0.5 ${filter === f ? "bg-ink-900 text-paper" : ""}`}>
              {f === "open" ? "Open" : "All"}
            </button>
          ))}
        </div>
      </div>
      {props.canStart ? <NewThread {...props} /> : null}
      {threads.isPending ? <p className="text-sm text-ink-500">Loading threads…</p> : null}
      {threads.error ? (
        <p role="alert" className="text-sm text-verdict-fail">
          Could not load the threads: {threads.error.message}
        </p>
      ) : null}
      {threads.data && list.length === 0 ? (
        <p className="rounded border border-dashed border-ink-300 p-3 text-sm text-ink-500">
          {filter === "open" ? "No open threads on this design." : "No threads yet."}
        </p>
      ) : null}
      <ol className="space-y-2" aria-label="Threads">
        {list.map((t) => (
          <ThreadCard key={t.id} thread={t} {...props} />
        ))}
      </ol>
    </section>
  );
});

function NewThread(props: ReviewPanelProps) {
  const create = useCreateThread(props.revisionId);
  const [kind, setKind] = useState<ThreadAnchor["kind"]>("band");
  const [bandId, setBandId] = useState(props.bands[0]?.id ?? "");
  const [range, setRange] = useState({ start: "", stop: "" });
  const [layer, setLayer] = useState("0");
  const [severity, setSeverity] = useState<"blocking" | "advisory">("blocking");
  const [body, setBody] = useState("");
  const [seen, setSeen] = useState<ThreadAnchor | null>(null);
  const [error, setError] = useState<string | null>(null);
  const formRef = useRef<HTMLFormElement>(null);
  const formId = useId();

  // A band, range or layer picked elsewhere on the page brings the comment box into view and focus, so the pick
  // visibly leads somewhere also when this panel sits below the chart (narrow screens).
  useEffect(() => {
    if (!seen) return;
    const box = formRef.current?.querySelector<HTMLTextAreaElement>("textarea");
    box?.focus({ preventScroll: true });
    const r = box?.getBoundingClientRect();
    if (box && r && (r.top < 0 || r.bottom > window.innerHeight)) box.scrollIntoView({ block: "center" });
  }, [seen]);

  // Adopt a proposal from the chart or the layer table once.
  if (props.proposed && props.proposed !== seen) {
    setSeen(props.proposed);
    const p = props.proposed;
    setKind(p.kind);
    if (p.kind === "range") setRange({ start: String(p.start), stop: String(p.stop) });
    if (p.kind === "layer") setLayer(String(p.index));
    if (p.kind === "band") setBandId(p.bandId);
  }

  const anchor = (): ThreadAnchor | string => {
    switch (kind) {
      case "band":
        return bandId ? { kind: "band", bandId } : "Pick a band.";
      case "range": {
        const a = Number(range.start);
        const b = Number(range.stop);
        if (!(a > 0) || !(b > a)) return "Give a wavelength range: start > 0 and stop above start (or drag on the chart).";
        return { kind: "range", start: a, stop: b };
      }
      case "layer": {
        const i = Number(layer);
        return Number.isInteger(i) && i >= 0 && i < props.layerCount ? { kind: "layer", index: i } : "Pick a layer.";
      }
      case "design":
        return { kind: "design" };
    }
  };

  const submit = (e: FormEvent) => {
    e.preventDefault();
    const a = anchor();
    if (typeof a === "string") return setError(a);
    if (!body.trim()) return setError("Write what needs attention.");
    setError(null);
    create.mutate(
      { anchor: a, severity, body: body.trim() },
      {
        onSuccess: () => {
          setBody("");
          props.onProposedChange(null);
        },
        onError: (err) => setError(err.message),
      },
    );
  };

  return (
    <form ref={formRef} onSubmit={submit} aria-label="Start a review thread" className="space-y-2 rounded-md border border-film-violet/30 bg-film-violet/5 p-3 text-sm">
      <div className="grid grid-cols-2 gap-2">
        <label className="text-xs text-ink-700">
          Pinned to
          <select className={fieldCls} value={kind} onChange={(e) => setKind(e.target.value as ThreadAnchor["kind"])}>
            <option value="band">a spec band</option>
            <option value="range">a wavelength range</option>
            <option value="layer">a layer</option>
            <option value="design">the whole design</option>
          </select>
        </label>
        <div className="text-xs text-ink-700">
          <label>
            Severity
            <select className={fieldCls} value={severity} aria-describedby={`${formId}-sev`} onChange={(e) => setSeverity(e.target.value as "blocking" | "advisory")}>
              <option value="blocking">blocking</option>
              <option value="advisory">advisory</option>
            </select>
          </label>
          <span id={`${formId}-sev`} className="mt-0.5 block text-ink-500">
            {severity === "blocking" ? "holds the sign-off until resolved" : "a remark; does not hold the sign-off"}
          </span>
        </div>
        {kind === "band" ? (
          <label className="col-span-2 text-xs text-ink-700">
            Band
            <select className={fieldCls} value={bandId} onChange={(e) => setBandId(e.target.value)}>
              {props.bands.map((b) => (
                <option key={b.id} value={b.id}>
                  {b.label ?? b.id} ({b.start}–{b.stop} nm)
                </option>
              ))}
            </select>
          </label>
        ) : null}
        {kind === "range" ? (
          <>
            <label className="text-xs text-ink-700">
              From (nm)
              <input className={fieldCls} inputMode="decimal" value={range.start} onChange={(e) => setRange({ ...range, start: e.target.value })} />
            </label>
            <label className="text-xs text-ink-700">
              To (nm)
              <input className={fieldCls} inputMode="decimal" value={range.stop} onChange={(e) => setRange({ ...range, stop: e.target.value })} />
            </label>
            <p className="col-span-2 text-xs text-ink-500">Tip: drag across the chart to fill these in.</p>
          </>
        ) : null}
        {kind === "layer" ? (
          <label className="col-span-2 text-xs text-ink-700">
            Layer
            <select className={fieldCls} value={layer} onChange={(e) => setLayer(e.target.value)}>
              {Array.from({ length: props.layerCount }, (_, i) => (
                <option key={i} value={i}>
                  Layer {i + 1}
                </option>
              ))}
            </select>
          </label>
        ) : null}
      </div>
      <MentionTextarea value={body} onChange={setBody} label="Comment (type @ to mention someone)" rows={2} />
      {error ? (
        <p role="alert" className="text-xs text-verdict-fail">
          {error}
        </p>
      ) : null}
      <button type="submit" disabled={create.isPending} className="rounded bg-film-violet px-3 py-1 text-sm font-semibold text-white disabled:opacity-40">
        {create.isPending ? "Starting…" : "Start thread"}
      </button>
    </form>
  );
}

function ThreadCard({ thread, bands, revisionId, revisionNumber, canModerate, currentUserId, onFocusThread }: { thread: ReviewThread } & ReviewPanelProps) {
  const [reply, setReply] = useState("");
  const add = useAddComment(revisionId);
  const setState = useSetThreadState(revisionId);
  const mayToggle = canModerate || currentUserId === thread.author?.id;
  const members = useMembers();
  const names = (members.data ?? []).flatMap((m) => [m.user.email, m.user.name]);
  const passes = thread.anchorPasses;
  return (
    <li className={`rounded-md border p-3 text-sm ${thread.status === "open" ? "border-ink-300 bg-white" : "border-ink-100 bg-paper opacity-80"}`} data-thread={thread.id} data-status={thread.status}>
      <div className="flex flex-wrap items-center gap-1.5">
        <button type="button" className="font-semibold text-ink-900 underline-offset-2 hover:underline" onClick={() => onFocusThread?.(thread)}>
          {describeAnchor(thread.anchor, bands)}
        </button>
        <span className={`rounded px-1.5 text-xs ${thread.severity === "blocking" ? "bg-verdict-fail/10 text-verdict-fail" : "bg-ink-100 text-ink-700"}`}>{thread.severity}</span>
        <span className={`rounded px-1.5 text-xs ${thread.status === "open" ? "bg-film-violet/10 text-film-violet" : "bg-verdict-pass/10 text-verdict-pass"}`}>{thread.status}</span>
        {passes === null ? null : (
          <span className={`rounded px-1.5 text-xs ${passes ? "bg-verdict-pass/10 text-verdict-pass" : "bg-verdict-fail/10 text-verdict-fail"}`} data-anchor-passes={String(passes)}>
            {passes ? `passes in r${revisionNumber}` : `fails in r${revisionNumber}`}
          </span>
        )}
        <span className="ml-auto text-xs text-ink-500">opened on r{thread.revisionNumber}{thread.revisionNumber !== revisionNumber ? " (earlier revision)" : ""}</span>
      </div>
      <ul className="mt-2 space-y-1.5">
        {thread.comments.map((c) => (
          <li key={c.id}>
            <span className="text-xs font-semibold">{c.author?.name ?? "unknown author"}</span> <span className="text-xs text-ink-500">{new Date(c.createdAt).toLocaleString()}</span>
            <p className="whitespace-pre-wrap">{highlightMentions(c.body, names)}</p>
          </li>
        ))}
      </ul>
      <form
        className="mt-2 space-y-1"
        onSubmit={(e) => {
          e.preventDefault();
          if (reply.trim()) add.mutate({ threadId: thread.id, body: reply.trim() }, { onSuccess: () => setReply("") });
        }}
      >
        <MentionTextarea value={reply} onChange={setReply} label="Reply" rows={1} />
        {add.error ? <p role="alert" className="text-xs text-verdict-fail">{add.error.message}</p> : null}
        {setState.error ? <p role="alert" className="text-xs text-verdict-fail">{setState.error.message}</p> : null}
        <div className="flex gap-2">
          <button type="submit" disabled={!reply.trim() || add.isPending} className="rounded border border-ink-300 px-2 py-0.5 text-xs disabled:opacity-40">
            Reply
          </button>
          {mayToggle ? (
            <button
              type="button"
              disabled={setState.isPending}
              onClick={() => setState.mutate({ threadId: thread.id, action: thread.status === "open" ? "resolve" : "reopen" })}
              className="rounded border border-ink-300 px-2 py-0.5 text-xs"
            >
              {thread.status === "open" ? "Resolve" : "Reopen"}
            </button>
          ) : null}
        </div>
      </form>
    </li>
  );
}

/** Marks "@name" and "@email" mentions of workspace members (names may contain spaces). */
export function highlightMentions(body: string, names: readonly string[]) {
  const known = [...names].filter(Boolean).sort((x, y) => y.length - x.length);
  const out: (string | { mention: string })[] = [];
  let i = 0;
  let plain = "";
  while (i < body.length) {
    if (body[i] === "@" && (i === 0 || /\s|\(/.test(body[i - 1] ?? ""))) {
      const rest = body.slice(i + 1);
      const hit = known.find((n) => rest.toLowerCase().startsWith(n.toLowerCase())) ?? /^[\w.+-]+(?:@[\w.-]+)?/.exec(rest)?.[0];
      if (hit) {
        if (plain) out.push(plain);
        plain = "";
        out.push({ mention: "@" + rest.slice(0, hit.length) });
        i += hit.length + 1;
        continue;
      }
    }
    plain += body[i];
    i++;
  }
  if (plain) out.push(plain);
  return out.map((part, k) =>
    typeof part === "string" ? (
      part
    ) : (
      <span key={k} className="rounded bg-film-teal/10 px-0.5 text-film-teal">
        {part.mention}
      </span>
    ),
  );
}
