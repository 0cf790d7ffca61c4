import { QueryCache, QueryClient } from "@tanstack/react-query";
import { ApiError } from "./api-client.ts";

export function createQueryClient(): QueryClient {
  const client: QueryClient = new QueryClient({
    // A 401 on any query means the session ended (expired, signed out elsewhere): forget it, so the shell sends
    // the person to sign-in instead of showing a page of errors.
    queryCache: new QueryCache({
      onError: (error, query) => {
        if (error instanceof ApiError && error.status === 401 && query.queryKey[0] !== "session") {
          client.setQueryData(["session"], null);
        }
      },
    }),
    defaultOptions: {
      queries: {
        staleTime: 15_000,
        retry: (count, error) => !(error instanceof ApiError && error.status < 500) && count < 2,
      },
    },
  });
  return client;
}

export const queryClient = createQueryClient();
