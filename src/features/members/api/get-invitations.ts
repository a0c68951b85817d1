import { queryOptions, useQuery } from '@tanstack/react-query';
import { callRoute } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

export async function getInvitations(workspaceId: string) {
  const { invitations } = await callRoute('listInvitations', { params: { workspaceId } });
  return invitations;
}

export const invitationsQueryOptions = (workspaceId: string) =>
  queryOptions({ queryKey: queryKeys.invitations(workspaceId), queryFn: () => getInvitations(workspaceId) });

/** Only owners may list invitations; pass `enabled: false` for everyone else. */
export function useInvitations(workspaceId: string, enabled = true) {
  return useQuery({ ...invitationsQueryOptions(workspaceId), enabled });
}
