import { useMutation, useQueryClient } from '@tanstack/react-query';
import { createInvitationBody, type CreateInvitationBody } from '@shared/api';
import { callRoute } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

export const createInvitationInputSchema = createInvitationBody;
/** Roles an invitation can grant (owners are made by promotion after joining). */
export const INVITABLE_ROLES = createInvitationBody.shape.role.options;

export async function createInvitation({ workspaceId, ...body }: CreateInvitationBody & { workspaceId: string }) {
  const { invitation } = await callRoute('createInvitation', { params: { workspaceId }, body });
  return invitation;
}

export function useCreateInvitation() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: createInvitation,
    onSuccess: (_i, { workspaceId }) => qc.invalidateQueries({ queryKey: queryKeys.invitations(workspaceId) }),
  });
}
