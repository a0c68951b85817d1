/**
 * The columnar binary draws response: what the server's compute task encodes, the client's decoder
 * reads back as the same numbers rounded to Float32. The reference for Float32 rounding is
 * `Math.fround` (ECMAScript's own round-to-nearest-even to IEEE 754 binary32).
 */
import { describe, expect, it } from 'vitest';
import { TASKS } from '../../../server/compute/tasks';
import { encodeDraws, encodeFlags } from '../../../server/runs/draws-codec';
import { decodeRunDraws, encodeDrawsHead, DRAWS_CONTENT_TYPE } from '../../../shared/draws-binary';
import { drawsCsvHeader, drawsCsvRows } from '../../../shared/export-csv';

/** A seeded stream of awkward doubles (mulberry32; tiny, huge, negative, and exact values). */
function values(seed: number, n: number): Float64Array {
  let a = seed >>> 0;
  const u = () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  return Float64Array.from({ length: n }, (_, i) => (i % 7 === 0 ? 0.1 * i : (u() - 0.5) * 10 ** Math.floor(u() * 12 - 6)));
}

function storedChains(chains: number, draws: number, dimU: number, dimD: number) {
  return Array.from({ length: chains }, (_, c) => {
    const enc = encodeDraws(values(100 + c, draws * dimU), dimU, values(200 + c, draws * dimD), dimD);
    const flags = Array.from({ length: draws }, (_, t) => ((t * (c + 3)) % 11 === 0 ? 1 : 0));
    return {
      chain: c + 1,
      draws: new Uint8Array(enc.buffer),
      drawCount: draws,
      dimension: dimU + dimD,
      divergent: encodeFlags(flags),
      flags,
      rows: new Float64Array(enc.buffer.buffer.slice(enc.buffer.byteOffset, enc.buffer.byteOffset + enc.buffer.byteLength)),
    };
  });
}

describe('binary draws response', () => {
  it('round-trips: every kept draw of every chain and quantity reads back as its Float32 rounding, flags included', async () => {
    const chains = storedChains(3, 250, 4, 2);
    const q = 6;
    const { output } = await TASKS.thinDraws({ chains: chains.map(({ flags: _f, rows: _r, ...c }) => c), quantities: q, max: 100 });
    expect(output.thin).toBe(3); // ceil(250 / 100)
    expect(output.drawsPerChain).toBe(84); // iterations 0, 3, …, 249
    const head = encodeDrawsHead({
      dtype: 'float32', names: ['a[1]', 'a[2]', 'a[3]', 'a[4]', 'sum', 'odd "name"'], unknownCount: 4, thin: output.thin,
      drawsPerChain: output.drawsPerChain, chains: chains.map((c) => c.chain), region: null, projections: [],
    });
    const wire = new Uint8Array(head.length + output.body.length);
    wire.set(head);
    wire.set(output.body, head.length);
    expect(head.length % 4).toBe(0);
    expect(DRAWS_CONTENT_TYPE).toMatch(/^application\//);

    const back = decodeRunDraws(wire.buffer);
    expect(back.names[5]).toBe('odd "name"');
    expect(back.unknownCount).toBe(4);
    expect(back.chains.map((c) => c.chain)).toEqual([1, 2, 3]);
    for (const [ci, c] of chains.entries()) {
      const got = back.chains[ci];
      for (let k = 0; k < q; k++) {
        expect(got.values[k]).toBeInstanceOf(Float32Array);
        expect(got.values[k].length).toBe(84);
        for (let i = 0; i < 84; i++) expect(got.values[k][i]).toBe(Math.fround(c.rows[i * 3 * c.dimension + k]));
      }
      expect(Array.from(got.divergent)).toEqual(Array.from({ length: 84 }, (_, i) => c.flags[i * 3]));
    }
    // 4 bytes per kept value and 1 per kept flag after the header: no text numbers.
    expect(output.body.length).toBe(3 * 84 * (q * 4 + 1));
  });

  it('refuses bytes that are not a draws response or are cut short', () => {
    expect(() => decodeRunDraws(new TextEncoder().encode('{"names":[]}').buffer)).toThrow(/Not a draws response/);
    const head = encodeDrawsHead({ dtype: 'float32', names: ['x'], unknownCount: 1, thin: 1, drawsPerChain: 2, chains: [1], region: null, projections: [] });
    const cut = new Uint8Array(head.length + 5);
    cut.set(head);
    expect(() => decodeRunDraws(cut.buffer)).toThrow(/wrong length/);
  });
});

describe('draws CSV in bounded pieces', () => {
  it('pieces written one after another equal the whole file as it was written in one go', async () => {
    const chains = storedChains(2, 37, 2, 1);
    const names = ['w[1]', 'w[2]', 'odd,name'];
    // The file as the export wrote it before it was streamed: header, then every chain's rows.
    const whole = [drawsCsvHeader(names), ...chains.flatMap((c) => [...drawsCsvRows(c.chain, c.rows, c.dimension, new Float64Array(0), 0)])].join('\n') + '\n';
    const pieces: Uint8Array[] = [];
    let first = true;
    for (const c of chains)
      for (let t = 0; t < c.drawCount; t += 5) {
        const count = Math.min(5, c.drawCount - t);
        const bytes = c.draws.slice(t * c.dimension * 8, (t + count) * c.dimension * 8);
        pieces.push((await TASKS.drawsCsvChunk({ ...(first ? { names } : {}), chain: c.chain, firstIteration: t + 1, draws: bytes, drawCount: count, dimension: c.dimension })).output);
        first = false;
      }
    expect(pieces.length).toBe(16);
    expect(Buffer.concat(pieces).toString('utf8')).toBe(whole);
  });
});
