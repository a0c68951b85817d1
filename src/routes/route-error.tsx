import { isRouteErrorResponse, Link, useRouteError } from 'react-router-dom';
import { Banner } from '@/components/ui/banner';
import { buttonClass } from '@/components/ui/button';
import { errorMessage, isApiError } from '@/lib/api-client';
import { NotFound } from '@/components/not-found';

/** What a route shows when its loader or rendering fails. */
export function RouteError() {
  const error = useRouteError();
  if ((isRouteErrorResponse(error) && error.status === 404) || (isApiError(error) && error.status === 404)) {
    return <NotFound />;
  }
  const message = isRouteErrorResponse(error) ? `${error.status} ${error.statusText}` : errorMessage(error);
  return (
    <div className="mx-auto flex max-w-xl flex-col gap-4 px-6 py-16">
      <Banner
        tone="notice"
        title="This page could not be shown"
        action={
          <button type="button" className={buttonClass('secondary', 'sm')} onClick={() => window.location.reload()}>
            Reload
          </button>
        }
      >
        {message}
      </Banner>
      <Link to="/" className="text-sm text-ink-soft underline underline-offset-4 hover:text-ink">
        Back to your workspaces
      </Link>
    </div>
  );
}
