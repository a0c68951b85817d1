import { queryOptions, useQuery } from '@tanstack/react-query';
import { callRoute } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** What an anonymous holder of a share link may read. */
export function getSharedNotebook(token: string) {
  return callRoute('getSharedNotebook', { params: { token } });
}

export const sharedNotebookQueryOptions = (token: string) =>
  queryOptions({ queryKey: queryKeys.sharedNotebook(token), queryFn: () => getSharedNotebook(token) });

export function useSharedNotebook(token: string) {
  return useQuery(sharedNotebookQueryOptions(token));
}
