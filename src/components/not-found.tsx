import { Link } from 'react-router-dom';
import { buttonClass } from '@/components/ui/button';
import { PageTitle } from '@/components/page-title';

/** The 404 message with a line that stops short of its second anchor. */
export function NotFound({ title = 'Nothing at this address', children }: { title?: string; children?: React.ReactNode }) {
  return (
    <div className="flex min-h-[60vh] flex-col items-center justify-center gap-6 px-6 text-center">
      <PageTitle>{title}</PageTitle>
      <svg viewBox="0 0 220 80" aria-hidden="true" className="h-20 w-56 text-ink-faint">
        <path d="M12 74 L22 20 L32 74" fill="none" stroke="currentColor" strokeWidth="1.5" strokeLinejoin="round" />
        <path d="M22 20 Q70 70 110 60" fill="none" className="stroke-slack" strokeWidth="1.75" strokeLinecap="round" />
        <path d="M110 60 L118 66" fill="none" stroke="currentColor" strokeWidth="1.5" strokeLinecap="round" strokeDasharray="2 4" />
        <path d="M188 74 L198 20 L208 74" fill="none" stroke="currentColor" strokeWidth="1.5" strokeLinejoin="round" />
      </svg>
      <div className="flex flex-col gap-2">
        <p className="num text-sm text-ink-faint">404</p>
        <h1 className="text-2xl font-semibold tracking-tight">{title}</h1>
        <div className="max-w-md text-ink-soft">
          {children ?? 'The line stops short here: the page was moved, deleted, or never existed.'}
        </div>
      </div>
      <Link to="/" className={buttonClass('secondary')}>
        Go to your workspaces
      </Link>
    </div>
  );
}

