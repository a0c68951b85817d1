import { Link, NavLink, Outlet, useNavigate, useNavigation } from 'react-router-dom';
import type { User } from '@shared/api';
import { Logo } from '@/components/ui/logo';
import { Button } from '@/components/ui/button';
import { useMe } from '@/features/auth/api/get-me';
import { useSignOut } from '@/features/auth/api/sign-out';
import { errorMessage } from '@/lib/api-client';
import { cn } from '@/lib/cn';

/** Thin bar at the very top while a route's data is loading. */
export function NavigationProgress() {
  const navigation = useNavigation();
  if (navigation.state === 'idle') return null;
  return (
    <div role="progressbar" aria-label="Loading page" className="fixed inset-x-0 top-0 z-50 h-0.5 overflow-hidden bg-rule">
      <div className="h-full w-1/3 animate-[slide_1.1s_ease-in-out_infinite] bg-ink" />
    </div>
  );
}

function UserMenu({ user }: { user: User }) {
  const signOut = useSignOut();
  const navigate = useNavigate();
  return (
    <div className="flex items-center gap-3">
      <div className="hidden text-right sm:block">
        <p className="text-[0.8125rem] leading-tight font-medium text-ink">{user.name}</p>
        <p className="text-xs leading-tight text-ink-faint">{user.email}</p>
      </div>
      <Button
        variant="secondary"
        size="sm"
        pending={signOut.isPending}
        onClick={() => signOut.mutate(undefined, { onSuccess: () => navigate('/sign-in', { replace: true }) })}
        title={signOut.isError ? errorMessage(signOut.error) : undefined}
      >
        Sign out
      </Button>
    </div>
  );
}

/** The frame of every signed-in page: a quiet top bar and a centred column. */
export function AppShell() {
  const me = useMe();
  return (
    <div className="flex min-h-screen flex-col">
      <header className="border-b border-rule bg-sheet/80 backdrop-blur-sm">
        <div className="mx-auto flex h-14 max-w-6xl items-center justify-between gap-4 px-4 sm:gap-6 sm:px-6">
          <div className="flex items-center gap-8">
            <Link to="/" aria-label="Slackline home">
              <Logo />
            </Link>
            <nav aria-label="Main" className="flex items-center gap-1 text-sm">
              <NavLink
                to="/"
                end
                className={({ isActive }) =>
                  cn('rounded-md px-2.5 py-1.5 text-ink-soft hover:text-ink', isActive && 'bg-sheet-dim text-ink')
                }
              >
                Workspaces
              </NavLink>
            </nav>
          </div>
          {me.data && <UserMenu user={me.data} />}
        </div>
      </header>
      <div className="mx-auto w-full max-w-6xl flex-1 px-3 py-6 sm:px-6 sm:py-10">
        <Outlet />
      </div>
      <footer className="border-t border-rule/70">
        <div className="mx-auto flex max-w-6xl items-center justify-between px-4 py-4 text-xs sm:px-6 text-ink-faint">
          <span>Slackline — Bayesian fits inside linear constraints</span>
        </div>
      </footer>
    </div>
  );
}
