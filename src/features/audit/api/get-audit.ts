import { queryOptions, useQuery } from '@tanstack/react-query';
import { callRoute } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** The workspace's audit log, newest first (owners only). */
export async function getAudit(workspaceId: string) {
  const { entries } = await callRoute('listAudit', { params: { workspaceId } });
  return entries;
}

export const auditQueryOptions = (workspaceId: string) =>
  queryOptions({ queryKey: queryKeys.audit(workspaceId), queryFn: () => getAudit(workspaceId), staleTime: 0 });

export function useAudit(workspaceId: string) {
  return useQuery(auditQueryOptions(workspaceId));
}
