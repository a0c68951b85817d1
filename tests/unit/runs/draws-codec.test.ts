import { describe, expect, it } from 'vitest';
import { decodeDraws, decodeFlags, decodeFloats, encodeDraws, encodeFlags, encodeFloats } from '../../../server/runs/draws-codec';

describe('draws codec', () => {
  it('round-trips unknowns and derived draws exactly, draw-major', () => {
    const u = new Float64Array([0.1, 0.2, Math.PI, -1e-300, 5, 6]); // 3 draws × 2 unknowns
    const d = new Float64Array([10, 20, 30]); // 3 draws × 1 derived
    const enc = encodeDraws(u, 2, d, 1);
    expect(enc.drawCount).toBe(3);
    expect(enc.dimension).toBe(3);
    expect(enc.buffer.length).toBe(3 * 3 * 8);
    expect(Array.from(decodeDraws(enc.buffer, 3, 3))).toEqual([0.1, 0.2, 10, Math.PI, -1e-300, 20, 5, 6, 30]);
  });
  it('refuses a buffer of the wrong size', () => {
    expect(() => decodeDraws(Buffer.alloc(16), 3, 1)).toThrow(/expected 24/);
  });
  it('flags as runs', () => {
    const f = [0, 0, 1, 1, 0, 1];
    expect(encodeFlags(f)).toEqual([[2, 2], [5, 1]]);
    expect(Array.from(decodeFlags(encodeFlags(f), 6))).toEqual(f);
  });
  it('per-draw statistics round-trip bit for bit, NaN and infinities included', () => {
    const v = new Float64Array([0.8123456789012345, 1, 0, -0, 1e-310, NaN, Infinity, -2.5]);
    const back = decodeFloats(encodeFloats(v));
    expect(back.length).toBe(v.length);
    expect(Buffer.from(back.buffer).equals(Buffer.from(v.buffer))).toBe(true);
    expect(decodeFloats(encodeFloats(new Float64Array(0))).length).toBe(0);
  });
});
