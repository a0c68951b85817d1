import { keepPreviousData, useQuery } from '@tanstack/react-query';
import { callRoute } from '@/lib/api-client';
import { DATASET_PREVIEW_ROWS } from '@shared/api/notebook';
import type { NotebookAccess } from './access';
import { nbKeys } from './keys';

/** One page of a dataset's rows (from its stored typed columns), for a member or a share-link visitor. */
export function useDatasetRows(access: NotebookAccess, datasetId: string, offset: number, enabled: boolean) {
  const limit = DATASET_PREVIEW_ROWS;
  return useQuery({
    // Under the dataset's own key, so whatever refreshes the dataset refreshes its pages.
    queryKey:
      access.mode === 'member'
        ? [...nbKeys.dataset(access.workspaceId, datasetId), 'rows', offset]
        : [...nbKeys.shared.dataset(access.token, datasetId), 'rows', offset],
    queryFn: () =>
      access.mode === 'member'
        ? callRoute('getDatasetRows', { params: { workspaceId: access.workspaceId, datasetId }, query: { offset, limit } })
        : callRoute('sharedDatasetRows', { params: { token: access.token, datasetId }, query: { offset, limit } }),
    enabled,
    staleTime: Infinity,
    placeholderData: keepPreviousData,
  });
}
