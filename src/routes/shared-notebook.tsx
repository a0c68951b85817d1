import type { QueryClient } from '@tanstack/react-query';
import { Link, useParams, type LoaderFunctionArgs } from 'react-router-dom';
import { PageTitle } from '@/components/page-title';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { LoadingBlock } from '@/components/ui/spinner';
import { Logo } from '@/components/ui/logo';
import { NotebookView } from '@/features/notebook/components/notebook-view';
import { sharedNotebookQueryOptions, useSharedNotebook } from '@/features/share-links/api/get-shared-notebook';
import { errorMessage, isApiError } from '@/lib/api-client';
import { formatDateTime } from '@/lib/format';
import { NotFound } from '@/components/not-found';

export const makeLoader = (qc: QueryClient) => async ({ params }: LoaderFunctionArgs) => {
  await qc.prefetchQuery(sharedNotebookQueryOptions(params.token!));
  return null;
};

/** What the holder of a share link reads — no account needed, nothing can be changed. */
export default function SharedNotebookRoute() {
  const { token = '' } = useParams();
  const shared = useSharedNotebook(token);

  return (
    <div className="min-h-screen">
      <header className="border-b border-rule bg-sheet/80">
        <div className="mx-auto flex h-14 max-w-5xl items-center justify-between px-6">
          <Link to="/" aria-label="Slackline home">
            <Logo />
          </Link>
          <span className="eyebrow">Shared notebook</span>
        </div>
      </header>
      <main className="mx-auto flex max-w-5xl flex-col gap-8 px-6 py-10">
        {shared.isPending ? (
          <LoadingBlock label="Opening the shared notebook…" />
        ) : shared.isError ? (
          isApiError(shared.error) && (shared.error.status === 404 || shared.error.status === 400) ? (
            <NotFound title="This link does not open anything">
              It was revoked, it has expired, or it was copied incompletely. Ask the person who shared it for a new
              one.
            </NotFound>
          ) : (
            <Banner
              tone="notice"
              title="Could not open the shared notebook"
              action={
                <Button variant="secondary" size="sm" onClick={() => void shared.refetch()}>
                  Try again
                </Button>
              }
            >
              {errorMessage(shared.error)}
            </Banner>
          )
        ) : (
          <>
            <PageTitle>{`${shared.data.notebook.title} (read-only)`}</PageTitle>
            <Banner tone="info" title="Read-only view" role="status">
              You are reading this notebook through a share link from the workspace “{shared.data.workspaceName}”. Nothing
              here can be changed.
              {shared.data.expiresAt ? (
                <>
                  {' '}
                  The link works until <span className="num whitespace-nowrap">{formatDateTime(shared.data.expiresAt)}</span>.
                </>
              ) : null}
            </Banner>
            <div className="flex flex-col gap-1.5">
              <div className="eyebrow">{shared.data.workspaceName}</div>
              <h1 className="text-[1.75rem] leading-tight font-semibold tracking-tight">{shared.data.notebook.title}</h1>
              <p className="text-sm text-ink-soft">
                <span className="num">{shared.data.cells.length}</span> {shared.data.cells.length === 1 ? 'cell' : 'cells'}
                <span className="text-ink-faint">
                  {' '}
                  · last change <span className="num">{formatDateTime(shared.data.notebook.updatedAt)}</span>
                </span>
              </p>
            </div>
            <NotebookView access={{ mode: 'share', token, notebookId: shared.data.notebook.id }} cells={shared.data.cells} canEdit={false} canComment={false} />
          </>
        )}
      </main>
    </div>
  );
}
