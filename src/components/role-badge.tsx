import type { Role } from '@shared/api';
import { Badge } from '@/components/ui/badge';

export const ROLE_LABEL: Record<Role, string> = {
  owner: 'Owner',
  editor: 'Editor',
  reviewer: 'Reviewer',
  viewer: 'Viewer',
};

export const ROLE_DESCRIPTION: Record<Role, string> = {
  owner: 'everything, plus members, roles, links and deleting the workspace',
  editor: 'writes cells, runs fits, manages share links',
  reviewer: 'reads and comments',
  viewer: 'reads only',
};

export function RoleBadge({ role }: { role: Role }) {
  return <Badge tone={role === 'owner' ? 'outline' : 'plain'}>{ROLE_LABEL[role]}</Badge>;
}
