// @vitest-environment happy-dom
import { afterEach, describe, expect, it } from 'vitest';
import { cleanup, fireEvent, render, screen } from '@testing-library/react';
import { readFileSync } from 'node:fs';
import { pairSpec } from '../../../../src/features/notebook/fit/pair-spec';
import { PALETTE } from '../../../../src/lib/plot/palette';
import { FitPlots } from '../../../../src/features/notebook/fit/fit-plots';
import { QuantityLabelsContext } from '../../../../src/features/notebook/quantity-labels';
import { buildBand } from '../../../../src/features/notebook/fit/band-view';
import type { RunDraws } from '../../../../shared/api/notebook';

afterEach(cleanup);

type Layer = { mark: { type: string; color?: string; fill?: string }; data?: { values: unknown[] } };

describe('plot specifications', () => {
  it('pair scatter uses the warning colour for divergent draws only', () => {
    const p = JSON.stringify(pairSpec('a', 'b', [], 2));
    expect(p.split(PALETTE.warning)).toHaveLength(2);
    expect(p).toContain('datum.divergent == 1');
  });

});

const draws: RunDraws = {
  names: ['w[1]', 'w[2]', 'w[3]', 'spread'],
  unknownCount: 3,
  thin: 1,
  chains: [1, 2].map((chain) => ({
    chain,
    values: [
      [0.2, 0.3, 0.25, 0.35],
      [0.3, 0.2, 0.35, 0.25],
      [0.5, 0.5, 0.4, 0.4],
      [0.3, 0.3, 0.15, 0.15],
    ],
    divergent: [0, 0, 1, 0],
  })),
  region: { names: ['w[1]', 'w[2]', 'w[3]'], A: [[-1, 0, 0], [0, -1, 0], [0, 0, -1]], b: [0, 0, 0], labels: ['a', 'b', 'c'], E: [[1, 1, 1]], e: [1], eLabels: ['sum(w) == 1'] },
};

describe('fit plots panel', () => {
  it('opens on the feasible-region view and offers only unknowns as its axes', () => {
    render(<FitPlots draws={draws} />);
    expect(screen.getByRole('tab', { name: 'Feasible region' }).getAttribute('aria-selected')).toBe('true');
    // Three shares summing to one open in their own coordinates, the triangle.
    expect(screen.getByTestId('triangle-figure')).toBeTruthy();
    fireEvent.change(screen.getByLabelText('Region view'), { target: { value: '-1' } });
    expect(screen.getByTestId('region-figure')).toBeTruthy();
    const across = screen.getByLabelText('Horizontal quantity') as HTMLSelectElement;
    expect([...across.options].map((o) => o.textContent)).toEqual(['w[1]', 'w[2]', 'w[3]']);
    fireEvent.click(screen.getByRole('tab', { name: 'Two quantities' }));
    expect([...(screen.getByLabelText('Horizontal quantity') as HTMLSelectElement).options].map((o) => o.textContent)).toContain('spread');
  });

  it('asks for two different quantities', () => {
    render(<FitPlots draws={draws} />);
    fireEvent.change(screen.getByLabelText('Region view'), { target: { value: '-1' } });
    fireEvent.change(screen.getByLabelText('Vertical quantity'), { target: { value: '0' } });
    expect(screen.getByText('Choose two different unknowns.')).toBeTruthy();
  });

  it('without a constraint region the panel starts on the chain agreement, and offers no ladder', () => {
    render(<FitPlots draws={{ ...draws, region: null }} />);
    expect(screen.queryByRole('tab', { name: 'Feasible region' })).toBeNull();
    expect(screen.queryByRole('tab', { name: 'Order' })).toBeNull();
    expect(screen.queryByRole('tab', { name: 'Curve' })).toBeNull();
    expect(screen.getByRole('tab', { name: 'Chain agreement' }).getAttribute('aria-selected')).toBe('true');
    // One band and one median line per chain, one strip cell per stretch of the run (4 draws: 4 stretches).
    expect(screen.getByTestId('mixing-view').querySelectorAll('[data-chain]')).toHaveLength(2);
    expect(screen.getAllByTestId('agreement-cell')).toHaveLength(4);
  });

  it('loads the charting library lazily (dynamic import), never statically', () => {
    const src = readFileSync('src/features/notebook/components/plot-frame.tsx', 'utf8');
    expect(src).toMatch(/import\('react-vega'\)/);
    expect(src).not.toMatch(/^import .* from 'react-vega'/m);
  });
});

/** Three means in order m[1] ≤ m[2] ≤ m[3] (rows −m₁ + m₂ ≥ 0 written as m₁ − m₂ ≤ 0), two chains of five draws. */
const ordered: RunDraws = {
  names: ['m[1]', 'm[2]', 'm[3]'],
  unknownCount: 3,
  thin: 1,
  chains: [
    { chain: 1, values: [[1, 2, 3, 4, 5], [2, 3, 4, 5, 6], [6, 7, 8, 9, 10]], divergent: [0, 0, 0, 0, 0] },
    { chain: 2, values: [[6, 7, 8, 9, 10], [6, 7, 8, 9, 10], [11, 12, 13, 14, 15]], divergent: [0, 0, 0, 0, 0] },
  ],
  region: { names: ['m[1]', 'm[2]', 'm[3]'], A: [[1, -1, 0], [0, 1, -1]], b: [0, 0], labels: ['m[1] <= m[2]', 'm[2] <= m[3]'], E: [], e: [], eLabels: [] },
};

describe('band view of a monotone curve', () => {
  it('quantiles at each step by definition 7 of "Sample quantiles in statistical packages" (The American Statistician 1996)', () => {
    const band = buildBand(ordered, [0, 1, 2]);
    expect(band.steps.map((s) => s.name)).toEqual(['m[1]', 'm[2]', 'm[3]']);
    // m[1] pooled: 1..10; h = (10 − 1)·p + 1: p = 0.05 → h = 1.45 → 1.45; p = 0.5 → 5.5; p = 0.95 → 9.55 (worked by hand).
    expect(band.steps[0].q5).toBeCloseTo(1.45, 12);
    expect(band.steps[0].q50).toBeCloseTo(5.5, 12);
    expect(band.steps[0].q95).toBeCloseTo(9.55, 12);
    // m[2] pooled: 2,3,4,5,6,6,7,8,9,10: p = 0.25 → h = 3.25 → 4 + 0.25·1 = 4.25.
    expect(band.steps[1].q25).toBeCloseTo(4.25, 12);
    // Every single-draw curve follows the order.
    expect(band.curves.length).toBeGreaterThan(0);
    for (const c of band.curves) for (let i = 1; i < c.length; i++) expect(c[i]).toBeGreaterThanOrEqual(c[i - 1]);
  });

  it('is offered as the Curve tab for an ordering of three or more', () => {
    render(<FitPlots draws={ordered} />);
    fireEvent.click(screen.getByRole('tab', { name: 'Curve' }));
    expect(screen.getByTestId('band-view')).toBeTruthy();
    expect(screen.getAllByTestId('band-draw').length).toBeGreaterThan(0);
  });
});

describe('figures name category levels like the result rows', () => {
  it('the triangle corners, the region axes, the ladder and the curve use the level labels', () => {
    const label = (n: string) => (n === 'w[1]' ? 'w[1] (north)' : n === 'm[1]' ? 'm[1] (light)' : n);
    const { unmount } = render(
      <QuantityLabelsContext.Provider value={label}>
        <FitPlots draws={draws} />
      </QuantityLabelsContext.Provider>,
    );
    expect(screen.getByTestId('triangle-figure').textContent).toContain('w[1] (north)');
    fireEvent.change(screen.getByLabelText('Region view'), { target: { value: '-1' } });
    expect(screen.getByTestId('region-figure').textContent).toContain('w[1] (north)');
    unmount();
    const q = (name: string, q50: number) => ({ name, kind: 'unknown' as const, mean: q50, sd: 1, q5: q50 - 1, q50, q95: q50 + 1, rhat: 1, essBulk: 1000, essTail: 1000, mcseMean: 0.01, mcseSd: 0.01, mcseQ5: 0.01, mcseQ50: 0.01, mcseQ95: 0.01 });
    render(
      <QuantityLabelsContext.Provider value={label}>
        <FitPlots draws={ordered} quantities={[q('m[1]', 5), q('m[2]', 7), q('m[3]', 12)]} />
      </QuantityLabelsContext.Provider>,
    );
    fireEvent.click(screen.getByRole('tab', { name: 'Order' }));
    expect(screen.getByTestId('ladder-view').textContent).toContain('m[1] (light)');
    fireEvent.click(screen.getByRole('tab', { name: 'Curve' }));
    expect(screen.getByTestId('band-view').textContent).toContain('m[1] (light)');
  });
});
