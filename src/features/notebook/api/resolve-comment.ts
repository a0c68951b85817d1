import { useMutation, useQueryClient } from '@tanstack/react-query';
import { callRoute } from '@/lib/api-client';
import { nbKeys } from './keys';

export function useResolveComment(workspaceId: string, notebookId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (v: { commentId: string; resolved: boolean }) =>
      callRoute('resolveComment', { params: { workspaceId, notebookId, commentId: v.commentId }, body: { resolved: v.resolved } }),
    onSuccess: () => qc.invalidateQueries({ queryKey: nbKeys.comments(workspaceId, notebookId) }),
  });
}
