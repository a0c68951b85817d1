// @vitest-environment happy-dom
/**
 * The data preview pages through a big table (one request per further page, through the route
 * table), and the plots' draws arrive through callRouteBytes as typed arrays.
 */
import { afterEach, describe, expect, it, vi } from 'vitest';
import { fireEvent, screen, waitFor } from '@testing-library/react';
import { DataPages } from '../../../../src/features/notebook/data/data-pages';
import { callRouteBytes } from '../../../../src/lib/api-client';
import { decodeRunDraws, DRAWS_CONTENT_TYPE, encodeDrawsBody, encodeDrawsHead } from '../../../../shared/draws-binary';
import { mockFetch, renderWithProviders, ISO } from '../test-utils';

afterEach(() => vi.unstubAllGlobals());

const rowsOf = (from: number, to: number) => Array.from({ length: to - from }, (_, i) => [from + i + 1, `s${(from + i) % 3}`]);
const dataset = {
  id: 'ds1', name: 'plots', rows: 1234, bytes: 9999, createdAt: ISO,
  columns: [{ name: 'plot', type: 'integer' as const, missing: 0 }, { name: 'site', type: 'category' as const, missing: 0, levels: ['s0', 's1', 's2'] }],
};

describe('data preview paging', () => {
  it('shows the first page, then fetches the next pages by offset', async () => {
    const { seen } = mockFetch({
      'GET /api/workspaces/ws1/datasets/ds1/rows': (req) => {
        const offset = Number(new URL(req.url, 'http://x').searchParams.get('offset'));
        return { status: 200, body: { offset, total: 1234, rows: rowsOf(offset, Math.min(1234, offset + 500)) } };
      },
    });
    renderWithProviders(<DataPages access={{ mode: 'member', workspaceId: 'ws1' } as never} dataset={dataset} firstRows={rowsOf(0, 500)} />);
    expect(screen.getByTestId('data-page-range').textContent).toBe('Rows 1–500 of 1234');
    expect(seen).toHaveLength(0);
    fireEvent.click(screen.getByRole('button', { name: 'Next rows' }));
    await waitFor(() => expect(screen.getByTestId('data-page-range').textContent).toBe('Rows 501–1000 of 1234'));
    expect(screen.getByText('501')).toBeTruthy();
    fireEvent.click(screen.getByRole('button', { name: 'Next rows' }));
    await waitFor(() => expect(screen.getByTestId('data-page-range').textContent).toBe('Rows 1001–1234 of 1234'));
    expect((screen.getByRole('button', { name: 'Next rows' }) as HTMLButtonElement).disabled).toBe(true);
    expect(seen.map((r) => new URL(r.url, 'http://x').search)).toEqual(['?offset=500&limit=500', '?offset=1000&limit=500']);
  });
});

describe('binary draws through the route table', () => {
  it('callRouteBytes fetches the route path and the decoder gives Float32 columns', async () => {
    const rows = new Float64Array([0.1, 10, 0.2, 20, 0.3, 30]); // 3 draws × 2 quantities
    const head = encodeDrawsHead({ dtype: 'float32', names: ['a', 'b'], unknownCount: 2, thin: 1, drawsPerChain: 3, chains: [1], region: null, projections: [] });
    const body = encodeDrawsBody([{ rows, dimension: 2, divergent: new Uint8Array([0, 1, 0]) }], 2, [0, 1, 2]);
    const bytes = new Uint8Array(head.length + body.length);
    bytes.set(head);
    bytes.set(body, head.length);
    const fn = vi.fn(async () => new Response(bytes, { status: 200, headers: { 'Content-Type': DRAWS_CONTENT_TYPE } }));
    vi.stubGlobal('fetch', fn);
    const got = decodeRunDraws(await callRouteBytes('getRunDraws', { params: { workspaceId: 'ws1', runId: 'r1' }, query: { max: 1000 } }));
    expect(String((fn.mock.calls[0] as unknown[])[0])).toBe('/api/workspaces/ws1/runs/r1/draws?max=1000');
    // Math.fround: ECMAScript's rounding to binary32, the precision the plots receive.
    expect(Array.from(got.chains[0].values[0])).toEqual([0.1, 0.2, 0.3].map(Math.fround));
    expect(Array.from(got.chains[0].values[1])).toEqual([10, 20, 30]);
    expect(Array.from(got.chains[0].divergent)).toEqual([0, 1, 0]);
  });
});
