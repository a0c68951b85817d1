import type { AuditEntry, Member } from '@shared/api';
import { EmptyState } from '@/components/ui/empty-state';
import { formatDateTime } from '@/lib/format';
import { describeEntry } from './describe-entry';

/** The workspace's record of role changes, invitations, links and deletions, newest first. */
export function AuditList({ entries, members }: { entries: AuditEntry[]; members: Member[] }) {
  if (entries.length === 0) {
    return (
      <EmptyState title="Nothing recorded yet">
        Role changes, invitations, share links and deletions in this workspace are recorded here.
      </EmptyState>
    );
  }
  const names = new Map(members.map((m) => [m.userId, m.name]));
  return (
    <ol className="sheet divide-y divide-rule/70" aria-label="Activity">
      {entries.map((e) => (
        <li key={e.id} className="grid gap-1 px-5 py-3 text-sm sm:grid-cols-[11rem_minmax(0,1fr)] sm:gap-6">
          <time className="num text-xs leading-5 text-ink-faint" dateTime={e.createdAt}>
            {formatDateTime(e.createdAt)}
          </time>
          <p>
            <span className="font-medium">{e.actor?.name ?? 'Someone no longer here'}</span>{' '}
            <span className="text-ink-soft">{describeEntry(e, names)}</span>
          </p>
        </li>
      ))}
    </ol>
  );
}
