/**
 * The fit command's model checks: replicated data, predictive checks, PSIS leave-one-out and
 * prior-only runs, end to end through the real compiler and sampler.
 *
 * Model: y_i ~ N(mu, 1), mu ~ N(0, 10²). Exact leave-one-out predictive density of y_i:
 * N(y_i | μ_−i, 1 + τ_−i²) with 1/τ_−i² = 0.01 + (n − 1), μ_−i = τ_−i² Σ_{j≠i} y_j (normal model
 * with known variance, "Bayesian Data Analysis", 3rd ed., section 2.5). Tolerances are 4× the
 * run's own Monte Carlo standard errors.
 */
import { describe, expect, it } from 'vitest';
import Papa from 'papaparse';
import stdNormalLogpdf from '@stdlib/stats-base-dists-normal-logpdf';
import { main } from '../../../server/engine/cli/fit';
import { memoryIo } from './memory-io';

const lnorm = stdNormalLogpdf as (x: number, m: number, s: number) => number;
const SMALL = ['--chains', '2', '--warmup', '200', '--draws', '400', '--seed', '8'];
const y = [4.1, 5.3, 4.8, 6.0, 5.2, 4.4, 5.9, 5.1, 9.5];
const files = {
  'm.slk': 'table trial\nunknown mu\nterm ld_normal(y, mu, 1)\nterm ld_normal(mu, 0, 10)\nreplicate y_new = ld_normal(y, mu, 1)\n',
  'trial.csv': `y\n${y.join('\n')}\n`,
};

describe('fit command: model checks', () => {
  it('reports PSIS-LOO close to exact leave-one-out, predictive checks, and writes reproducible replicates', async () => {
    const io = memoryIo(files);
    const args = ['m.slk', '--data', 'trial.csv', ...SMALL, '--json', '--replicates', '120', '--replicates-out', 'r.csv', '--check-stat', 'q0.9'];
    expect(await main(args, io, { parallel: false })).toBe(0);
    const doc = JSON.parse(io.out);
    const n = y.length;
    const sum = y.reduce((a, b) => a + b, 0);
    const precLoo = 0.01 + (n - 1);
    const exact = y.map((yi) => lnorm(yi, (sum - yi) / precLoo, Math.sqrt(1 + 1 / precLoo)));
    const exactTotal = exact.reduce((a, b) => a + b, 0);
    expect(doc.loo.rows).toHaveLength(n);
    expect(doc.loo.rows[8]).toMatchObject({ table: 'trial', row: 9 });
    expect(Math.abs(doc.loo.elpd - exactTotal)).toBeLessThan(4 * doc.loo.mcse);
    expect(doc.loo.pLoo).toBeGreaterThan(0.5);
    expect(doc.checks.kind).toBe('posterior');
    expect(doc.checks.replicates).toBe(120);
    const stats = doc.checks.statistics[0].checks.map((c: { stat: string }) => c.stat);
    expect(stats).toEqual(['mean', 'sd', 'min', 'max', 'zeros', 'q0.9']);
    // the observed maximum (9.5, an outlier) is rarely reached by replicates of a N(mu, 1) model
    const max = doc.checks.statistics[0].checks.find((c: { stat: string }) => c.stat === 'max');
    expect(max.observed).toBe(9.5);
    expect(max.p).toBeLessThan(0.05);
    const csv = Papa.parse<string[]>(io.written['r.csv'].trim()).data;
    expect(csv[0].slice(0, 4)).toEqual(['replicate', 'chain', 'iteration', 'y_new[1]']);
    expect(csv).toHaveLength(121);
    const again = memoryIo(files);
    expect(await main(args, again, { parallel: false })).toBe(0);
    expect(again.written['r.csv']).toBe(io.written['r.csv']);
  }, 60_000);

  it('--prior-only fits the prior alone and checks the prior predictive distribution', async () => {
    const io = memoryIo(files);
    expect(await main(['m.slk', '--data', 'trial.csv', ...SMALL, '--json', '--prior-only'], io, { parallel: false })).toBe(0);
    const doc = JSON.parse(io.out);
    expect(doc.priorOnly).toBe(true);
    const mu = doc.quantities[0];
    // prior N(0, 10²): mean 0, 5% and 95% quantiles ∓10·1.6449 (standard normal quantile 1.6449)
    expect(Math.abs(mu.mean)).toBeLessThan(4 * mu.mcseMean);
    expect(Math.abs(mu.q5 + 16.449)).toBeLessThan(4 * mu.mcseQ5);
    expect(Math.abs(mu.q95 - 16.449)).toBeLessThan(4 * mu.mcseQ95);
    expect(doc.checks.kind).toBe('prior');
    expect(doc.loo).toBeUndefined();
  }, 60_000);

  it('prints the checks in the readable summary', async () => {
    const io = memoryIo(files);
    expect(await main(['m.slk', '--data', 'trial.csv', ...SMALL], io, { parallel: false })).toBe(0);
    expect(io.out).toMatch(/Posterior predictive checks of y_new \(500 replicated data sets/);
    expect(io.out).toMatch(/Leave-one-out \(PSIS\): elpd/);
  }, 60_000);

  it.each([
    [['--replicates-out', 'x.csv'], /--replicates-out needs --replicates/],
    [['--check-stat', 'skew'], /--check-stat: unknown statistic "skew"/],
    [['--replicates', '0'], /--replicates must be between 1/],
  ])('rejects %j', async (extra, msg) => {
    const io = memoryIo(files);
    expect(await main(['m.slk', '--data', 'trial.csv', ...(extra as string[])], io, { parallel: false })).toBe(2);
    expect(io.err).toMatch(msg as RegExp);
  });
});
