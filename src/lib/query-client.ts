import { QueryClient } from '@tanstack/react-query';
import { isApiError } from './api-client';

/** Retries only what a retry can fix: network trouble and 5xx, at most twice. Never 4xx. */
export function shouldRetry(failureCount: number, error: unknown): boolean {
  if (failureCount >= 2) return false;
  if (isApiError(error)) return error.status === 0 || error.status >= 500;
  return false;
}

export function makeQueryClient(): QueryClient {
  return new QueryClient({
    defaultOptions: {
      queries: { staleTime: 20_000, retry: shouldRetry, refetchOnWindowFocus: true },
      mutations: { retry: false },
    },
  });
}

/** The app's single query client; route loaders prefetch through it. */
export const queryClient = makeQueryClient();
