/** The table cache: least recently used tables leave first once the byte bound is passed. */
import { describe, expect, it } from 'vitest';
import { TableCache } from '../../../server/notebook/table-cache';
import { tableBytes } from '../../../server/notebook/tables';
import type { ParsedTable } from '../../../shared/data';

const table = (rows: number): ParsedTable => ({ rows, columns: { x: { type: 'numeric', values: new Float64Array(rows) } } });

describe('TableCache', () => {
  it('keeps tables within its byte bound, dropping the least recently used', () => {
    const one = tableBytes(table(1000));
    const c = new TableCache(one * 2 + 10);
    c.set('a', table(1000));
    c.set('b', table(1000));
    expect(c.get('a')).toBeDefined(); // a is now the most recently used
    c.set('c', table(1000));
    expect(c.get('b')).toBeUndefined();
    expect(c.get('a')).toBeDefined();
    expect(c.get('c')).toBeDefined();
    expect(c.stats().bytes).toBe(one * 2);
    // A table larger than the whole cache is not kept.
    c.set('huge', table(100_000));
    expect(c.get('huge')).toBeUndefined();
    expect(c.stats().tables).toBe(2);
  });

  it('shares one load between concurrent requests, and a failed load is not kept', async () => {
    const c = new TableCache(1e9);
    let loads = 0;
    const load = async () => {
      loads++;
      await new Promise((r) => setTimeout(r, 10));
      return table(5);
    };
    const got = await Promise.all(Array.from({ length: 5 }, () => c.getOrLoad('k', load)));
    expect(loads).toBe(1);
    expect(new Set(got).size).toBe(1);
    expect(c.stats()).toMatchObject({ misses: 5, loads: 1, hits: 0 });
    await c.getOrLoad('k', load);
    expect(c.stats().hits).toBe(1);
    await expect(c.getOrLoad('bad', async () => Promise.reject(new Error('unreadable')))).rejects.toThrow('unreadable');
    await expect(c.getOrLoad('bad', async () => table(1))).resolves.toBeDefined();
  });

  it('names a dataset by id and creation time', () => {
    expect(TableCache.key({ id: 'abc', createdAt: new Date(5) })).toBe('abc@5');
  });
});
