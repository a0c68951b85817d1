import { queryOptions } from '@tanstack/react-query';
import { callRoute } from '@/lib/api-client';
import type { NotebookAccess } from './access';
import { nbKeys } from './keys';

/** A dataset's description and preview rows, for a member or a share-link visitor. */
export const datasetQuery = (access: NotebookAccess, datasetId: string) =>
  queryOptions({
    queryKey: access.mode === 'member' ? nbKeys.dataset(access.workspaceId, datasetId) : nbKeys.shared.dataset(access.token, datasetId),
    queryFn: () =>
      access.mode === 'member'
        ? callRoute('getDataset', { params: { workspaceId: access.workspaceId, datasetId } })
        : callRoute('sharedDataset', { params: { token: access.token, datasetId } }),
    staleTime: Infinity,
  });
