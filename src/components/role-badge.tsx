import type { Role } from '@shared/api';
import { Badge } from '@/components/ui/badge';

export const ROLE_LABEL: Record<Role, string> = {
  owner: 'Owner',
  editor: 'Editor',
  reviewer: 'Reviewer',
  viewer: 'Viewer',
};

/** What each role may do, as a phrase that follows "can …". */
export const ROLE_DESCRIPTION: Record<Role, string> = {
  owner: 'do everything, including members, roles, share links and deleting the workspace',
  editor: 'write cells, run fits and manage share links',
  reviewer: 'read and comment',
  viewer: 'read only',
};

export function RoleBadge({ role }: { role: Role }) {
  return <Badge tone={role === 'owner' ? 'outline' : 'plain'}>{ROLE_LABEL[role]}</Badge>;
}
