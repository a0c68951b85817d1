import { useMutation, useQueryClient } from '@tanstack/react-query';
import { workspaceParams } from '@shared/api';
import { callRoute } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** Path parameters only; this is the schema the server validates them with. */
export const deleteWorkspaceInputSchema = workspaceParams;

export function deleteWorkspace({ workspaceId }: { workspaceId: string }) {
  return callRoute('deleteWorkspace', { params: { workspaceId } });
}

export function useDeleteWorkspace() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: deleteWorkspace,
    onSuccess: (_void, { workspaceId }) => {
      qc.removeQueries({ queryKey: queryKeys.workspace(workspaceId) });
      return qc.invalidateQueries({ queryKey: queryKeys.workspaceList });
    },
  });
}
