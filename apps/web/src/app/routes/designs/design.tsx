// /designs/:designId → the latest revision's workspace.
import { redirect } from "react-router";
import type { LoaderFunctionArgs } from "react-router";
import { queryClient } from "../../../lib/query-client.ts";
import { requireSession } from "../../../lib/session.ts";
import { paths } from "../../../config/paths.ts";
import { designQueryOptions, latestRevision } from "../../../features/workspace/api/get-design.ts";
import { EmptyState } from "../../../components/ui/index.ts";

export async function loader({ params, request }: LoaderFunctionArgs) {
  const designId = params.designId ?? "";
  await requireSession(request);
  // Always ask the server: a newer revision may have been saved since the list was cached.
  const design = await queryClient.fetchQuery({ ...designQueryOptions(designId), staleTime: 0 });
  const latest = latestRevision(design);
  if (latest) return redirect(paths.revision(designId, latest.id));
  return null;
}

export function Component() {
  return <EmptyState title="This design has no revision yet" description="Its first revision is created with the design; ask its designer." />;
}
