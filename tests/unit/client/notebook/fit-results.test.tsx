// @vitest-environment happy-dom
/**
 * The fit results' diagnostics line shows divergences and rejected steps apart (docs/engine.md §3).
 */
import { afterEach, describe, expect, it } from 'vitest';
import { cleanup, render, screen } from '@testing-library/react';
import { FitResults } from '../../../../src/features/notebook/fit/fit-results';
import type { Run } from '../../../../shared/api/notebook';
import type { RunDiagnostics } from '../../../../shared/fit';

afterEach(cleanup);

const diagnostics: RunDiagnostics = {
  divergences: 0,
  rejectedSteps: 3,
  acceptance: 0.97,
  stepSize: 0.08,
  maxRhat: 1.002,
  minEssBulk: 2400,
  minEssTail: 2100,
  samplerUsed: 'rhmc',
  samplerReason: 'the log-density is not constant',
};

function run(d: RunDiagnostics): Run {
  const settings = { chains: 4, warmup: 1000, draws: 1000, seed: 7, sampler: 'auto' as const };
  return {
    id: 'r1',
    cellId: 'c1',
    notebookId: 'n1',
    status: 'done',
    settings,
    modelHash: 'h',
    createdBy: null,
    createdAt: '2026-12-01T00:00:00.000Z',
    startedAt: '2026-12-01T00:00:00.000Z',
    finishedAt: '2026-12-01T00:00:05.000Z',
    error: null,
    progress: [],
    summary: {
      quantities: [],
      diagnostics: d,
      verdict: { level: 'trustworthy', reason: 'Every check passed.', rules: [] },
      settings,
      seconds: 5,
    },
  };
}

describe('fit results diagnostics line', () => {
  it('shows rejected steps beside divergences, not as divergences', () => {
    render(<FitResults run={run(diagnostics)} draws={null} />);
    const line = screen.getByTestId('run-diagnostics').textContent ?? '';
    expect(line).toContain('divergences 0');
    expect(line).toContain('rejected steps 3');
  });
  it('omits the count for summaries stored before it existed', () => {
    const { rejectedSteps: _absent, ...older } = diagnostics;
    render(<FitResults run={run(older)} draws={null} />);
    const line = screen.getByTestId('run-diagnostics').textContent ?? '';
    expect(line).toContain('divergences 0');
    expect(line).not.toContain('rejected');
  });
});
