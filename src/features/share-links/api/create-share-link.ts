import { useMutation, useQueryClient } from '@tanstack/react-query';
import { clientPaths, createShareLinkBody, type CreateShareLinkBody } from '@shared/api';
import { callRoute } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

export const createShareLinkInputSchema = createShareLinkBody;

export async function createShareLink({
  workspaceId,
  notebookId,
  ...body
}: CreateShareLinkBody & { workspaceId: string; notebookId: string }) {
  const res = await callRoute('createShareLink', { params: { workspaceId, notebookId }, body });
  // the answer names the client page to open; fall back to the shared table of client paths
  const path = res.path || clientPaths.share(res.token);
  return { ...res, url: new URL(path, window.location.origin).toString() };
}

export function useCreateShareLink() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: createShareLink,
    onSuccess: (_r, { workspaceId, notebookId }) =>
      qc.invalidateQueries({ queryKey: queryKeys.shareLinks(workspaceId, notebookId) }),
  });
}
