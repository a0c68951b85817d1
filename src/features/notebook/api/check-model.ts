import { keepPreviousData, useQuery } from '@tanstack/react-query';
import { callRoute } from '@/lib/api-client';
import { nbKeys } from './keys';

/** A member's model check of the program being typed (the region included). */
export function useModelCheck(workspaceId: string, notebookId: string, source: string, enabled: boolean) {
  return useQuery({
    queryKey: nbKeys.compile(workspaceId, notebookId, source),
    queryFn: ({ signal }) => callRoute('compileModel', { params: { workspaceId }, body: { source, notebookId, region: true }, signal }),
    enabled: enabled && source.trim().length > 0,
    placeholderData: keepPreviousData,
    staleTime: 60_000,
  });
}

/** A share-link reader's model check: the stored program of that model cell (`source` keys the cache). */
export function useSharedModelCheck(token: string, cellId: string, source: string, enabled: boolean) {
  return useQuery({
    queryKey: nbKeys.shared.modelCheck(token, cellId, source),
    queryFn: ({ signal }) => callRoute('sharedModelCheck', { params: { token, cellId }, signal }),
    enabled: enabled && source.trim().length > 0,
    staleTime: 60_000,
  });
}
