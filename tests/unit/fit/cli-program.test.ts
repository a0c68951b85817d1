import { describe, expect, it } from 'vitest';
import { fileURLToPath } from 'node:url';
import Papa from 'papaparse';
import { main } from '../../../server/engine/cli/fit';
import { memoryIo } from './memory-io';

const ROOT = fileURLToPath(new URL('../../../', import.meta.url));
const at = (p: string) => `${ROOT}${p}`;


const SMALL = ['--chains', '2', '--warmup', '200', '--draws', '300', '--seed', '8'];

describe('fit command with model-language programs', () => {
  it('conjugate normal mean: posterior mean and second moment match the closed form', async () => {
    // y ~ N(mu, 1), mu ~ N(0, 10²): posterior N(n ȳ / (n + 0.01), 1 / (n + 0.01))
    // ("Bayesian Data Analysis", 3rd ed., CRC Press 2013, §2.5). E[mu²] = var + mean² checks the
    // spread through a derived quantity. Tolerance 4·MCSE of the run.
    const y = [4.1, 5.3, 4.8, 6.0, 5.2, 4.4, 5.9, 5.1];
    const files = {
      'm.slk': 'table trial\nunknown mu\nterm ld_normal(y, mu, 1)\nterm ld_normal(mu, 0, 10)\nderive mu_sq = square(mu)\n',
      'trial.csv': `y\n${y.join('\n')}\n`,
    };
    const io = memoryIo(files);
    expect(await main(['m.slk', '--data', 'trial.csv', ...SMALL, '--json'], io, { parallel: false })).toBe(0);
    const doc = JSON.parse(io.out);
    const n = y.length;
    const ybar = y.reduce((a, b) => a + b, 0) / n;
    const mu = doc.quantities[0];
    expect(mu.name).toBe('mu');
    const postMean = (n * ybar) / (n + 0.01);
    const postVar = 1 / (n + 0.01);
    expect(Math.abs(mu.mean - postMean)).toBeLessThan(4 * mu.mcseMean);
    const sq = doc.quantities[1];
    expect(sq.name).toBe('mu_sq');
    expect(Math.abs(sq.mean - (postVar + postMean ** 2))).toBeLessThan(4 * sq.mcseMean);
    // No inequalities: the automatic choice is plain HMC (docs/engine.md §7.2).
    expect(doc.diagnostics.samplerUsed).toBe('reflect-hmc');
  }, 60_000);

  it('reports compile errors with line and column from the real compiler', async () => {
    const io = memoryIo({ 'bad.slk': 'unknown mu, sigma\nterm ld_normal(mu, 0, sigmaa)\nconstrain sigma >= 0\n' });
    expect(await main(['bad.slk'], io, { parallel: false })).toBe(1);
    expect(io.err).toMatch(/^bad\.slk:2:23: unknown name `sigmaa`/m);
  });

  it('--mode reports the maximum a posteriori point: isotonic regression under an ordering', async () => {
    // Flat prior, Gaussian noise with known σ, ordered means: the posterior mode is the least-squares
    // fit under the ordering, i.e. isotonic regression by pool-adjacent-violators ("Order Restricted
    // Statistical Inference", Wiley 1988, ch. 1). Group means 5, 3, 6 with equal
    // counts pool the first two: (4, 4, 6), worked by hand.
    const files = {
      'iso.slk': 'table t\nunknown mu[3]\nterm ld_normal(y, mu[g], 1)\nconstrain mu[1] <= mu[2] <= mu[3]\n',
      't.csv': 'g,y\n1,4.5\n1,5.5\n2,2.5\n2,3.5\n3,5.5\n3,6.5\n',
    };
    const io = memoryIo(files);
    expect(await main(['iso.slk', '--data', 't.csv', ...SMALL, '--json', '--mode'], io, { parallel: false })).toBe(0);
    const doc = JSON.parse(io.out);
    expect(Object.keys(doc.mode)).toEqual(['mu[1]', 'mu[2]', 'mu[3]']);
    // The interior-point search stops at a duality gap of about 1e-11·(1 + |ℓ|) (mode.ts), so the
    // point agrees with the exact answer far below the 5e-5 checked here.
    expect(doc.mode['mu[1]']).toBeCloseTo(4, 4);
    expect(doc.mode['mu[2]']).toBeCloseTo(4, 4);
    expect(doc.mode['mu[3]']).toBeCloseTo(6, 4);
  }, 60_000);

  it('names the constraints that cannot both hold', async () => {
    const io = memoryIo({ 'c.slk': 'unknown mu\nterm ld_normal(mu, 0, 1)\nconstrain mu >= 2\nconstrain mu <= 1\n' });
    expect(await main(['c.slk'], io, { parallel: false })).toBe(1);
    expect(io.err).toMatch(/"line 3: mu >= 2" and "line 4: mu <= 1" cannot both hold/);
  });

  it('says so when the log-density is not finite at the start, without hanging', async () => {
    const io = memoryIo({ 'nf.slk': 'unknown mu\nterm log(mu - 5)\nconstrain 0 <= mu <= 1\n' });
    expect(await main(['nf.slk', '--chains', '1', '--warmup', '50', '--draws', '50'], io, { parallel: false })).toBe(1);
    expect(io.err).toMatch(/log-density is -Infinity at the starting point/);
  });

  for (const [model, csv] of [
    ['samples/orchard-dose.slk', 'samples/orchard_dose.csv'],
    ['samples/river-sediment.slk', 'samples/river_samples.csv'],
    ['samples/nursery-budget.slk', 'samples/nursery.csv'],
  ]) {
    it(`runs ${model}`, async () => {
      const io = memoryIo();
      const code = await main([at(model), '--data', at(csv), ...SMALL, '--json', '--draws-out', 'd.csv'], io, { parallel: false });
      expect(io.err).toBe('');
      expect(code).toBe(0);
      const doc = JSON.parse(io.out);
      expect(doc.quantities.length).toBeGreaterThan(3);
      const rows = Papa.parse<string[]>(io.written['d.csv'].trim()).data;
      expect(rows).toHaveLength(1 + 2 * 300);
      // The model's own constraints hold in every written draw (runFit checks too).
      const h = rows[0];
      const col = (name: string) => h.indexOf(name);
      for (const r of rows.slice(1).map((x) => x.map(Number))) {
        if (model.includes('orchard')) for (let k = 1; k < 5; k++) expect(r[col(`mu[${k}]`)]).toBeLessThanOrEqual(r[col(`mu[${k + 1}]`)]);
        if (model.includes('river')) {
          const s = [1, 2, 3].map((k) => r[col(`share[${k}]`)]);
          expect(Math.abs(s[0] + s[1] + s[2] - 1)).toBeLessThan(1e-9);
          for (const v of s) expect(v).toBeGreaterThanOrEqual(0);
        }
        if (model.includes('nursery')) {
          const e = [1, 2, 3].map((k) => r[col(`effect[${k}]`)]);
          for (const v of e) expect(v).toBeGreaterThanOrEqual(0);
          expect(e[0] + e[1] + e[2]).toBeLessThanOrEqual(10 + 1e-9);
        }
      }
    }, 120_000);
  }
});
