import { useState, type ReactNode } from "react";
import { Card, EmptyState, ErrorState, Notice, PageSpinner, Spinner, cx } from "../../components/ui/index.ts";
import { outboxQueryOptions, useOutbox } from "../../features/outbox/api/get-outbox.ts";
import { useOutboxMessage } from "../../features/outbox/api/get-message.ts";
import { ApiError } from "../../lib/api-client.ts";
import { queryClient } from "../../lib/query-client.ts";
import { formatDateTime } from "../../lib/format.ts";
import { requireRole } from "../../lib/session.ts";

export async function loader({ request }: { request: Request }) {
  await requireRole(request, ["admin"]);
  void queryClient.prefetchQuery(outboxQueryOptions());
  return null;
}

/** Plain text with its web addresses made clickable (reset and invitation links). */
function Linkified({ text }: { text: string }) {
  const parts: ReactNode[] = [];
  const re = /https?:\/\/[^\s<>"]+/g;
  let last = 0;
  for (const m of text.matchAll(re)) {
    const i = m.index ?? 0;
    if (i > last) parts.push(text.slice(last, i));
    parts.push(
      <a key={i} href={m[0]} className="break-all text-film-teal underline">
        {m[0]}
      </a>,
    );
    last = i + m[0].length;
  }
  parts.push(text.slice(last));
  return <>{parts}</>;
}

function MessageView({ id }: { id: string }) {
  const msg = useOutboxMessage(id);
  if (msg.isPending) return <Spinner label="Opening the message…" showLabel />;
  if (msg.isError) return <ErrorState error={msg.error} onRetry={() => void msg.refetch()} />;
  const m = msg.data;
  return (
    <article aria-labelledby="outbox-subject">
      <h2 id="outbox-subject" className="text-lg font-semibold">
        {m.subject}
      </h2>
      <dl className="mt-2 grid grid-cols-[4rem_1fr] gap-x-3 gap-y-0.5 text-sm">
        <dt className="text-ink-500">From</dt>
        <dd className="font-mono text-xs leading-5">{m.from}</dd>
        <dt className="text-ink-500">To</dt>
        <dd className="font-mono text-xs leading-5">{m.to}</dd>
        <dt className="text-ink-500">Received</dt>
        <dd className="text-xs leading-5">{formatDateTime(m.receivedAt)}</dd>
      </dl>
      <pre
        className="mt-4 rounded-lg border border-ink-100 bg-paper/60 p-4 font-sans text-sm whitespace-pre-wrap text-ink-900"
        data-testid="outbox-text"
      >
        <Linkified text={m.text} />
      </pre>
      {m.html && (
        <details className="mt-3">
          <summary className="cursor-pointer text-sm text-ink-700">HTML version</summary>
          {/* Sandboxed: the captured HTML runs no script and reaches nothing. */}
          <iframe
            title={`HTML version of ${m.subject}`}
            sandbox=""
            srcDoc={m.html}
            className="mt-2 h-96 w-full rounded-lg border border-ink-100 bg-white"
          />
        </details>
      )}
    </article>
  );
}

export function Component() {
  const outbox = useOutbox();
  const [selected, setSelected] = useState<string | null>(null);

  const intro = (
    <Notice tone="warning" title="Demo and development only">
      This server has no outgoing mail host configured, so it keeps every e-mail it would send for this
      workspace here instead of delivering it. Password-reset and invitation links are hidden unless the
      message is addressed to you. A production server sends mail and has no outbox unless it is switched on
      (MAIL_CAPTURE).
    </Notice>
  );

  if (outbox.isPending) return <PageSpinner label="Loading the outbox…" />;
  if (outbox.isError) {
    const off = outbox.error instanceof ApiError && outbox.error.status === 404;
    return (
      <div className="flex flex-col gap-4">
        <h1 className="text-2xl font-semibold tracking-tight">Outbox</h1>
        {off ? (
          <Notice tone="info" title="No outbox on this server">
            This server delivers e-mail through a real mail host, so nothing is kept here.
          </Notice>
        ) : (
          <ErrorState error={outbox.error} onRetry={() => void outbox.refetch()} />
        )}
      </div>
    );
  }
  const items = outbox.data.items;
  const current = selected ?? items[0]?.id ?? null;

  return (
    <div className="flex flex-col gap-6">
      <title>Outbox · Stackproof</title>
      <header className="flex flex-col gap-3">
        <h1 className="text-2xl font-semibold tracking-tight">Outbox</h1>
        {intro}
      </header>
      {items.length === 0 ? (
        <EmptyState
          title="No e-mail captured yet"
          description="Invitations, password resets and review notifications show up here."
        />
      ) : (
        <div className="grid items-start gap-6 lg:grid-cols-[minmax(0,2fr)_minmax(0,3fr)]">
          <Card
            title="Captured e-mail"
            description={`${items.length} ${items.length === 1 ? "message" : "messages"}, newest first`}
            flush
          >
            <ul className="max-h-[36rem] divide-y divide-ink-100 overflow-y-auto">
              {items.map((m) => (
                <li key={m.id}>
                  <button
                    type="button"
                    aria-current={current === m.id ? "true" : undefined}
                    onClick={() => setSelected(m.id)}
                    className={cx(
                      "block w-full px-4 py-2.5 text-left hover:bg-paper/70",
                      current === m.id && "bg-film-teal/8",
                    )}
                  >
                    <span className="block truncate text-sm font-medium">{m.subject}</span>
                    <span className="block truncate font-mono text-xs text-ink-500">
                      {m.to} · {formatDateTime(m.receivedAt)}
                    </span>
                  </button>
                </li>
              ))}
            </ul>
          </Card>
          <Card>
            {current ? <MessageView key={current} id={current} /> : <EmptyState title="Choose a message" />}
          </Card>
        </div>
      )}
    </div>
  );
}
