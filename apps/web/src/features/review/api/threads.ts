import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { MemberListResponse, ThreadListResponse, ThreadSchema, type Member, type ReviewThread, type ThreadAnchor } from "@stackproof/contracts";
import { api } from "../../../lib/api-client.ts";

export type { Member, ReviewThread, ThreadAnchor };
export type ThreadComment = ReviewThread["comments"][number];

export const threadsQueryOptions = (revisionId: string) =>
  queryOptions({
    queryKey: ["revisions", revisionId, "threads"],
    queryFn: () => api.get(`/revisions/${revisionId}/threads`, { schema: ThreadListResponse }).then((r) => r.items),
  });

export const useThreads = (revisionId: string) => useQuery(threadsQueryOptions(revisionId));

function useInvalidate(revisionId: string) {
  const qc = useQueryClient();
  return () =>
    Promise.all([
      qc.invalidateQueries({ queryKey: ["revisions", revisionId, "threads"] }),
      qc.invalidateQueries({ queryKey: ["revisions", revisionId, "gate"] }),
    ]);
}

export function useCreateThread(revisionId: string) {
  const invalidate = useInvalidate(revisionId);
  return useMutation({
    mutationFn: (body: { anchor: ThreadAnchor; severity: "blocking" | "advisory"; body: string }) =>
      api.post(`/revisions/${revisionId}/threads`, body, { schema: ThreadSchema }),
    onSuccess: invalidate,
  });
}

export function useAddComment(revisionId: string) {
  const invalidate = useInvalidate(revisionId);
  return useMutation({
    mutationFn: ({ threadId, body }: { threadId: string; body: string }) => api.post(`/threads/${threadId}/comments`, { body }, { schema: ThreadSchema }),
    onSuccess: invalidate,
  });
}

export function useSetThreadState(revisionId: string) {
  const invalidate = useInvalidate(revisionId);
  return useMutation({
    mutationFn: ({ threadId, action }: { threadId: string; action: "resolve" | "reopen" }) => api.post(`/threads/${threadId}/${action}`, undefined, { schema: ThreadSchema }),
    onSuccess: invalidate,
  });
}

export const membersQueryOptions = () =>
  queryOptions({ queryKey: ["members"], queryFn: () => api.get("/members", { schema: MemberListResponse }).then((r) => r.items), staleTime: 5 * 60_000 });

export const useMembers = () => useQuery(membersQueryOptions());
