import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";
import { sessionQueryKey, type Role, type Session } from "../../../lib/session.ts";

export interface InvitationLookup {
  email: string;
  workspaceName: string;
  roles: Role[];
  expiresAt: string;
}

export const lookupInvitation = (token: string) =>
  api.get<InvitationLookup>(`/invitations/lookup/${encodeURIComponent(token)}`);

export const invitationLookupQueryOptions = (token: string) =>
  queryOptions({
    queryKey: ["invitations", "lookup", token],
    queryFn: () => lookupInvitation(token),
    retry: false,
    enabled: token !== "",
  });

export const useInvitationLookup = (token: string) => useQuery(invitationLookupQueryOptions(token));

export const acceptInvitation = (input: { token: string; name: string; password: string }) =>
  api.post<Session>("/invitations/accept", input);

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
