// @vitest-environment happy-dom
/**
 * The compare cell's pieces (src/features/notebook/compare/): the picker shows constraint lines as
 * written and turns checked lines into one tested hypothesis; the results show the Bayes factor with
 * its interval, the masses, leave-one-out differences with Pareto-k warnings, the reading and the
 * prior caution with its button. The result shown is a real one, computed by the engine on a tiny
 * model (its numbers are checked against formulas in tests/unit/evidence/compare.test.ts); here the
 * check is that the page shows those same numbers.
 */
import { afterEach, describe, expect, it, vi } from 'vitest';
import { cleanup, fireEvent, render, screen, within } from '@testing-library/react';
import { compareContentSchema, compareResultSchema } from '../../../../shared/api/compare';
import { CompareSettings, compareRows } from '../../../../src/features/notebook/compare/compare-settings';
import { CompareResults } from '../../../../src/features/notebook/compare/compare-results';
import { compareStateMessage } from '../../../../src/features/notebook/compare/compare-progress';
import { testableConstraintLines } from '../../../../src/features/notebook/compare/constraint-lines';
import { computeComparison } from '../../../../server/engine/evidence/compare';
import type { DataTables } from '../../../../server/engine/types';

afterEach(cleanup);

const ORDERED = '# Ordered means\ntable d\nunknown mu[3]\nterm ld_normal(y, mu[g], 1)\nterm ld_normal(mu, 0, 2)\nconstrain mu[1] <= mu[2] <= mu[3]\nconstrain sum(mu) == 1 # not testable\n';
const models = [{ id: 'ma', label: 'Ordered means', source: ORDERED }];

describe('compare settings', () => {
  it('lists inequality constraint lines as written, never equalities', () => {
    expect(testableConstraintLines(ORDERED)).toEqual([{ line: 6, text: 'constrain mu[1] <= mu[2] <= mu[3]' }]);
  });

  it('picking a line makes a hypothesis and a row without it, which can be the reference', () => {
    const onChange = vi.fn();
    const content = compareContentSchema.parse({ modelCellIds: ['ma'] });
    render(<CompareSettings content={content} models={models} readOnly={false} onChange={onChange} />);
    expect(screen.getByText('constrain mu[1] <= mu[2] <= mu[3]')).toBeTruthy();
    fireEvent.click(within(screen.getByRole('group', { name: /Constraint lines of Ordered means/ })).getByRole('checkbox'));
    const next = onChange.mock.calls[0][0];
    expect(next.hypotheses).toEqual([{ modelCellId: 'ma', lines: [6] }]);
    expect(compareRows(next, models).map((r) => r.label)).toEqual(['Ordered means', 'Ordered means without line 6']);
  });

  it('says where a queued comparison stands', () => {
    expect(compareStateMessage({ status: 'queued', worker: null, queuePosition: 1 })).toMatch(/next in the queue/);
    expect(compareStateMessage({ status: 'running', worker: 'lost', queuePosition: null })).toMatch(/Worker lost/);
  });
});

describe('compare results', { timeout: 60_000 }, () => {
  const tables: DataTables = {
    d: {
      rows: 6,
      columns: {
        y: { type: 'numeric', values: Float64Array.from([0.1, -0.4, 0.5, 0.9, 1.2, 1.0]) },
        g: { type: 'category', values: Float64Array.from([1, 1, 2, 2, 3, 3]), levels: ['a', 'b', 'c'] },
      },
    },
  };
  const source = ORDERED.split('\n').slice(0, 6).join('\n');
  const result = compareResultSchema.parse(
    computeComparison({
      models: [{ cellId: 'ma', label: 'Ordered means', source, tables, tableIds: { d: 'x' }, fit: null }],
      hypotheses: [{ modelCellId: 'ma', lines: [6] }],
      reference: { modelCellId: 'ma', without: [6] },
      priorOdds: [],
      replicates: 3,
      seed: 9,
      factors: [1],
    }),
  );

  it('shows the Bayes factor with its interval, the masses, the reading and the caution', () => {
    const onSensitivity = vi.fn();
    render(<CompareResults result={result} onSensitivity={onSensitivity} />);
    const h = result.hypotheses[0];
    expect(screen.getByTestId('hypothesis-logbf').textContent).toBe(`${h.logBF.toFixed(2)} ± ${h.se.toFixed(2)}`);
    expect(screen.getByTestId('hypothesis-interval').textContent).toMatch(/ to /);
    expect(screen.getByTestId('compare-reading').textContent).toContain('by a factor of about');
    expect(screen.getByTestId('compare-caution').textContent).toMatch(/depend on the priors/);
    expect(screen.getAllByTestId('compare-row')).toHaveLength(2);
    expect(screen.getByText('Fit this model to see leave-one-out.')).toBeTruthy();
    fireEvent.click(screen.getByRole('button', { name: 'Rerun with prior scales ×0.5 and ×2' }));
    expect(onSensitivity).toHaveBeenCalled();
  });

  it('names the rows whose Pareto k is too high', () => {
    const withLoo = structuredClone(result);
    withLoo.entries[0].loo = { runId: 'r1', elpd: -9, se: 1, pLoo: 2, draws: 100, kThreshold: 0.7, highK: [{ table: 'd', row: 4, k: 0.9 }], highKCount: 1, diff: -1.5, diffSe: 0.8 };
    render(<CompareResults result={withLoo} />);
    expect(screen.getByTestId('pareto-k-warning').textContent).toContain('d row 4');
    expect(screen.queryByRole('button', { name: /Rerun with prior scales/ })).toBeNull();
  });
});
