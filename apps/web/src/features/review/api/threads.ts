import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";

export type ThreadAnchor =
  | { kind: "band"; bandId: string }
  | { kind: "range"; start: number; stop: number }
  | { kind: "layer"; index: number }
  | { kind: "design" };

export interface ThreadComment {
  id: string;
  author: { id: string; name: string };
  body: string;
  mentions: unknown[];
  createdAt: string;
}

export interface ReviewThread {
  id: string;
  revisionId: string;
  revisionNumber: number;
  anchor: ThreadAnchor;
  severity: "blocking" | "advisory";
  status: "open" | "resolved";
  author: { id: string; name: string };
  createdAt: string;
  comments: ThreadComment[];
  anchorPasses: boolean | null;
}

export const threadsQueryOptions = (revisionId: string) =>
  queryOptions({
    queryKey: ["revisions", revisionId, "threads"],
    queryFn: () => api.get<{ items: ReviewThread[] }>(`/revisions/${revisionId}/threads`).then((r) => r.items),
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
      api.post<ReviewThread>(`/revisions/${revisionId}/threads`, body),
    onSuccess: invalidate,
  });
}

export function useAddComment(revisionId: string) {
  const invalidate = useInvalidate(revisionId);
  return useMutation({
    mutationFn: ({ threadId, body }: { threadId: string; body: string }) => api.post<ThreadComment>(`/threads/${threadId}/comments`, { body }),
    onSuccess: invalidate,
  });
}

export function useSetThreadState(revisionId: string) {
  const invalidate = useInvalidate(revisionId);
  return useMutation({
    mutationFn: ({ threadId, action }: { threadId: string; action: "resolve" | "reopen" }) => api.post<unknown>(`/threads/${threadId}/${action}`),
    onSuccess: invalidate,
  });
}

export interface Member {
  user: { id: string; email: string; name: string };
  roles: string[];
}

export const membersQueryOptions = () =>
  queryOptions({ queryKey: ["members"], queryFn: () => api.get<{ items: Member[] }>("/members").then((r) => r.items), staleTime: 5 * 60_000 });

export const useMembers = () => useQuery(membersQueryOptions());
