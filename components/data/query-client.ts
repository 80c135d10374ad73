import { QueryClient } from "@tanstack/react-query";
import { ApiError } from "./api";

/** One client for the app: no retry on 4xx (the answer will not change), a short stale time. */
export function makeQueryClient(): QueryClient {
  return new QueryClient({
    defaultOptions: {
      queries: {
        staleTime: 10_000,
        retry: (count, error) => !(error instanceof ApiError && error.status >= 400 && error.status < 500) && count < 2,
        refetchOnWindowFocus: true,
      },
      mutations: { retry: false },
    },
  });
}
