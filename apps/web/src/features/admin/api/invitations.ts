import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";
import type { PersonRef, Page } from "../../../lib/types.ts";
import type { Role } from "../../../lib/session.ts";

export interface Invitation {
  id: string;
  email: string;
  roles: Role[];
  createdAt: string;
  expiresAt: string;
  invitedBy: PersonRef | null;
}

export const getInvitations = () => api.get<Page<Invitation>>("/invitations", { query: { limit: 200 } });

export const invitationsQueryOptions = () =>
  queryOptions({ queryKey: ["invitations"], queryFn: getInvitations });

export const useInvitations = () => useQuery(invitationsQueryOptions());

export const createInvitation = (input: { email: string; roles: Role[] }) =>
  api.post<Invitation>("/invitations", input);

export const revokeInvitation = (id: string) => api.delete<void>(`/invitations/${encodeURIComponent(id)}`);

export function useCreateInvitation() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: createInvitation,
    onSuccess: () =>
      Promise.all([
        qc.invalidateQueries({ queryKey: ["invitations"] }),
        qc.invalidateQueries({ queryKey: ["outbox"] }),
      ]),
  });
}

export function useRevokeInvitation() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: revokeInvitation,
    onSuccess: () => qc.invalidateQueries({ queryKey: ["invitations"] }),
  });
}
