import { useMutation, useQueryClient } from '@tanstack/react-query';
import { createShareLinkBody, type CreateShareLinkBody } from '@shared/api';
import { callRoute } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

export const createShareLinkInputSchema = createShareLinkBody;

/** The client route that reads a shared notebook. */
export function sharePath(token: string): string {
  return `/s/${encodeURIComponent(token)}`;
}

export async function createShareLink({
  workspaceId,
  notebookId,
  ...body
}: CreateShareLinkBody & { workspaceId: string; notebookId: string }) {
  const res = await callRoute('createShareLink', { params: { workspaceId, notebookId }, body });
  return { ...res, url: new URL(sharePath(res.token), window.location.origin).toString() };
}

export function useCreateShareLink() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: createShareLink,
    onSuccess: (_r, { workspaceId, notebookId }) =>
      qc.invalidateQueries({ queryKey: queryKeys.shareLinks(workspaceId, notebookId) }),
  });
}
