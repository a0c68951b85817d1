// @vitest-environment happy-dom
/**
 * The fit cell's checks against the data (src/features/notebook/fit/): the statistics table marks
 * a p-value below 0.05 or above 0.95 as extreme in words and says which way the data lie
 * (p = share of replicates above the data, so p < 0.05 means the data's statistic is higher than
 * nearly every replicate's — the definition of the predictive p-value, "Bayesian Data Analysis",
 * 3rd ed., section 6.3); leave-one-out names the rows with Pareto k above 0.7 (the threshold of
 * "Pareto smoothed importance sampling", JMLR 2024); prior-only runs are labelled in the results
 * and the runs list; the settings carry prior-only, the replicate count and the user's statistic.
 */
import { afterEach, describe, expect, it, vi } from 'vitest';
import { cleanup, fireEvent, render, screen, within } from '@testing-library/react';
import type { RunChecks } from '../../../../shared/checks';
import type { Run } from '../../../../shared/api/notebook';
import { fitSettingsSchema } from '../../../../shared/fit';
import { ChecksView } from '../../../../src/features/notebook/fit/checks-view';
import { checkCandidate, toCheckDraft } from '../../../../src/features/notebook/fit/check-settings';
import { groupSpec, overlayRows, paretoKSpec } from '../../../../src/features/notebook/fit/checks-specs';
import { FitResults } from '../../../../src/features/notebook/fit/fit-results';
import { FitSettingsForm } from '../../../../src/features/notebook/fit/fit-settings-form';
import { RunsList } from '../../../../src/features/notebook/fit/runs-list';

afterEach(cleanup);

const stat = (s: string, observed: number, lo: number, hi: number, p: number) => ({ stat: s, observed, mean: (lo + hi) / 2, lo, hi, p });

const CHECKS: RunChecks = {
  kind: 'posterior',
  replicates: 200,
  statistics: ['mean', 'sd', 'max'],
  items: [
    {
      name: 'load_new',
      line: 8,
      density: 'ld_normal',
      rows: 30,
      table: 'storms',
      stats: [stat('mean', 3.7, 3.59, 3.8, 0.565), stat('sd', 1.51, 1.27, 1.46, 0.005), stat('max', 1.2, 1.42, 2.04, 0.999)],
      groups: [
        { column: 'rain_class', level: '1', rows: 6, stats: [stat('mean', 2, 1.5, 2.5, 0.5), stat('sd', 0.7, 0.1, 0.4, 0), stat('max', 3, 2, 4, 0.4)] },
        { column: 'rain_class', level: '2', rows: 6, stats: [stat('mean', 3, 2.5, 3.5, 0.5), stat('sd', 0.3, 0.1, 0.4, 0.3), stat('max', 3, 2, 4, 0.4)] },
      ],
      overlay: { edges: [0, 1, 2, 3], observed: [0.2, 0.5, 0.3], q05: [0.1, 0.2, 0.1], q25: [0.15, 0.3, 0.2], q50: [0.2, 0.35, 0.25], q75: [0.25, 0.4, 0.3], q95: [0.3, 0.45, 0.4], sample: [[0.2, 0.4, 0.4]], clipped: 0 },
    },
  ],
  loo: { elpd: -128.9, se: 9.1, mcse: 0.4, pLoo: 12, kThreshold: 0.7, draws: 2000, rows: 30, kMax: null, highKCount: 2, highK: [{ table: 'storms', row: 20, k: null }, { table: 'storms', row: 24, k: 0.95 }], k: Array.from({ length: 30 }, (_, i) => (i === 19 ? null : i === 23 ? 0.95 : 0.3)) },
  draws: 2000,
  thin: 1,
};

describe('checks view', () => {
  it('marks extreme statistics in words and says which way the data lie', () => {
    render(<ChecksView checks={CHECKS} />);
    const rows = screen.getAllByTestId('stat-row');
    expect(rows.map((r) => r.getAttribute('data-extreme'))).toEqual(['false', 'true', 'true']);
    expect(rows[1].textContent).toContain('EXTREME');
    expect(rows[1].textContent).toContain('higher than nearly every replicated');
    expect(rows[2].textContent).toContain('lower than nearly every replicated');
    expect(rows[0].textContent).toContain('3.59 to 3.8');
    expect(screen.getByTestId('checks-failing').textContent).toMatch(/2 statistics are extreme: standard deviation, largest value/);
    // Per group: a grid of p-values with the extreme ones marked.
    const groups = screen.getByTestId('checks-groups');
    expect(within(groups).getAllByTestId('group-extreme').map((e) => e.textContent)).toEqual(['< 0.001 extreme']);
  });

  it('names the rows whose Pareto k exceeds the threshold', () => {
    render(<ChecksView checks={CHECKS} />);
    expect(screen.getByTestId('loo-high-k').textContent).toBe('storms row 20 (k ∞), storms row 24 (k 0.95).');
  });

  it('a prior run says so and why it has no leave-one-out', () => {
    const { loo: _l, ...rest } = CHECKS;
    render(<ChecksView checks={{ ...rest, kind: 'prior', looUnavailable: 'a prior-only run has no likelihood to leave rows out of' }} />);
    expect(screen.getByRole('heading').textContent).toMatch(/before the data/);
    expect(screen.getByText(/Leave-one-out: not computed — a prior-only run/)).toBeTruthy();
  });
});

describe('checks plots', () => {
  it('flags bins where the data leave the replicates’ 5–95 % range; one dot per replicate per bin', () => {
    const { bins, dots } = overlayRows({ ...CHECKS.items[0].overlay!, observed: [0.05, 0.5, 0.3] });
    expect(bins.map((b) => b.outside)).toEqual([true, true, false]);
    expect(dots).toHaveLength(3);
    expect(dots.every((d, b) => d.x > bins[b].lo && d.x < bins[b].hi)).toBe(true);
  });
  it('groups without a value are left out; k of null is drawn high and flagged', () => {
    const g = groupSpec([{ group: 'a', observed: null, lo: 0, hi: 1, p: 0.5, extreme: false }, { group: 'b', observed: 1, lo: 0, hi: 2, p: 0.5, extreme: false }], 'mean');
    expect((g.data as { values: unknown[] }).values).toHaveLength(1);
    const k = paretoKSpec({ k: [0.2, null], kThreshold: 0.7 });
    const rows = ((k.layer as { data: { values: { high: boolean }[] } }[])[0]).data.values;
    expect(rows.map((r) => r.high)).toEqual([false, true]);
  });
});

const defaults = fitSettingsSchema.parse({});

describe('check settings', () => {
  it('round-trips through the draft and leaves defaults absent', () => {
    for (const s of [{}, { priorOnly: true }, { replicates: 500 }, { checkStat: 'q0.9' }, { checkStat: 'above:10' }, { checkStat: 'iqr' }, { checkStat: 'q.25' }]) {
      const back = checkCandidate(toCheckDraft(s));
      expect(fitSettingsSchema.parse({ ...defaults, ...back })).toEqual(fitSettingsSchema.parse({ ...defaults, ...s, ...(s.checkStat === 'q.25' ? { checkStat: 'q0.25' } : {}) }));
    }
  });

  it('the form sends prior-only and the user statistic, and refuses a quantile outside (0, 1)', () => {
    const onChange = vi.fn();
    render(<FitSettingsForm value={defaults} readOnly={false} running={false} onChange={onChange} />);
    fireEvent.click(screen.getByLabelText(/Before the data: priors and constraints only/));
    expect(onChange).toHaveBeenLastCalledWith({ ...defaults, priorOnly: true });
    fireEvent.change(screen.getByLabelText('Your own statistic'), { target: { value: 'q' } });
    expect(onChange).toHaveBeenLastCalledWith({ ...defaults, priorOnly: true, checkStat: 'q0.9' });
    fireEvent.change(screen.getByLabelText('Quantile (between 0 and 1)'), { target: { value: '1.5' } });
    expect(screen.getByRole('alert').textContent).toMatch(/between 0 and 1/);
    expect((screen.getByRole('button', { name: 'Run fit' }) as HTMLButtonElement).disabled).toBe(true);
    fireEvent.change(screen.getByLabelText('Replicated data sets'), { target: { value: '5' } });
    fireEvent.change(screen.getByLabelText('Quantile (between 0 and 1)'), { target: { value: '0.1' } });
    expect(screen.getByRole('alert').textContent).toBe('Between 20 and 1000');
  });
});

function run(priorOnly: boolean): Run {
  const settings = { chains: 2, warmup: 100, draws: 100, seed: 7, sampler: 'auto' as const, ...(priorOnly ? { priorOnly: true } : {}) };
  return {
    id: priorOnly ? 'p1' : 'r1', cellId: 'c1', notebookId: 'n1', status: 'done', settings, modelHash: 'h', createdBy: null,
    createdAt: '2026-12-01T00:00:00.000Z', startedAt: '2026-12-01T00:00:00.000Z', finishedAt: '2026-12-01T00:00:05.000Z', error: null, progress: [],
    summary: {
      quantities: [],
      diagnostics: { divergences: 0, acceptance: 0.9, stepSize: 0.1, maxRhat: 1, minEssBulk: 400, minEssTail: 400, samplerUsed: 'rhmc', samplerReason: 'x' },
      verdict: { level: 'trustworthy', reason: 'Every check passed.', rules: [] },
      settings, seconds: 1,
      checks: { ...CHECKS, kind: priorOnly ? 'prior' : 'posterior' },
    },
  };
}

describe('prior runs are labelled', () => {
  it('in the results heading and in the runs list', () => {
    render(<FitResults run={run(true)} draws={null} />);
    expect(screen.getByTestId('prior-run-heading').textContent).toMatch(/prior run · before the data/);
    expect(screen.getByTestId('checks-view').getAttribute('data-kind')).toBe('prior');
    expect(screen.getByText(/90 % of the prior/)).toBeTruthy();
    cleanup();
    render(<FitResults run={run(false)} draws={null} />);
    expect(screen.queryByTestId('prior-run-heading')).toBeNull();
    cleanup();
    render(<RunsList runs={[run(true), run(false)]} openId={null} onOpen={() => {}} />);
    expect(screen.getAllByTestId('prior-run-label')).toHaveLength(1);
  });
});
