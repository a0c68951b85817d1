// @vitest-environment happy-dom
/**
 * Opening the app at a notebook's address asks for the notebook screen's one request at once
 * (prefetchFirstScreen, src/app/router.tsx), at the path the shared route table gives getNotebookPage;
 * other addresses ask for nothing. Two model editors mounted in the same render are both built at
 * once (the view reaches onView during the render's effects) and both end up in the page.
 */
import { QueryClient } from '@tanstack/react-query';
import { cleanup, render, waitFor } from '@testing-library/react';
import type { EditorView } from '@codemirror/view';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { routePath } from '@shared/api/routes';
import { prefetchFirstScreen } from '@/app/router';
import { ModelEditor } from '@/features/model-editor';

afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
});

function fetchSpy() {
  const spy = vi.fn(async () => new Response(JSON.stringify({ error: { code: 'not_found', message: 'Notebook not found' } }), { status: 404, headers: { 'Content-Type': 'application/json' } }));
  vi.stubGlobal('fetch', spy);
  return spy;
}

describe('the first screen of a notebook address', () => {
  it('starts the page request for /w/:workspaceId/n/:notebookId, at the route table path', async () => {
    const spy = fetchSpy();
    const qc = new QueryClient({ defaultOptions: { queries: { retry: false } } });
    prefetchFirstScreen(qc, '/w/ws1/n/nb1');
    await waitFor(() => expect(spy).toHaveBeenCalledTimes(1));
    const url = String((spy.mock.calls[0] as unknown[])[0]);
    expect(url).toBe(routePath('getNotebookPage', { workspaceId: 'ws1', notebookId: 'nb1' }));
  });

  it('asks for nothing on other addresses', async () => {
    const spy = fetchSpy();
    const qc = new QueryClient({ defaultOptions: { queries: { retry: false } } });
    for (const p of ['/', '/w/ws1', '/w/ws1/members', '/w/ws1/n/nb1/more', '/s/token', '/sign-in']) prefetchFirstScreen(qc, p);
    await new Promise((r) => setTimeout(r, 20));
    expect(spy).not.toHaveBeenCalled();
  });
});

describe('model editors mounted together', () => {
  it('are each built during the render and each placed in the page', async () => {
    const views: EditorView[] = [];
    const { getAllByTestId } = render(
      <>
        <ModelEditor value={'unknown a\nconstrain a >= 0'} onView={(v) => v && views.push(v)} />
        <ModelEditor value={'unknown b'} onView={(v) => v && views.push(v)} />
      </>,
    );
    expect(views.map((v) => v.state.doc.toString())).toEqual(['unknown a\nconstrain a >= 0', 'unknown b']);
    const hosts = getAllByTestId('model-editor');
    await waitFor(() => expect(hosts.map((h) => h.querySelector('.cm-content')?.textContent)).toEqual(['unknown aconstrain a >= 0', 'unknown b']));
    expect(views[0].dom.parentElement).toBe(hosts[0]);
    expect(views[1].dom.parentElement).toBe(hosts[1]);
  });
});
