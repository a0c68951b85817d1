/**
 * Helpers for the client's component tests: a fresh query client per test, a memory router, and a
 * `fetch` stand-in that answers per "METHOD /path" and records every request it saw.
 */
import type { ReactElement } from 'react';
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { render } from '@testing-library/react';
import { createMemoryRouter, RouterProvider, type RouteObject } from 'react-router-dom';
import { vi } from 'vitest';

export function testQueryClient() {
  return new QueryClient({
    defaultOptions: { queries: { retry: false, staleTime: Infinity }, mutations: { retry: false } },
  });
}

/** Renders `ui` at `path` inside the app's providers; more routes may be added around it. */
export function renderWithProviders(
  ui: ReactElement,
  { path = '/', pattern = '/', routes = [] as RouteObject[], client = testQueryClient() } = {},
) {
  const router = createMemoryRouter([{ path: pattern, element: ui }, ...routes], { initialEntries: [path] });
  const result = render(
    <QueryClientProvider client={client}>
      <RouterProvider router={router} />
    </QueryClientProvider>,
  );
  return { ...result, router, client };
}

export type Reply = { status: number; body?: unknown };
export type Handler = Reply | ((req: { method: string; url: string; body: unknown }) => Reply);
export type SeenRequest = { method: string; url: string; body: unknown };

/** Replaces global fetch. Unknown routes answer 404 in the API's error shape. */
export function mockFetch(handlers: Record<string, Handler>) {
  const seen: SeenRequest[] = [];
  const fn = vi.fn(async (input: RequestInfo | URL, init?: RequestInit) => {
    const url = typeof input === 'string' ? input : input instanceof URL ? input.toString() : input.url;
    const method = (init?.method ?? 'GET').toUpperCase();
    const body = typeof init?.body === 'string' ? JSON.parse(init.body) : undefined;
    const req = { method, url, body };
    seen.push(req);
    const key = `${method} ${url.split('?')[0]}`;
    const h = handlers[key];
    const reply: Reply = h
      ? typeof h === 'function'
        ? h(req)
        : h
      : { status: 404, body: { error: { code: 'not_found', message: `no handler for ${key}` } } };
    return new Response(reply.status === 204 || reply.body === undefined ? null : JSON.stringify(reply.body), {
      status: reply.status,
      headers: { 'Content-Type': 'application/json' },
    });
  });
  vi.stubGlobal('fetch', fn);
  return { fn, seen };
}

export const ISO = '2026-11-30T10:00:00.000Z';
