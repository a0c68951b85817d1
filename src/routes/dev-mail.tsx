import { useState } from 'react';
import { Link } from 'react-router-dom';
import type { CapturedMail } from '@shared/api';
import { PageHeader } from '@/components/layout/page-header';
import { PageTitle } from '@/components/page-title';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { EmptyState } from '@/components/ui/empty-state';
import { Input } from '@/components/ui/input';
import { LoadingBlock } from '@/components/ui/spinner';
import { Logo } from '@/components/ui/logo';
import { useMail } from '@/features/dev-mail/api/get-mail';
import { errorMessage, isApiError } from '@/lib/api-client';
import { formatDateTime } from '@/lib/format';

const URL_RE = /(https?:\/\/[^\s<>"')]+)/g;

/** Plain text with every http(s) address turned into a link; same-site links stay in the app. */
export function LinkifiedText({ text }: { text: string }) {
  const parts = text.split(URL_RE);
  return (
    <>
      {parts.map((part, i) => {
        if (i % 2 === 0) return <span key={i}>{part}</span>;
        let sameSite: string | null = null;
        try {
          const u = new URL(part);
          if (u.origin === window.location.origin) sameSite = u.pathname + u.search + u.hash;
        } catch {
          // not a URL after all: left as text below
        }
        return sameSite ? (
          <Link key={i} to={sameSite} className="break-all text-ink underline underline-offset-4">
            {part}
          </Link>
        ) : (
          <a key={i} href={part} className="break-all text-ink underline underline-offset-4">
            {part}
          </a>
        );
      })}
    </>
  );
}

function Message({ m }: { m: CapturedMail }) {
  return (
    <article className="sheet flex flex-col gap-3 p-5" aria-label={m.subject}>
      <header className="flex flex-wrap items-baseline justify-between gap-2">
        <h2 className="font-semibold">{m.subject}</h2>
        <time className="num text-xs text-ink-faint" dateTime={m.createdAt}>
          {formatDateTime(m.createdAt)}
        </time>
      </header>
      <dl className="grid grid-cols-[auto_1fr] gap-x-4 text-xs text-ink-soft">
        <dt className="text-ink-faint">From</dt>
        <dd>{m.from}</dd>
        <dt className="text-ink-faint">To</dt>
        <dd>{m.to.join(', ')}</dd>
      </dl>
      <pre className="font-sans text-sm leading-relaxed whitespace-pre-wrap text-ink">
        <LinkifiedText text={m.text} />
      </pre>
    </article>
  );
}

/** Development only: mail the app sent, as captured by the local SMTP catcher. */
export default function DevMailRoute() {
  const [to, setTo] = useState('');
  const [filter, setFilter] = useState('');
  const mail = useMail(filter);

  return (
    <div className="min-h-screen px-6 py-10">
      <PageTitle>Captured mail</PageTitle>
      <div className="mx-auto flex max-w-4xl flex-col gap-8">
        <Link to="/" aria-label="Slackline home" className="self-start">
          <Logo />
        </Link>
        <PageHeader
          eyebrow="Development"
          title="Captured mail"
          meta="Messages the app sent while running locally. Nothing here left this machine."
        />
        <form
          className="flex items-end gap-2"
          onSubmit={(e) => {
            e.preventDefault();
            setFilter(to.trim().toLowerCase());
          }}
        >
          <Input label="Recipient" placeholder="all recipients" value={to} onChange={(e) => setTo(e.target.value)} className="flex-1" />
          <Button type="submit" variant="secondary">
            Filter
          </Button>
        </form>
        {mail.isPending ? (
          <LoadingBlock label="Loading mail…" />
        ) : mail.isError ? (
          isApiError(mail.error) && mail.error.status === 404 ? (
            <Banner tone="notice" title="Not available">
              The mail capture exists only in development and tests.
            </Banner>
          ) : isApiError(mail.error) && mail.error.status === 403 ? (
            <Banner tone="notice" title="This page needs the key of this start">
              Captured mail holds password-reset and invitation links, so it opens only with the link the server printed when
              it started (<code>…/dev/mail?key=…</code>). Open that link once in this browser; signed in, you can also read
              mail sent to your own address here.
            </Banner>
          ) : (
            <Banner tone="notice" title="Could not load the captured mail">
              {errorMessage(mail.error)}
            </Banner>
          )
        ) : mail.data.length === 0 && mail.data.scope === 'own' ? (
          <EmptyState title="No mail to your address">Without the key printed at start, only mail sent to your own address is shown here.</EmptyState>
        ) : mail.data.length === 0 ? (
          <EmptyState title="No mail captured yet">Invitations and password resets sent from here will show up within a few seconds.</EmptyState>
        ) : (
          <div className="flex flex-col gap-4">
            {mail.data.map((m) => (
              <Message key={m.id} m={m} />
            ))}
          </div>
        )}
      </div>
    </div>
  );
}
