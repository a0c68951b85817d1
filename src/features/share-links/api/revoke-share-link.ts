import { useMutation, useQueryClient } from '@tanstack/react-query';
import { shareLinkParams } from '@shared/api';
import { callRoute } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** Path parameters only; this is the schema the server validates them with. */
export const revokeShareLinkInputSchema = shareLinkParams;

export function revokeShareLink(p: { workspaceId: string; notebookId: string; linkId: string }) {
  return callRoute('revokeShareLink', { params: p });
}

export function useRevokeShareLink() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: revokeShareLink,
    onSuccess: (_v, { workspaceId, notebookId }) =>
      Promise.all([
        qc.invalidateQueries({ queryKey: queryKeys.shareLinks(workspaceId, notebookId) }),
        qc.invalidateQueries({ queryKey: queryKeys.workspaceShareLinks(workspaceId) }),
      ]),
  });
}
