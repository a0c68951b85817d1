import { useMutation, useQueryClient } from '@tanstack/react-query';
import { changeRoleBody, type ChangeRoleBody } from '@shared/api';
import { callRoute } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

export const changeRoleInputSchema = changeRoleBody;

export async function changeRole({ workspaceId, userId, ...body }: ChangeRoleBody & { workspaceId: string; userId: string }) {
  const { member } = await callRoute('changeRole', { params: { workspaceId, userId }, body });
  return member;
}

export function useChangeRole() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: changeRole,
    onSuccess: (_m, { workspaceId }) =>
      Promise.all([
        qc.invalidateQueries({ queryKey: queryKeys.members(workspaceId) }),
        // the caller may have changed their own role
        qc.invalidateQueries({ queryKey: queryKeys.workspace(workspaceId), exact: true }),
        qc.invalidateQueries({ queryKey: queryKeys.workspaceList }),
      ]),
  });
}
