/** Queue and cancel comparisons of a compare cell. */
import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { CompareContent } from '@shared/api/compare';
import { callRoute } from '@/lib/api-client';
import { compareRunsKey } from './get-compare-runs';

export function useCompareMutations(workspaceId: string, notebookId: string, cellId: string) {
  const qc = useQueryClient();
  const invalidate = () => qc.invalidateQueries({ queryKey: compareRunsKey({ mode: 'member', workspaceId, notebookId }, cellId) });
  return {
    queue: useMutation({
      mutationFn: (v: { content: CompareContent; sensitivity: boolean }) =>
        callRoute('queueCompareRun', { params: { workspaceId, notebookId, cellId }, body: v }),
      onSuccess: invalidate,
    }),
    cancel: useMutation({
      mutationFn: (runId: string) => callRoute('cancelCompareRun', { params: { workspaceId, runId }, body: {} }),
      onSuccess: invalidate,
    }),
  };
}
