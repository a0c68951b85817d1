/**
 * The evidence command (server/engine/cli/evidence.ts): JSON fields, the volume of a model with no
 * term lines, a hypothesis, a comparison of two models, and usage errors. Truth values: the standard
 * simplex in R^3 has volume 1/3! = 1/6 (standard formula); an ordering of 3 exchangeable means has
 * prior mass 1/3! (symmetry, common practice); a normalised prior has log Z = 0 on R^k.
 */
import { describe, expect, it } from 'vitest';
import { main } from '../../../server/engine/cli/evidence';
import { memoryIo } from '../fit/memory-io';

const files = {
  'simplex.slk': 'unknown x[3]\nconstrain x >= 0\nconstrain sum(x) <= 1\n',
  'order.slk': 'table d\nunknown mu[3]\nterm ld_normal(y, mu[g], 1)\nterm ld_normal(mu, 0, 2)\nconstrain mu[1] <= mu[2]\nconstrain mu[2] <= mu[3]\n',
  'free.slk': 'table d\nunknown mu[3]\nterm ld_normal(y, mu[g], 1)\nterm ld_normal(mu, 0, 2)\n',
  'd.csv': 'y,g\n0.1,a\n-0.4,a\n0.5,b\n0.9,b\n1.2,c\n1.0,c\n',
};

describe('npm run evidence', { timeout: 60_000 }, () => {
  it('--json on a model with no term lines gives its volume', async () => {
    const io = memoryIo(files);
    expect(await main(['simplex.slk', '--json', '--seed', '3'], io)).toBe(0);
    const out = JSON.parse(io.out);
    for (const k of ['logZ', 'se', 'volumeLog', 'stages', 'draws', 'seconds']) expect(out).toHaveProperty(k);
    expect(out.format).toBe('slackline-evidence');
    expect(out.reference).toBe('volume');
    expect(Math.abs(out.volumeLog - Math.log(1 / 6))).toBeLessThanOrEqual(3 * out.volumeSe); // 1/3!
  });

  it('--hypothesis reports the Bayes factor, prior and posterior masses', async () => {
    const io = memoryIo(files);
    expect(await main(['order.slk', '--data', 'd.csv', '--hypothesis', '5,6', '--json', '--replicates', '6'], io)).toBe(0);
    const out = JSON.parse(io.out);
    for (const k of ['logBF', 'se', 'priorMass', 'posteriorMass']) expect(out.hypothesis).toHaveProperty(k);
    expect(out.hypothesis.likelihoodLines).toEqual([3]);
    expect(Math.abs(out.hypothesis.logPriorMass + Math.log(6))).toBeLessThanOrEqual(3 * out.hypothesis.logPriorMassSe);
    expect(out.hypothesis.logBF).toBeCloseTo(out.hypothesis.logPosteriorMass - out.hypothesis.logPriorMass, 3);
  });

  it('--against reports log BF = log Z₁ − log Z₂', async () => {
    const io = memoryIo(files);
    expect(await main(['order.slk', '--data', 'd.csv', '--against', 'free.slk', '--json'], io)).toBe(0);
    const out = JSON.parse(io.out);
    expect(out.against.model).toBe('free.slk');
    expect(out.comparison.logBF).toBeCloseTo(out.logZ - out.against.logZ, 3);
    expect(out.comparison.se).toBeGreaterThan(0);
  });

  it('the readable form names the volume', async () => {
    const io = memoryIo(files);
    expect(await main(['simplex.slk'], io)).toBe(0);
    expect(io.out).toMatch(/log volume/);
  });

  it('usage and input errors', async () => {
    let io = memoryIo(files);
    expect(await main([], io)).toBe(2);
    io = memoryIo(files);
    expect(await main(['order.slk', '--hypothesis', 'x'], io)).toBe(2);
    io = memoryIo(files);
    expect(await main(['order.slk', '--data', 'd.csv', '--hypothesis', '3'], io)).toBe(1);
    expect(io.err).toMatch(/not a constrain line/);
    io = memoryIo(files);
    expect(await main(['missing.slk'], io)).toBe(1);
  });
});
