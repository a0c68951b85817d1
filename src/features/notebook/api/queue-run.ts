import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { FitSettings } from '@shared/fit';
import { callRoute } from '@/lib/api-client';
import { nbKeys } from './keys';

/** Queues a fit of a model cell from a fit cell. */
export function useQueueRun(workspaceId: string, notebookId: string, cellId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (v: { settings: FitSettings; modelCellId: string }) => callRoute('createRun', { params: { workspaceId, notebookId, cellId }, body: v }),
    onSuccess: () => qc.invalidateQueries({ queryKey: nbKeys.cellRuns(workspaceId, notebookId, cellId) }),
  });
}
