import { describe, expect, it } from 'vitest';
import type { AuditEntry } from '@shared/api';
import { describeEntry } from '@/features/audit/components/describe-entry';

const entry = (action: string, targetId: string, detail: Record<string, unknown> | null): AuditEntry => ({
  id: 'a1',
  action,
  actor: { id: 'u1', name: 'Ana' },
  targetType: 'member',
  targetId,
  detail,
  createdAt: '2026-12-01T09:00:00.000Z',
});

describe('audit sentences', () => {
  const names = new Map([['u2', 'Bo']]);
  it('names the member and both roles of a role change', () => {
    expect(describeEntry(entry('member.role_changed', 'u2', { from: 'editor', to: 'owner' }), names)).toBe(
      'changed Bo’s role from Editor to Owner',
    );
  });
  it('falls back when the member is gone or the detail is odd', () => {
    expect(describeEntry(entry('member.removed', 'u9', null), names)).toBe('removed a former member');
    expect(describeEntry(entry('member.joined', 'u2', { role: 'superuser' }), names)).toBe('joined as another role');
  });
  it('describes invitations, links and deletions', () => {
    expect(describeEntry(entry('invitation.created', 'i1', { email: 'bo@x.test', role: 'reviewer' }))).toBe('invited bo@x.test as Reviewer');
    expect(describeEntry(entry('share_link.created', 'l1', { expiresAt: null }))).toBe('created a read-only link that does not expire');
    expect(describeEntry(entry('notebook.deleted', 'n1', { title: 'Reach 4' }))).toBe('deleted the notebook “Reach 4”');
  });
  it('says why a link was revoked with its creator\'s rights', () => {
    expect(describeEntry(entry('share_link.revoked', 'l1', { reason: 'creator_demoted' }))).toBe(
      'revoked a read-only link because its creator is no longer an editor',
    );
    expect(describeEntry(entry('share_link.revoked', 'l1', { reason: 'creator_left' }))).toBe(
      'revoked a read-only link because its creator left the workspace',
    );
    expect(describeEntry(entry('share_link.revoked', 'l1', {}))).toBe('revoked a read-only link');
  });
  it('still says something for an action it does not know', () => {
    expect(describeEntry(entry('run.cancelled', 'r1', null))).toBe('run cancelled (member)');
  });
});
