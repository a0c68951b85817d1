import { useMutation, useQueryClient } from '@tanstack/react-query';
import { callRoute } from '@/lib/api-client';
import { nbKeys } from './keys';

export function useCreateComment(workspaceId: string, notebookId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (v: { cellId: string; body: string; replyTo: string | null }) =>
      callRoute('createComment', { params: { workspaceId, notebookId, cellId: v.cellId }, body: { body: v.body, replyTo: v.replyTo } }),
    onSuccess: () => qc.invalidateQueries({ queryKey: nbKeys.comments(workspaceId, notebookId) }),
  });
}
