/** Queues the comparison a compare cell describes (with its draft settings), optionally with the prior scales halved and doubled. */
import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { CompareContent } from '@shared/api/compare';
import { callRoute } from '@/lib/api-client';
import { compareRunsKey } from './get-compare-runs';

export function useQueueCompare(workspaceId: string, notebookId: string, cellId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (v: { content: CompareContent; sensitivity: boolean }) => callRoute('queueCompareRun', { params: { workspaceId, notebookId, cellId }, body: v }),
    onSuccess: () => qc.invalidateQueries({ queryKey: compareRunsKey({ mode: 'member', workspaceId, notebookId }, cellId) }),
  });
}
