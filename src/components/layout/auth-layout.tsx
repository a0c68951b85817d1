import type { ReactNode } from 'react';
import { Link } from 'react-router-dom';
import { Logo } from '@/components/ui/logo';
import { FeasibleFigure } from '@/components/feasible-figure';
import { PageTitle } from '@/components/page-title';

/** Sign-in, sign-up and password pages: a form on a sheet beside the region-and-draws figure. */
export function AuthLayout({ title, subtitle, children, footer }: { title: string; subtitle?: ReactNode; children: ReactNode; footer?: ReactNode }) {
  return (
    <div className="min-h-screen px-6 py-10">
      <PageTitle>{title}</PageTitle>
      <div className="mx-auto flex max-w-5xl flex-col gap-12">
        <Link to="/" className="self-start" aria-label="Slackline home">
          <Logo />
        </Link>
        <div className="grid items-center gap-14 md:grid-cols-[minmax(0,26rem)_minmax(0,1fr)]">
          <main className="flex flex-col gap-6">
            <div className="flex flex-col gap-2">
              <h1 className="text-[1.75rem] leading-tight font-semibold tracking-tight">{title}</h1>
              {subtitle && <p className="text-ink-soft">{subtitle}</p>}
            </div>
            <div className="sheet p-6">{children}</div>
            {footer && <div className="text-sm text-ink-soft">{footer}</div>}
          </main>
          <aside className="hidden md:flex md:flex-col md:gap-4 md:pl-6">
            <FeasibleFigure className="max-w-sm" />
            <p className="max-w-sm text-sm leading-relaxed text-ink-soft">
              Write the log-density and the linear constraints as they are. Slackline samples inside the region,
              tells you whether the run can be trusted, and keeps the notebook shared with your team.
            </p>
          </aside>
        </div>
      </div>
    </div>
  );
}
