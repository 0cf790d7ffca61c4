import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";
import { InvitationLookupSchema, SessionInfo, type InvitationLookup } from "@stackproof/contracts";
import { sessionQueryKey } from "../../../lib/session.ts";

export type { InvitationLookup };

export const lookupInvitation = (token: string) =>
  api.get(`/invitations/lookup/${encodeURIComponent(token)}`, { schema: InvitationLookupSchema });

export const invitationLookupQueryOptions = (token: string) =>
  queryOptions({
    queryKey: ["invitations", "lookup", token],
    queryFn: () => lookupInvitation(token),
    retry: false,
    enabled: token !== "",
  });

export const useInvitationLookup = (token: string) => useQuery(invitationLookupQueryOptions(token));

export const acceptInvitation = (input: { token: string; name: string; password: string }) =>
  api.post("/invitations/accept", input, { schema: SessionInfo });

export function useAcceptInvitation() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: acceptInvitation,
    onSuccess: (session) => {
      // Keep the lookup: the page still shows it, and refetching a used token would only answer 404.
      qc.removeQueries({ predicate: (q) => q.queryKey[0] !== "invitations" });
      qc.setQueryData(sessionQueryKey, session);
    },
  });
}
