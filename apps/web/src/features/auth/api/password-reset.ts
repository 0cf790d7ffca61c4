import { useMutation } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";

/** Always answers 202; the server mails a link only when the account exists. */
export const requestPasswordReset = (email: string) => api.post("/auth/password-reset", { email });

export const confirmPasswordReset = (input: { token: string; password: string }) =>
  api.post("/auth/password-reset/confirm", input);

export const useRequestPasswordReset = () => useMutation({ mutationFn: requestPasswordReset });
export const useConfirmPasswordReset = () => useMutation({ mutationFn: confirmPasswordReset });
