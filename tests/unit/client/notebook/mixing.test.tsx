// @vitest-environment happy-dom
/**
 * Numbers behind the chain-agreement and ladder figures. Quantiles are checked against jStat
 * (a reference library from npm); the agreement and order cases are worked out by hand.
 */
import { afterEach, describe, expect, it } from 'vitest';
import { cleanup, render, screen } from '@testing-library/react';
import { createRequire } from 'node:module';
import { agreementStrip, chainWindows, familyOf, orderedChains, pooledIqr, quantileSorted } from '../../../../src/features/notebook/fit/mixing';
import { LadderView } from '../../../../src/features/notebook/fit/ladder-view';
import type { QuantitySummary } from '../../../../shared/fit';

afterEach(cleanup);

/** jstat ships no type declarations: the one function used here, loaded through require. */
const jStat = createRequire(import.meta.url)('jstat') as { quantiles: (a: number[], p: number[], a1: number, b1: number) => number[] };

describe('mixing numbers', () => {
  it('quantiles interpolate between order statistics like jStat.quantiles with (1, 1) (the common "type 7" rule)', () => {
    const xs = [3.1, -2, 7.5, 0.4, 0.4, 9, 1.25, -0.5, 4, 2.2];
    const sorted = Float64Array.from(xs).sort();
    const want = jStat.quantiles(xs, [0.25, 0.5, 0.75], 1, 1);
    expect(quantileSorted(sorted, 0.25)).toBeCloseTo(want[0], 12);
    expect(quantileSorted(sorted, 0.5)).toBeCloseTo(want[1], 12);
    expect(quantileSorted(sorted, 0.75)).toBeCloseTo(want[2], 12);
  });

  it('the strip is near 1 for chains that are one stream cut in pieces, and large for a chain sitting apart', () => {
    // Four chains of independent normals (fixed seed): the spread of their window medians is what their
    // own wobble predicts, so the cells average about 1 (the expected-range constant makes it so).
    let s = 12345;
    const u = () => ((s = (Math.imul(s, 1103515245) + 12345) >>> 0) / 4294967296);
    const normal = () => Math.sqrt(-2 * Math.log(1 - u())) * Math.cos(2 * Math.PI * u());
    const chains = Array.from({ length: 4 }, () => Array.from({ length: 1600 }, normal));
    const strip = agreementStrip(chainWindows(chains, 16));
    const mean = strip.reduce((a, b) => a + b, 0) / strip.length;
    // Tolerance: 16 cells of a noisy ratio; a loose band around 1 (our own check, not a published value).
    expect(mean).toBeGreaterThan(0.6);
    expect(mean).toBeLessThan(1.4);
    const apart = chains.map((c, k) => (k === 3 ? c.map((v) => v + 2) : c));
    for (const a of agreementStrip(chainWindows(apart, 16))) expect(a).toBeGreaterThan(3);
    expect(agreementStrip(chainWindows([chains[0]], 4))).toEqual([0, 0, 0, 0]);
    expect(pooledIqr([[1, 2, 3, 4, 5]])).toBe(2); // type-7 quartiles of 1…5 are 2 and 4
  });

  it('windows carry their iterations, multiplied back by the thinning', () => {
    const w = chainWindows([[1, 2, 3, 4, 5, 6]], 3, 10)[0];
    expect(w.map((x) => [x.from, x.to])).toEqual([[1, 20], [21, 40], [41, 60]]);
    expect(w[0].q50).toBe(1.5);
  });

  it('orderings: a chain mu[1] ≤ mu[2] ≤ mu[3] from the rows, not bounds or sums', () => {
    const region = {
      names: ['mu[1]', 'mu[2]', 'mu[3]', 'sigma'],
      A: [[1, -1, 0, 0], [0, 2, -2, 0], [0, 0, 0, -1], [1, 1, 0, 0]],
      b: [0, 0, -0.01, 3],
      labels: ['a', 'b', 'c', 'd'],
      E: [], e: [], eLabels: [],
    };
    expect(orderedChains(region)).toEqual([[0, 1, 2]]);
    expect(orderedChains({ ...region, A: region.A.slice(0, 1), b: region.b.slice(0, 1) })).toEqual([]); // two rungs are no ladder
    expect(familyOf('mu[3]')).toBe('mu');
    expect(familyOf('sigma')).toBe('sigma');
  });

  it('the ladder draws one rung per ordered quantity and the order line through the medians', () => {
    const q = (name: string, q50: number): QuantitySummary => ({
      name, kind: 'unknown', mean: q50, sd: 0.1, q5: q50 - 0.2, q50, q95: q50 + 0.2, rhat: 1, essBulk: 900, essTail: 900, mcseMean: 0.01, mcseQ5: 0.01, mcseQ50: 0.01, mcseQ95: 0.01,
    });
    render(<LadderView rungs={[q('mu[1]', 1), q('mu[2]', 1.5), q('mu[3]', 2.4)]} />);
    expect(screen.getAllByTestId('ladder-rung')).toHaveLength(3);
    expect(screen.getByTestId('ladder-order').getAttribute('d')!.split('L')).toHaveLength(3);
    expect(screen.getByTestId('ladder-view').getAttribute('aria-label')).toBe('Ladder of mu[1] ≤ mu[2] ≤ mu[3]');
  });
});
