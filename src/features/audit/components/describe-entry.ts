import { ROLES, type AuditEntry, type Role } from '@shared/api';
import { ROLE_LABEL } from '@/components/role-badge';
import { formatDateTime } from '@/lib/format';

const str = (v: unknown): string | undefined => (typeof v === 'string' && v.length > 0 ? v : undefined);
const role = (v: unknown): string => (ROLES.includes(v as Role) ? ROLE_LABEL[v as Role] : 'another role');

/**
 * One audit row as a sentence that follows the actor's name. `names` maps user ids to the names
 * of current members, for rows about a member.
 */
export function describeEntry(entry: AuditEntry, names: ReadonlyMap<string, string> = new Map()): string {
  const d = entry.detail ?? {};
  const who = names.get(entry.targetId) ?? 'a former member';
  switch (entry.action) {
    case 'workspace.renamed':
      return `renamed the workspace from “${str(d.from) ?? '?'}” to “${str(d.to) ?? '?'}”`;
    case 'workspace.deleted':
      return `deleted the workspace “${str(d.name) ?? '?'}”`;
    case 'member.role_changed':
      return `changed ${who}’s role from ${role(d.from)} to ${role(d.to)}`;
    case 'member.removed':
      return `removed ${who}`;
    case 'member.left':
      return 'left the workspace';
    case 'member.joined':
      return `joined as ${role(d.role)}`;
    case 'invitation.created':
      return `invited ${str(d.email) ?? 'someone'} as ${role(d.role)}`;
    case 'invitation.revoked':
      return `revoked the invitation for ${str(d.email) ?? 'someone'}`;
    case 'notebook.deleted':
      return `deleted the notebook “${str(d.title) ?? '?'}”`;
    case 'share_link.created':
      return str(d.expiresAt)
        ? `created a read-only link, valid until ${formatDateTime(str(d.expiresAt)!)}`
        : 'created a read-only link that does not expire';
    case 'share_link.revoked':
      if (d.reason === 'creator_demoted') return 'revoked a read-only link because its creator is no longer an editor';
      if (d.reason === 'creator_removed' || d.reason === 'creator_left') return 'revoked a read-only link because its creator left the workspace';
      return 'revoked a read-only link';
    default:
      return `${entry.action.replace(/[._]/g, ' ')} (${entry.targetType})`;
  }
}
