import { useMutation, useQueryClient } from '@tanstack/react-query';
import { memberParams } from '@shared/api';
import { callRoute } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** Path parameters only; this is the schema the server validates them with. */
export const removeMemberInputSchema = memberParams;

export function removeMember({ workspaceId, userId }: { workspaceId: string; userId: string }) {
  return callRoute('removeMember', { params: { workspaceId, userId } });
}

export function useRemoveMember() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: removeMember,
    onSuccess: (_v, { workspaceId }) => qc.invalidateQueries({ queryKey: queryKeys.members(workspaceId) }),
  });
}
