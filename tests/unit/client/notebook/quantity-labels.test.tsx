// @vitest-environment happy-dom
/**
 * Results rows label elements of unknowns gathered by a category column with level names
 * ("share[2] (north)"), read from the model the fit cell fits; stored names are unchanged.
 */
import { cleanup, render, screen } from '@testing-library/react';
import { afterEach, describe, expect, it } from 'vitest';
import { QuantityRows } from '@/features/notebook/fit/quantity-rows';
import { fitModelCell, QuantityLabelsContext, quantityLabels } from '@/features/notebook/quantity-labels';
import type { NbCell } from '@shared/api/notebook';
import type { QuantitySummary } from '@shared/fit';
import type { DataSchema } from '@shared/lang';

afterEach(cleanup);

const q = (name: string): QuantitySummary => ({
  name, kind: 'unknown', mean: 0.3, sd: 0.1, q5: 0.15, q50: 0.3, q95: 0.45, rhat: 1.002, essBulk: 1800, essTail: 1500,
  mcseMean: 0.002, mcseQ5: 0.004, mcseQ50: 0.003, mcseQ95: 0.004,
});

const SCHEMA: DataSchema = { plots: { rows: 6, columns: { region: { type: 'category', levels: 3 }, y: { type: 'numeric' } } } };
const LEVELS = { plots: { region: ['east', 'north', 'south'] } };
const SOURCE = 'table plots\nunknown share[3]\nunknown sigma\nterm ld_normal(y, share[region], sigma)';

const cell = (id: string, kind: NbCell['kind'], position: number, source = '', content: unknown = null): NbCell =>
  ({ id, notebookId: 'n1', kind, position, source, content, version: 1, collapsed: false, createdAt: '2026-12-01T00:00:00Z', updatedAt: '2026-12-01T00:00:00Z' }) as NbCell;

describe('quantity labels', () => {
  it('label the elements of a gathered unknown with level names and leave other names as stored', () => {
    const label = quantityLabels(SOURCE, SCHEMA, LEVELS);
    expect(['share[1]', 'share[2]', 'share[3]', 'sigma'].map(label)).toEqual(['share[1] (east)', 'share[2] (north)', 'share[3] (south)', 'sigma']);
  });

  it('the results rows and the mixing table show the labels', () => {
    render(
      <QuantityLabelsContext.Provider value={quantityLabels(SOURCE, SCHEMA, LEVELS)}>
        <QuantityRows chains={4} draws={1000} quantities={[q('share[1]'), q('share[2]'), q('share[3]'), q('sigma')]} />
      </QuantityLabelsContext.Provider>,
    );
    const names = screen.getAllByTestId('quantity-row').map((r) => r.querySelector('[data-testid="quantity-name"]')?.textContent);
    expect(names).toEqual(['share[1] (east)', 'share[2] (north)', 'share[3] (south)', 'sigma']);
    const heads = [...screen.getByTestId('mixing-figures').querySelectorAll('tbody th')].map((t) => t.textContent);
    expect(heads).toEqual(names);
  });

  it('without a provider the rows show the stored names', () => {
    render(<QuantityRows chains={4} draws={1000} quantities={[q('share[1]')]} />);
    expect(screen.getByTestId('quantity-row').querySelector('[data-testid="quantity-name"]')?.textContent).toBe('share[1]');
  });

  it('a fit cell fits its chosen model, else the nearest model cell above', () => {
    const cells = [cell('m1', 'model', 0, 'a'), cell('m2', 'model', 1, 'b'), cell('f1', 'fit', 2), cell('m3', 'model', 3, 'c')];
    expect(fitModelCell(cells[2], cells, null)?.id).toBe('m2');
    expect(fitModelCell(cells[2], cells, { modelCellId: 'm3', settings: {} })?.id).toBe('m3');
  });
});
