import { useMutation, useQueryClient } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";
import { SessionInfo, type SignInInput } from "@stackproof/contracts";
import { sessionQueryKey } from "../../../lib/session.ts";

export type { SignInInput };

export const signIn = (input: SignInInput) => api.post("/auth/sign-in", input, { schema: SessionInfo });

/** Signs in and stores the session, so the shell's loader finds it without another request. */
export function useSignIn() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: signIn,
    onSuccess: (session) => {
      qc.removeQueries();
      qc.setQueryData(sessionQueryKey, session);
    },
  });
}
