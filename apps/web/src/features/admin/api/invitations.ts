import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";
import { InvitationListResponse, InvitationSchema, type Invitation, type Role } from "@stackproof/contracts";

export type { Invitation };

export const getInvitations = () => api.get("/invitations", { query: { limit: 200 }, schema: InvitationListResponse });

export const invitationsQueryOptions = () =>
  queryOptions({ queryKey: ["invitations"], queryFn: getInvitations });

export const useInvitations = () => useQuery(invitationsQueryOptions());

export const createInvitation = (input: { email: string; roles: Role[] }) =>
  api.post("/invitations", input, { schema: InvitationSchema });

export const revokeInvitation = (id: string) => api.delete(`/invitations/${encodeURIComponent(id)}`);

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
