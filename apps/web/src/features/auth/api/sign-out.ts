import { useMutation, useQueryClient } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";
import { sessionQueryKey } from "../../../lib/session.ts";

export const signOut = () => api.post("/auth/sign-out");

/** Ends the session; afterwards every cached query is dropped so the next person sees nothing of this one. */
export function useSignOut() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: signOut,
    onSettled: () => {
      qc.clear();
      qc.setQueryData(sessionQueryKey, null);
    },
  });
}
