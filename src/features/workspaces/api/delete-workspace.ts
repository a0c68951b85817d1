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
      // only when no page shows it any more: removing a watched query would refetch a deleted workspace
      qc.removeQueries({ queryKey: queryKeys.workspace(workspaceId), type: 'inactive' });
      return qc.invalidateQueries({ queryKey: queryKeys.workspaceList });
    },
  });
}
