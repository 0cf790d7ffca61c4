import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";
import type { Role, SessionUser } from "../../../lib/session.ts";
import type { Page } from "../../../lib/types.ts";

export interface Member {
  user: SessionUser;
  roles: Role[];
  joinedAt?: string;
}

export const getMembers = () => api.get<Page<Member>>("/members", { query: { limit: 200 } });

export const membersQueryOptions = () => queryOptions({ queryKey: ["members", "page"], queryFn: getMembers });

export const useMembers = () => useQuery(membersQueryOptions());

export const updateMemberRoles = (userId: string, roles: Role[]) =>
  api.patch<Member>(`/members/${encodeURIComponent(userId)}`, { roles });

export const removeMember = (userId: string) => api.delete<void>(`/members/${encodeURIComponent(userId)}`);

export function useUpdateMemberRoles() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ userId, roles }: { userId: string; roles: Role[] }) => updateMemberRoles(userId, roles),
    onSuccess: () =>
      Promise.all([
        qc.invalidateQueries({ queryKey: ["members"] }),
        qc.invalidateQueries({ queryKey: ["session"] }),
      ]),
  });
}

export function useRemoveMember() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: removeMember,
    onSuccess: () => qc.invalidateQueries({ queryKey: ["members"] }),
  });
}
