import { queryOptions, useQuery } from '@tanstack/react-query';
import type { User } from '@shared/api';
import { callRoute, isApiError } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** The signed-in user, or null when nobody is signed in (401 is an answer here, not an error). */
export async function getMe(): Promise<User | null> {
  try {
    const { user } = await callRoute('me');
    return user;
  } catch (e) {
    if (isApiError(e) && e.status === 401) return null;
    throw e;
  }
}

export const meQueryOptions = () => queryOptions({ queryKey: queryKeys.me, queryFn: getMe, staleTime: 60_000 });

export function useMe() {
  return useQuery(meQueryOptions());
}
