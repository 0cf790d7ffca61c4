import { Link, useParams, type LoaderFunctionArgs } from "react-router";
import { Brand } from "../../components/layout/brand.tsx";
import { Button, ErrorState, PageSpinner } from "../../components/ui/index.ts";
import { ReleaseDocument } from "../../features/releases/components/release-document.tsx";
import {
  releasePdfUrl,
  releasePrintUrl,
  releaseQueryOptions,
  useRelease,
} from "../../features/releases/api/get-release.ts";
import { paths } from "../../config/paths.ts";
import { queryClient } from "../../lib/query-client.ts";
import { requireSession } from "../../lib/session.ts";

export async function loader({ request, params }: LoaderFunctionArgs) {
  await requireSession(request);
  if (params.releaseId) void queryClient.prefetchQuery(releaseQueryOptions(params.releaseId));
  return null;
}

/** The release record on its own page (outside the shell), ready to print or file. */
export function Component() {
  const { releaseId = "" } = useParams();
  const release = useRelease(releaseId);
  return (
    <div className="min-h-screen bg-paper-deep print:bg-white">
      <title>
        {release.data
          ? `Release record ${release.data.design.name} r${release.data.revision.number} · Stackproof`
          : "Release record · Stackproof"}
      </title>
      <div className="no-print sticky top-0 z-10 bg-ink-900 text-ink-100">
        <div className="mx-auto flex max-w-[210mm] flex-wrap items-center gap-3 px-4 py-2">
          <Link to={paths.home} aria-label="Back to the Stackproof overview">
            <Brand />
          </Link>
          {release.data && (
            <Link
              to={paths.revision(release.data.design.id, release.data.revision.id)}
              className="text-sm text-ink-300 hover:text-paper"
            >
              Open the revision
            </Link>
          )}
          <div className="ml-auto flex gap-2">
            <a
              href={releasePrintUrl(releaseId)}
              className="inline-flex h-8 items-center rounded-md px-3 text-sm text-ink-100 underline-offset-2 hover:bg-ink-800 hover:underline"
              target="_blank"
              rel="noreferrer"
            >
              Server print version
            </a>
            <a
              href={releasePdfUrl(releaseId)}
              download
              className="inline-flex h-8 items-center rounded-md px-3 text-sm text-ink-100 underline-offset-2 hover:bg-ink-800 hover:underline"
              data-testid="release-pdf"
            >
              Download PDF
            </a>
            <Button size="sm" variant="secondary" onClick={() => window.print()} disabled={!release.data}>
              Print
            </Button>
          </div>
        </div>
      </div>
      <main className="px-4 py-8 print:p-0">
        {release.isPending ? (
          <PageSpinner label="Loading the release record…" />
        ) : release.isError ? (
          <div className="mx-auto max-w-xl">
            <ErrorState error={release.error} onRetry={() => void release.refetch()} />
          </div>
        ) : (
          <ReleaseDocument record={release.data} />
        )}
      </main>
    </div>
  );
}
