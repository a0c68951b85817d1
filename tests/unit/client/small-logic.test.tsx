// @vitest-environment jsdom
// jsdom: the markdown renderer sanitises with DOMPurify, which does not support happy-dom.
import { afterEach, describe, expect, it } from 'vitest';
import { cleanup, render, screen } from '@testing-library/react';
import { MemoryRouter } from 'react-router-dom';
import type { Cell } from '@shared/api';
import { expiryToIso } from '@/features/share-links/components/expiry';
import { CellList } from '@/features/notebook/components/cell-list';
import { LinkifiedText } from '@/routes/dev-mail';
import { safeNext, withNext } from '@/lib/safe-next';
import { ISO } from './test-utils';

afterEach(cleanup);

describe('share-link expiry', () => {
  const now = new Date('2026-12-02T00:00:00.000Z');
  it('turns the lifetime choices into timestamps', () => {
    expect(expiryToIso('never', undefined, now)).toBeNull();
    expect(expiryToIso('1d', undefined, now)).toBe('2026-12-03T00:00:00.000Z');
    expect(expiryToIso('7d', undefined, now)).toBe('2026-12-09T00:00:00.000Z');
    expect(expiryToIso('30d', undefined, now)).toBe('2027-01-01T00:00:00.000Z');
  });
  it('reads a calendar day as the end of that day in local time, and refuses a missing day', () => {
    const iso = expiryToIso('date', '2027-03-14', now)!;
    const d = new Date(iso);
    expect([d.getFullYear(), d.getMonth(), d.getDate(), d.getHours(), d.getMinutes()]).toEqual([2027, 2, 14, 23, 59]);
    expect(expiryToIso('date', '', now)).toBeUndefined();
    expect(expiryToIso('date', '14/03/2027', now)).toBeUndefined();
  });
});

describe('safeNext', () => {
  it('accepts paths on this site only', () => {
    expect(safeNext('/w/abc/members?x=1')).toBe('/w/abc/members?x=1');
    expect(safeNext('//evil.example/path')).toBe('/');
    expect(safeNext('/\\evil.example')).toBe('/');
    expect(safeNext('https://evil.example')).toBe('/');
    expect(safeNext(null, '/home')).toBe('/home');
    expect(withNext('/sign-in', '/invite/tok?x=1')).toBe('/sign-in?next=%2Finvite%2Ftok%3Fx%3D1');
  });
});

const cell = (over: Partial<Cell>): Cell => ({
  id: 'c1',
  notebookId: 'n1',
  kind: 'notes',
  position: 0,
  source: '',
  content: null,
  version: 1,
  collapsed: false,
  createdAt: ISO,
  updatedAt: ISO,
  ...over,
});

describe('cell list', () => {
  it('shows cells in position order, labelled by kind in words, with their versions', () => {
    render(
      <CellList
        cells={[
          cell({ id: 'c2', kind: 'model', position: 1, source: 'unknown mu[3]\nconstrain mu[1] <= mu[2]', version: 4 }),
          cell({ id: 'c1', kind: 'notes', position: 0, source: '# Reach survey\nSediment **load** per reach.' }),
          cell({ id: 'c3', kind: 'compare', position: 2 }),
        ]}
      />,
    );
    const items = screen.getAllByRole('listitem');
    expect(items.map((li) => li.querySelector('.eyebrow')?.textContent)).toEqual(['Notes', 'Model', 'Comparison']);
    expect(screen.getByRole('heading', { name: 'Reach survey' })).toBeTruthy();
    expect(items[1].textContent).toContain('constrain mu[1] <= mu[2]');
    expect(items[1].textContent).toContain('v4');
    expect(items[2].textContent).toContain('This cell is empty.');
  });

  it('shows raw HTML in notes as text and drops unsafe link schemes', () => {
    const { container } = render(
      <CellList
        cells={[
          cell({
            source:
              'ok <script>window.bad = 1</script><img src="x" onerror="window.bad = 2">\n\n' +
              '[safe](https://example.org/a) [bad](javascript:alert(1)) [sneaky](JaVa\tScRiPt:alert(1)) ![pic](data:image/png;base64,AA)',
          }),
        ]}
      />,
    );
    expect(container.querySelector('script')).toBeNull();
    expect(container.querySelector('img')).toBeNull();
    expect(container.textContent).toContain('<script>window.bad = 1</script>');
    const hrefs = Array.from(container.querySelectorAll('a')).map((a) => a.getAttribute('href'));
    expect(hrefs).toEqual(['https://example.org/a']);
    expect(container.textContent).toContain('bad');
  });
});

describe('captured mail links', () => {
  it('makes every address clickable and keeps same-site links inside the app', () => {
    const here = window.location.origin;
    render(
      <MemoryRouter>
        <LinkifiedText text={`Join: ${here}/invite/tok123.\nElsewhere: https://example.org/x`} />
      </MemoryRouter>,
    );
    const links = screen.getAllByRole('link');
    expect(links.map((a) => a.getAttribute('href'))).toEqual(['/invite/tok123.', 'https://example.org/x']);
  });
});
