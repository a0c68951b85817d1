import type { ComponentType } from 'react';
import type { QueryClient } from '@tanstack/react-query';
import { createBrowserRouter, matchPath, redirect, type LoaderFunctionArgs, type RouteObject } from 'react-router-dom';
import { AppShell } from '@/components/layout/app-shell';
import { LoadingBlock } from '@/components/ui/spinner';
import { meQueryOptions } from '@/features/auth/api/get-me';
import { notebookQueryOptions } from '@/features/notebook/api/get-notebook';
import { RouteError } from '@/routes/route-error';
import { safeNext, withNext } from '@/lib/safe-next';
import { RootLayout } from './root-layout';

type RouteModule = { default: ComponentType; makeLoader?: (qc: QueryClient) => RouteObject['loader'] };

/** Lazy route: the page's code is fetched on first visit; its loader prefetches through the query client. */
const lazyRoute = (qc: QueryClient, load: () => Promise<RouteModule>) => async () => {
  const m = await load();
  return { Component: m.default, ...(m.makeLoader ? { loader: m.makeLoader(qc) } : {}) };
};

/** Pages for signed-in people: anyone else is sent to sign in and brought back afterwards. */
const requireUser = (qc: QueryClient) => async ({ request }: LoaderFunctionArgs) => {
  const me = await qc.ensureQueryData(meQueryOptions());
  if (!me) {
    const url = new URL(request.url);
    throw redirect(withNext('/sign-in', url.pathname + url.search));
  }
  return null;
};

/** Sign-in and sign-up: someone already signed in goes on to where they were heading. */
const guestOnly = (qc: QueryClient) => async ({ request }: LoaderFunctionArgs) => {
  const me = await qc.ensureQueryData(meQueryOptions());
  if (me) throw redirect(safeNext(new URL(request.url).searchParams.get('next')));
  return null;
};

const NOTEBOOK_PATH = '/w/:workspaceId/n/:notebookId';

/**
 * Opening a notebook by its address: ask for the notebook screen's one request (getNotebookPage) at
 * once, beside the session check and the route's code, instead of after both. The route's loader
 * then finds the request under way. The page route checks access itself: signed out it answers 401
 * (the session check sends the person to sign in either way), not a member 404 (the route's answer).
 */
export function prefetchFirstScreen(qc: QueryClient, pathname: string): void {
  const m = matchPath(NOTEBOOK_PATH, pathname);
  if (m?.params.workspaceId && m.params.notebookId) void qc.prefetchQuery(notebookQueryOptions(m.params.workspaceId, m.params.notebookId));
}

export function createRoutes(qc: QueryClient): RouteObject[] {
  const lazy = (load: () => Promise<RouteModule>) => lazyRoute(qc, load);
  return [
    {
      element: <RootLayout />,
      errorElement: <RouteError />,
      hydrateFallbackElement: <LoadingBlock />,
      children: [
        { path: '/sign-in', loader: guestOnly(qc), lazy: lazy(() => import('@/routes/sign-in')) },
        { path: '/sign-up', loader: guestOnly(qc), lazy: lazy(() => import('@/routes/sign-up')) },
        { path: '/confirm-sign-up', lazy: lazy(() => import('@/routes/confirm-sign-up')) },
        { path: '/forgot-password', lazy: lazy(() => import('@/routes/forgot-password')) },
        { path: '/reset-password', lazy: lazy(() => import('@/routes/reset-password')) },
        { path: '/reset-password/:token', lazy: lazy(() => import('@/routes/reset-password')) },
        { path: '/invite/:token', lazy: lazy(() => import('@/routes/invite')) },
        { path: '/invitations/accept', lazy: lazy(() => import('@/routes/invite')) },
        { path: '/s/:token', lazy: lazy(() => import('@/routes/shared-notebook')) },
        { path: '/share/:token', lazy: lazy(() => import('@/routes/shared-notebook')) },
        { path: '/dev/mail', lazy: lazy(() => import('@/routes/dev-mail')) },
        {
          element: <AppShell />,
          loader: requireUser(qc),
          errorElement: <RouteError />,
          children: [
            { index: true, lazy: lazy(() => import('@/routes/workspaces')) },
            {
              path: '/w/:workspaceId',
              lazy: lazy(() => import('@/routes/workspace-layout')),
              children: [
                { index: true, lazy: lazy(() => import('@/routes/workspace-notebooks')) },
                { path: 'members', lazy: lazy(() => import('@/routes/workspace-members')) },
                { path: 'activity', lazy: lazy(() => import('@/routes/workspace-activity')) },
              ],
            },
            { path: NOTEBOOK_PATH, lazy: lazy(() => import('@/routes/notebook')) },
          ],
        },
        { path: '*', lazy: lazy(() => import('@/routes/not-found')) },
      ],
    },
  ];
}

export function createAppRouter(qc: QueryClient) {
  prefetchFirstScreen(qc, window.location.pathname);
  return createBrowserRouter(createRoutes(qc));
}
