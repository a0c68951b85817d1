import type { Member } from '@shared/api';
import { isApiError } from '@/lib/api-client';

/** True when this member is the workspace's only owner (who can neither be demoted, removed, nor leave). */
export function isLastOwner(member: Pick<Member, 'role' | 'userId'>, members: ReadonlyArray<Pick<Member, 'role'>>): boolean {
  return member.role === 'owner' && members.filter((m) => m.role === 'owner').length === 1;
}

export const LAST_OWNER_TITLE = 'A workspace always keeps at least one owner';
export const LAST_OWNER_HELP = 'Make another member an owner first; then this owner can step down, be removed, or leave.';

export function isLastOwnerError(e: unknown): boolean {
  return isApiError(e) && e.code === 'last_owner';
}
