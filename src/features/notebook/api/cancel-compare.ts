/** Cancels a queued or running comparison of a compare cell. */
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { callRoute } from '@/lib/api-client';
import { compareRunsKey } from './get-compare-runs';

export function useCancelCompare(workspaceId: string, notebookId: string, cellId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (runId: string) => callRoute('cancelCompareRun', { params: { workspaceId, runId }, body: {} }),
    onSuccess: () => qc.invalidateQueries({ queryKey: compareRunsKey({ mode: 'member', workspaceId, notebookId }, cellId) }),
  });
}
