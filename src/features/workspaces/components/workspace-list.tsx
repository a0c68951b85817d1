import { Link } from 'react-router-dom';
import type { Workspace } from '@shared/api';
import { EmptyState } from '@/components/ui/empty-state';
import { RoleBadge } from '@/components/role-badge';
import { formatDate } from '@/lib/format';

export function WorkspaceList({ workspaces }: { workspaces: Workspace[] }) {
  if (workspaces.length === 0) {
    return (
      <EmptyState title="No workspaces yet">
        A workspace holds notebooks, data and fits for one project, and the people who work on it. Create your first one
        above, or open an invitation someone sent you.
      </EmptyState>
    );
  }
  const sorted = [...workspaces].sort((a, b) => a.name.localeCompare(b.name));
  return (
    <ul className="grid gap-3 sm:grid-cols-2" aria-label="Your workspaces">
      {sorted.map((w) => (
        <li key={w.id}>
          <Link
            to={`/w/${w.id}`}
            className="sheet group flex h-full flex-col gap-4 p-5 transition-colors hover:border-rule-strong"
          >
            <div className="flex items-start justify-between gap-3">
              <span className="text-[1.05rem] font-semibold break-words group-hover:underline group-hover:underline-offset-4">
                {w.name}
              </span>
              <RoleBadge role={w.role} />
            </div>
            <span className="text-xs text-ink-faint">
              Created <span className="num">{formatDate(w.createdAt)}</span>
            </span>
          </Link>
        </li>
      ))}
    </ul>
  );
}
