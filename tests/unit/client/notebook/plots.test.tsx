// @vitest-environment happy-dom
import { afterEach, describe, expect, it } from 'vitest';
import { cleanup, fireEvent, render, screen } from '@testing-library/react';
import { readFileSync } from 'node:fs';
import { pairSpec } from '../../../../src/features/notebook/fit/pair-spec';
import { PALETTE } from '../../../../src/lib/plot/palette';
import { FitPlots } from '../../../../src/features/notebook/fit/fit-plots';
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
