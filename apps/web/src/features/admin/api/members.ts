import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";
import { MemberListResponse, MemberUpdateResponse, type Member, type Role } from "@stackproof/contracts";

export type { Member };

export const getMembers = () => api.get("/members", { query: { limit: 200 }, schema: MemberListResponse });

export const membersQueryOptions = () => queryOptions({ queryKey: ["members", "page"], queryFn: getMembers });

export const useMembers = () => useQuery(membersQueryOptions());

export const updateMemberRoles = (userId: string, roles: Role[]) =>
  api.patch(`/members/${encodeURIComponent(userId)}`, { roles }, { schema: MemberUpdateResponse });

export const removeMember = (userId: string) => api.delete(`/members/${encodeURIComponent(userId)}`);

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
