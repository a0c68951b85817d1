import { describe, expect, it } from 'vitest';
import { thin, thinIndices } from '../../../../src/lib/plot/thin';

describe('thinIndices', () => {
  it('keeps everything when under the limit', () => {
    expect(thinIndices(4, 10)).toEqual([0, 1, 2, 3]);
  });
  it('spreads evenly and keeps both ends', () => {
    const idx = thinIndices(1001, 11);
    expect(idx).toEqual([0, 100, 200, 300, 400, 500, 600, 700, 800, 900, 1000]);
  });
  it('never repeats or exceeds the limit', () => {
    for (const [n, m] of [[7, 5], [1000, 333], [10, 9], [3, 1]]) {
      const idx = thinIndices(n, m);
      expect(idx.length).toBeLessThanOrEqual(m);
      expect(new Set(idx).size).toBe(idx.length);
      expect(idx[0]).toBe(0);
      if (m > 1) expect(idx[idx.length - 1]).toBe(n - 1);
    }
  });
  it('thin picks the values at those indices', () => {
    expect(thin([10, 11, 12, 13, 14], 3)).toEqual([10, 12, 14]);
  });
});
