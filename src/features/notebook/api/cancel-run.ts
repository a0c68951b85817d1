import { useMutation, useQueryClient } from '@tanstack/react-query';
import { callRoute } from '@/lib/api-client';
import { nbKeys } from './keys';

export function useCancelRun(workspaceId: string, notebookId: string, cellId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (runId: string) => callRoute('cancelRun', { params: { workspaceId, runId }, body: {} }),
    onSuccess: () => qc.invalidateQueries({ queryKey: nbKeys.cellRuns(workspaceId, notebookId, cellId) }),
  });
}
