import { QueryClient } from "@tanstack/react-query";
import { ApiError } from "./api-client.ts";

export function createQueryClient(): QueryClient {
  return new QueryClient({
    defaultOptions: {
      queries: {
        staleTime: 15_000,
        retry: (count, error) => !(error instanceof ApiError && error.status < 500) && count < 2,
      },
    },
  });
}

export const queryClient = createQueryClient();
