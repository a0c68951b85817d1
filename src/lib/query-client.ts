import { MutationCache, QueryCache, QueryClient } from '@tanstack/react-query';
import { isApiError } from './api-client';
import { queryKeys } from './query-keys';

/** Retries only what a retry can fix: network trouble and 5xx, at most twice. Never 4xx. */
export function shouldRetry(failureCount: number, error: unknown): boolean {
  if (failureCount >= 2) return false;
  if (isApiError(error)) return error.status === 0 || error.status >= 500;
  return false;
}

/** True when the server says the session is gone (not a wrong password, which is `invalid_credentials`). */
export function isSessionLost(error: unknown): boolean {
  return isApiError(error) && error.status === 401 && error.code === 'unauthenticated';
}

export type QueryClientOptions = {
  /** Called once per lost session, e.g. to send the person to sign in and back. */
  onSessionLost?: () => void;
};

export function makeQueryClient({ onSessionLost }: QueryClientOptions = {}): QueryClient {
  const lost = (error: unknown) => {
    if (!isSessionLost(error)) return;
    if (client.getQueryData(queryKeys.me) === null) return; // already known and handled
    client.setQueryData(queryKeys.me, null);
    onSessionLost?.();
  };
  const client: QueryClient = new QueryClient({
    queryCache: new QueryCache({ onError: lost }),
    mutationCache: new MutationCache({ onError: lost }),
    defaultOptions: {
      queries: { staleTime: 20_000, retry: shouldRetry, refetchOnWindowFocus: true },
      mutations: { retry: false },
    },
  });
  return client;
}
